import type { KeyHelp, KeyInfo } from '../keys.js';
import type { DecodedRecording, RecordingList } from '../services.js';
import { editText } from '../widgets/text-edit.js';

export type Comparison =
  | { state: 'busy' }
  | { state: 'ready'; report: Record<string, unknown>; /** Speed the expected message was planned at [wpm]. */ atWpm: number }
  | { state: 'error'; message: string; unavailable?: boolean };

export interface ReadState {
  list: RecordingList | null;
  listError: string | null;
  cursor: number;
  /** Recording being decoded and how far along (0…1). */
  decoding: { path: string; progress: number; seq: number } | null;
  /** Counts decode requests, so each one starts exactly once. */
  seq: number;
  result: DecodedRecording | null;
  error: { message: string; unavailable: boolean } | null;
  /** The expected message, once given. */
  expected: string | null;
  /** Text being typed as the expected message, or null. */
  typing: string | null;
  comparison: Comparison | null;
  /** Lower pane: timing histogram or comparison with the expected message. */
  pane: 'timing' | 'compare';
  /** First row shown in the lower pane. */
  scroll: number;
  /** Envelope chart: first millisecond shown, and detail (one column per unit) or the whole recording. */
  envelopeMs: number;
  zoom: 'detail' | 'whole';
}

export const initialReadState = (): ReadState => ({
  list: null, listError: null, cursor: 0, decoding: null, seq: 0, result: null, error: null,
  expected: null, typing: null, comparison: null, pane: 'timing', scroll: 0, envelopeMs: 0, zoom: 'detail',
});

export type ReadAction =
  | { type: 'listed'; list: RecordingList }
  | { type: 'list-failed'; message: string }
  | { type: 'move'; delta: number }
  | { type: 'open' }
  | { type: 'progress'; path: string; progress: number }
  | { type: 'decoded'; result: DecodedRecording }
  | { type: 'failed'; path: string; message: string; unavailable: boolean }
  | { type: 'expect-start'; /** Text to start from when nothing is expected yet (the Plan message). */ prefill?: string }
  | { type: 'expect-set'; value: string }
  | { type: 'expect-commit' }
  | { type: 'expect-cancel' }
  | { type: 'compared'; comparison: Comparison }
  | { type: 'pane' }
  | { type: 'scroll'; delta: number }
  | { type: 'pan'; direction: 1 | -1; stepMs: number }
  | { type: 'zoom' };

export function selectedPath(state: ReadState): string | null {
  return state.list?.files[state.cursor]?.path ?? null;
}

export function readReducer(state: ReadState, action: ReadAction): ReadState {
  switch (action.type) {
    case 'listed': {
      const i = action.list.open ? action.list.files.findIndex((f) => f.path === action.list.open) : 0;
      const listed = { ...state, list: action.list, listError: null, cursor: Math.max(0, i) };
      return action.list.open ? readReducer(listed, { type: 'open' }) : listed;
    }
    case 'list-failed':
      return { ...state, listError: action.message };
    case 'move': {
      const n = state.list?.files.length ?? 0;
      if (n === 0) return state;
      return { ...state, cursor: Math.min(n - 1, Math.max(0, state.cursor + action.delta)) };
    }
    case 'open': {
      const path = selectedPath(state);
      if (!path || state.decoding) return state;
      return { ...state, seq: state.seq + 1, decoding: { path, progress: 0, seq: state.seq + 1 }, error: null, comparison: null, scroll: 0 };
    }
    case 'progress':
      return state.decoding?.path === action.path ? { ...state, decoding: { ...state.decoding, progress: action.progress } } : state;
    case 'decoded':
      return { ...state, decoding: null, result: action.result, error: null, envelopeMs: 0, comparison: state.expected ? { state: 'busy' } : null };
    case 'failed':
      return { ...state, decoding: null, error: { message: action.message, unavailable: action.unavailable } };
    case 'expect-start':
      return { ...state, typing: state.expected ?? action.prefill ?? '' };
    case 'expect-set':
      return state.typing === null ? state : { ...state, typing: action.value };
    case 'expect-cancel':
      return { ...state, typing: null };
    case 'expect-commit': {
      if (state.typing === null) return state;
      const expected = state.typing.trim() === '' ? null : state.typing.trim();
      return {
        ...state, typing: null, expected, scroll: 0,
        pane: expected ? 'compare' : 'timing',
        comparison: expected && state.result ? { state: 'busy' } : null,
      };
    }
    case 'compared':
      return { ...state, comparison: action.comparison };
    case 'pane':
      return { ...state, pane: state.pane === 'timing' ? 'compare' : 'timing', scroll: 0 };
    case 'scroll':
      return { ...state, scroll: Math.max(0, state.scroll + action.delta) };
    case 'pan': {
      const d = state.result?.decode;
      if (!d || state.zoom === 'whole') return state;
      const stepMs = Math.max(1, action.stepMs);
      const next = Math.max(0, Math.min(Math.max(0, d.durationMs - stepMs), state.envelopeMs + action.direction * stepMs));
      return { ...state, envelopeMs: next };
    }
    case 'zoom':
      return { ...state, zoom: state.zoom === 'detail' ? 'whole' : 'detail', envelopeMs: 0 };
  }
}

export function readCapturesInput(state: ReadState): boolean {
  return state.typing !== null;
}

/** The Read back workspace's key map. */
export function readKeyToAction(input: string, k: KeyInfo, state: ReadState, pageMs = 1000): ReadAction | null {
  if (state.typing !== null) {
    if (k.return) return { type: 'expect-commit' };
    if (k.escape) return { type: 'expect-cancel' };
    const value = editText(state.typing, input, k);
    return value === null ? null : { type: 'expect-set', value };
  }
  if (k.upArrow || input === 'k') return { type: 'move', delta: -1 };
  if (k.downArrow || input === 'j') return { type: 'move', delta: 1 };
  if (k.return || input === 'o') return { type: 'open' };
  if (input === 'e') return { type: 'expect-start' };
  if (input === 'v') return { type: 'pane' };
  if (k.leftArrow) return { type: 'pan', direction: -1, stepMs: pageMs };
  if (k.rightArrow) return { type: 'pan', direction: 1, stepMs: pageMs };
  if (input === 'z') return { type: 'zoom' };
  if (k.pageDown || input === '.') return { type: 'scroll', delta: 5 };
  if (k.pageUp || input === ',') return { type: 'scroll', delta: -5 };
  return null;
}

export const READ_KEYS: readonly KeyHelp[] = [
  { keys: '↑ ↓  (k j)', does: 'choose a recording' },
  { keys: 'Enter  (o)', does: 'decode it (keys stay live while it runs)' },
  { keys: 'e', does: 'the message meant to be sent (Plan speed), to compare' },
  { keys: '← →  z', does: 'scroll the envelope; z whole recording / detail' },
  { keys: 'v', does: 'lower pane: timing histogram / comparison' },
  { keys: ', .  PgUp PgDn', does: 'scroll the lower pane' },
];

export function readFooter(state: ReadState): string {
  if (state.typing !== null) return 'type the expected message · Enter compare · Esc drop';
  return '↑↓ recording · Enter decode · ←→ z envelope · e expected · v timing/compare';
}
