import { EXPORT_FORMATS, type ExportFormat } from '../../io/export.js';
import type { KeyHelp, KeyInfo } from '../keys.js';
import type { Tone } from '../theme.js';
import { editText } from '../widgets/text-edit.js';
import { applyTyped, computePlan, DEFAULT_SETTINGS, fieldText, PLAN_FIELDS, stepField, type PlanField, type PlanSettings } from './plan-model.js';

/** What the predicted keying shape says about the plan's bandwidth (from the core's predictShape). */
export type Prediction =
  | { state: 'idle' | 'busy' | 'unavailable' }
  | { state: 'error'; message: string }
  | { state: 'ready'; occupiedHz: number | null; at40DbcHz: number | null; necessaryHz: number | null; k: number | null; designator: string | null; pass: boolean | null };

export interface Exporter {
  format: ExportFormat;
  fileName: string;
  /** name: typing; checking: does the file exist?; confirm: it does, replace?; writing: under way. */
  stage: 'name' | 'checking' | 'confirm' | 'writing';
  /** Replace an existing file (only after the person said yes). */
  force: boolean;
}

export interface PlanState {
  settings: PlanSettings;
  field: PlanField;
  /** Text being typed into the selected field, or null when not editing. */
  editing: string | null;
  /** First millisecond shown in the timeline strip. */
  scrollMs: number;
  /** `detail`: two columns per unit; `whole`: the whole message fits the strip. */
  zoom: 'detail' | 'whole';
  exporter: Exporter | null;
  status: { tone: Tone; text: string } | null;
  prediction: Prediction;
}

export const initialPlanState = (settings: PlanSettings = DEFAULT_SETTINGS): PlanState => ({
  settings,
  field: 'message',
  editing: null,
  scrollMs: 0,
  zoom: 'detail',
  exporter: null,
  status: null,
  prediction: { state: 'idle' },
});

export type PlanAction =
  | { type: 'move'; delta: 1 | -1 }
  | { type: 'step'; direction: 1 | -1 }
  | { type: 'edit-start' }
  | { type: 'edit-set'; value: string }
  | { type: 'edit-commit' }
  | { type: 'edit-cancel' }
  | { type: 'scroll'; direction: 1 | -1; pageMs: number }
  | { type: 'zoom' }
  | { type: 'export-open' }
  | { type: 'export-format'; direction: 1 | -1 }
  | { type: 'export-name'; value: string }
  | { type: 'export-submit' }
  | { type: 'export-confirm' }
  | { type: 'export-write' }
  | { type: 'export-force' }
  | { type: 'export-done'; ok: boolean; text: string }
  | { type: 'export-cancel' }
  | { type: 'prediction'; prediction: Prediction };

const EXTENSIONS: Record<ExportFormat, string> = { json: 'json', csv: 'csv', c: 'h', bits: 'bits', wav: 'wav' };

/** File name suggested for a message and format, e.g. `q7zkt-b.wav`. */
export function suggestedName(message: string, format: ExportFormat): string {
  const stem = message.toLowerCase().replace(/<[^>]*>/g, '').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 24) || 'plan';
  return `${stem}.${EXTENSIONS[format]}`;
}

function withExtension(name: string, format: ExportFormat): string {
  const dot = name.lastIndexOf('.');
  const stem = dot > 0 ? name.slice(0, dot) : name;
  return `${stem}.${EXTENSIONS[format]}`;
}

