import type { KeyHelp, KeyInfo } from '../keys.js';
import type { ShapeTask } from '../tasks.js';

export type ShapeSource = 'recording' | 'plan';

export interface ShapeState {
  /** What the report describes: a recording (measured) or the Plan settings (predicted). */
  source: ShapeSource | null;
  /** Label of the source (file name or plan summary). */
  label: string | null;
  job: { what: 'measure' | 'predict' | 'sweep'; progress: number; task: ShapeTask; seq: number } | null;
  seq: number;
  report: Record<string, unknown> | null;
  sweep: unknown;
  error: { message: string; unavailable: boolean } | null;
  scroll: number;
}

export const initialShapeState = (): ShapeState => ({ source: null, label: null, job: null, seq: 0, report: null, sweep: null, error: null, scroll: 0 });

export type ShapeAction =
  | { type: 'start'; what: 'measure' | 'predict' | 'sweep'; label: string; task: ShapeTask }
  | { type: 'progress'; progress: number }
  | { type: 'report'; report: Record<string, unknown> }
  | { type: 'swept'; sweep: unknown }
  | { type: 'failed'; message: string; unavailable: boolean }
  | { type: 'scroll'; delta: number };

export function shapeReducer(state: ShapeState, action: ShapeAction): ShapeState {
  switch (action.type) {
    case 'start':
      if (state.job) return state;
      return {
        ...state, seq: state.seq + 1, job: { what: action.what, progress: 0, task: action.task, seq: state.seq + 1 }, error: null,
        ...(action.what === 'sweep' ? {} : { source: action.what === 'measure' ? 'recording' : 'plan', label: action.label, report: null }),
      };
    case 'progress':
      return state.job ? { ...state, job: { ...state.job, progress: action.progress } } : state;
    case 'report':
      return { ...state, job: null, report: action.report, scroll: 0 };
    case 'swept':
      return { ...state, job: null, sweep: action.sweep };
    case 'failed':
      return { ...state, job: null, error: { message: action.message, unavailable: action.unavailable } };
    case 'scroll':
      return { ...state, scroll: Math.max(0, state.scroll + action.delta) };
  }
}

/** Requests the Shape workspace makes of the app (the component turns them into jobs). */
export type ShapeRequest = { type: 'measure' } | { type: 'predict' } | { type: 'sweep' } | { type: 'scroll'; delta: number };

/** The Shape workspace's key map. */
export function shapeKeyToAction(input: string, k: KeyInfo): ShapeRequest | null {
  if (input === 'm' || k.return) return { type: 'measure' };
  if (input === 'p') return { type: 'predict' };
  if (input === 'w') return { type: 'sweep' };
  if (k.downArrow || k.pageDown || input === 'j' || input === '.') return { type: 'scroll', delta: 3 };
  if (k.upArrow || k.pageUp || input === 'k' || input === ',') return { type: 'scroll', delta: -3 };
  return null;
}

export const SHAPE_KEYS: readonly KeyHelp[] = [
  { keys: 'Enter  (m)', does: 'measure the recording chosen in Read back' },
  { keys: 'p', does: 'predict it from the Plan settings' },
  { keys: 'w', does: 'sweep the rise time at the Plan speed and edge' },
  { keys: '↑ ↓  , .', does: 'scroll the report' },
];

export const shapeFooter = (): string => 'Enter measure recording · p predict from Plan · w rise sweep · ↑↓ scroll';