export function planReducer(state: PlanState, action: PlanAction): PlanState {
  switch (action.type) {
    case 'move': {
      const i = PLAN_FIELDS.indexOf(state.field);
      return { ...state, field: PLAN_FIELDS[(i + action.delta + PLAN_FIELDS.length) % PLAN_FIELDS.length]!, status: null };
    }
    case 'step': {
      const settings = stepField(state.settings, state.field, action.direction);
      return settings === state.settings ? state : { ...state, settings, status: null };
    }
    case 'edit-start': {
      const s = state.settings;
      const start =
        state.field === 'message' ? s.message
          : state.field === 'farnsworth' ? (s.farnsworthWpm === null ? '' : String(s.farnsworthWpm))
            : state.field === 'edge' ? s.edge
              : String({ wpm: s.wpm, weight: s.weightPct, rise: s.riseMs, tone: s.toneHz }[state.field]);
      return { ...state, editing: start, status: null };
    }
    case 'edit-set':
      return state.editing === null ? state : { ...state, editing: action.value };
    case 'edit-cancel':
      return { ...state, editing: null };
    case 'edit-commit': {
      if (state.editing === null) return state;
      const r = applyTyped(state.settings, state.field, state.editing);
      if ('error' in r) return { ...state, status: { tone: 'bad', text: r.error } };
      return { ...state, settings: r.settings, editing: null, scrollMs: state.field === 'message' ? 0 : state.scrollMs, status: null };
    }
    case 'scroll':
    {
      // Never past the end: the last page still shows the end of the message.
      const planned = computePlan(state.settings);
      const endMs = 'plan' in planned ? planned.plan.totalMs : 0;
      const scrollMs = Math.min(Math.max(0, endMs - action.pageMs), Math.max(0, state.scrollMs + action.direction * action.pageMs));
      return { ...state, scrollMs };
    }
    case 'zoom':
      return { ...state, zoom: state.zoom === 'detail' ? 'whole' : 'detail', scrollMs: 0 };
    case 'export-open':
      return { ...state, exporter: { format: 'wav', fileName: suggestedName(state.settings.message, 'wav'), stage: 'name', force: false }, status: null };
    case 'export-format': {
      if (!state.exporter) return state;
      const i = EXPORT_FORMATS.indexOf(state.exporter.format);
      const format = EXPORT_FORMATS[(i + action.direction + EXPORT_FORMATS.length) % EXPORT_FORMATS.length]!;
      return { ...state, exporter: { ...state.exporter, format, fileName: withExtension(state.exporter.fileName, format), stage: 'name', force: false } };
    }
    case 'export-name':
      return state.exporter ? { ...state, exporter: { ...state.exporter, fileName: action.value, stage: 'name', force: false } } : state;
    case 'export-submit':
      return state.exporter && state.exporter.stage === 'name' && state.exporter.fileName.trim() !== ''
        ? { ...state, exporter: { ...state.exporter, fileName: state.exporter.fileName.trim(), stage: 'checking' } }
        : state;
    case 'export-confirm':
      return state.exporter ? { ...state, exporter: { ...state.exporter, stage: 'confirm' } } : state;
    case 'export-write':
      return state.exporter ? { ...state, exporter: { ...state.exporter, stage: 'writing' } } : state;
    case 'export-force':
      return state.exporter?.stage === 'confirm' ? { ...state, exporter: { ...state.exporter, stage: 'writing', force: true } } : state;
    case 'export-done':
      return action.ok
        ? { ...state, exporter: null, status: { tone: 'good', text: action.text } }
        : { ...state, exporter: state.exporter ? { ...state.exporter, stage: 'name' } : null, status: { tone: 'bad', text: action.text } };
    case 'export-cancel':
      return { ...state, exporter: null, status: { tone: 'plain', text: 'export cancelled' } };
    case 'prediction':
      return { ...state, prediction: action.prediction };
  }
}

/** True while the workspace takes every key (typing into a field or the export prompt). */
export function planCapturesInput(state: PlanState): boolean {
  return state.editing !== null || state.exporter !== null;
}

/** The Plan workspace's key map: a pure function from a key press to an action (or nothing). */
export function planKeyToAction(input: string, k: KeyInfo, state: PlanState, pageMs: number): PlanAction | null {
  if (state.exporter) {
    const ex = state.exporter;
    if (ex.stage === 'writing' || ex.stage === 'checking') return null;
    if (ex.stage === 'confirm') {
      if (input === 'y' || input === 'Y') return { type: 'export-force' };
      if (input === 'n' || input === 'N' || k.escape) return { type: 'export-name', value: ex.fileName };
      return null;
    }
    if (k.escape) return { type: 'export-cancel' };
    if (k.return) return { type: 'export-submit' };
    if (k.tab) return { type: 'export-format', direction: k.shift ? -1 : 1 };
    const value = editText(ex.fileName, input, k, 200);
    return value === null ? null : { type: 'export-name', value };
  }
  if (state.editing !== null) {
    if (k.return) return { type: 'edit-commit' };
    if (k.escape) return { type: 'edit-cancel' };
    const value = editText(state.editing, input, k);
    return value === null ? null : { type: 'edit-set', value };
  }
  if (k.upArrow || input === 'k') return { type: 'move', delta: -1 };
  if (k.downArrow || input === 'j') return { type: 'move', delta: 1 };
  if (k.leftArrow || input === '-') return { type: 'step', direction: -1 };
  if (k.rightArrow || input === '+' || input === '=') return { type: 'step', direction: 1 };
  if (k.return || input === 'e') return { type: 'edit-start' };
  if (input === ',' || input === '<' || k.pageUp) return { type: 'scroll', direction: -1, pageMs };
  if (input === '.' || input === '>' || k.pageDown) return { type: 'scroll', direction: 1, pageMs };
  if (input === 'z') return { type: 'zoom' };
  if (input === 'x') return { type: 'export-open' };
  return null;
}

export const PLAN_KEYS: readonly KeyHelp[] = [
  { keys: '↑ ↓  (k j)', does: 'choose a setting' },
  { keys: '← →  (- +)', does: 'change it (the edge kind cycles)' },
  { keys: 'Enter  (e)', does: 'type it: Enter keeps, Esc drops, Ctrl-U clears' },
  { keys: ', .  PgUp PgDn', does: 'scroll the timeline strip' },
  { keys: 'z', does: 'whole message / detail in the strip' },
  { keys: 'x', does: 'export: Tab format, type a name, Enter writes' },
];

/** Short footer hints for the Plan workspace. */
export function planFooter(state: PlanState): string {
  if (state.exporter?.stage === 'confirm') return 'y replace the file · n choose another name';
  if (state.exporter) return 'Tab format · type a file name · Enter write · Esc cancel';
  if (state.editing !== null) return 'type · Enter keep · Esc drop · Ctrl-U clear';
  return `↑↓ setting · ←→ change · Enter type · ,. scroll · z zoom · x export`;
}

export { fieldText };
