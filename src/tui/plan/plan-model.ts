import { EDGE_KINDS, type EdgeKind } from '../../core/signal/edges.js';
import { planKeying, type KeyingPlan } from '../../core/timing/plan.js';

/** What the Plan workspace lets a person set. */
export interface PlanSettings {
  message: string;
  /** Character speed [wpm], 5…60 here (the planner takes 1…100). */
  wpm: number;
  /** Overall (Farnsworth) speed [wpm], or null for standard spacing. */
  farnsworthWpm: number | null;
  /** Weighting [%], 10…90, 50 standard. */
  weightPct: number;
  /** 10–90 % rise and fall time [ms], 0…50. */
  riseMs: number;
  edge: EdgeKind;
  /** Tone [Hz], 100…3000. */
  toneHz: number;
}

export const DEFAULT_SETTINGS: PlanSettings = {
  message: 'VVV Q7ZKT/B JO01 <AR>',
  wpm: 18,
  farnsworthWpm: null,
  weightPct: 50,
  riseMs: 5,
  edge: 'raised-cosine',
  toneHz: 700,
};

export type PlanField = 'message' | 'wpm' | 'farnsworth' | 'weight' | 'rise' | 'edge' | 'tone';
export const PLAN_FIELDS: readonly PlanField[] = ['message', 'wpm', 'farnsworth', 'weight', 'rise', 'edge', 'tone'];

export const FIELD_LABELS: Record<PlanField, string> = {
  message: 'Message',
  wpm: 'Speed',
  farnsworth: 'Farnsworth',
  weight: 'Weighting',
  rise: 'Rise time',
  edge: 'Edge',
  tone: 'Tone',
};

interface NumberField {
  min: number;
  max: number;
  step: number;
  unit: string;
}

export const NUMBER_FIELDS: Record<'wpm' | 'farnsworth' | 'weight' | 'rise' | 'tone', NumberField> = {
  wpm: { min: 5, max: 60, step: 1, unit: 'wpm' },
  farnsworth: { min: 5, max: 59, step: 1, unit: 'wpm' },
  weight: { min: 10, max: 90, step: 1, unit: '%' },
  rise: { min: 0, max: 50, step: 0.5, unit: 'ms' },
  tone: { min: 100, max: 3000, step: 10, unit: 'Hz' },
};

/** A field's value as shown on screen. */
export function fieldText(s: PlanSettings, field: PlanField): string {
  switch (field) {
    case 'message':
      return s.message;
    case 'wpm':
      return `${s.wpm} wpm`;
    case 'farnsworth':
      return s.farnsworthWpm === null ? 'off (standard spacing)' : `${s.farnsworthWpm} wpm overall`;
    case 'weight':
      return `${s.weightPct} %${s.weightPct === 50 ? ' (standard)' : ''}`;
    case 'rise':
      return s.edge === 'hard' ? `${s.riseMs} ms (not used by hard keying)` : `${s.riseMs} ms (10–90 %)`;
    case 'edge':
      return s.edge;
    case 'tone':
      return `${s.toneHz} Hz`;
  }
}

const clamp = (x: number, lo: number, hi: number): number => Math.min(hi, Math.max(lo, x));
const roundTo = (x: number, step: number): number => Math.round(x / step) * step;

/** Settings after one step of ←/→ on a field (numbers step, the edge kind cycles, Farnsworth turns on/off). */
export function stepField(s: PlanSettings, field: PlanField, direction: 1 | -1): PlanSettings {
  switch (field) {
    case 'message':
      return s;
    case 'edge': {
      const i = EDGE_KINDS.indexOf(s.edge);
      return { ...s, edge: EDGE_KINDS[(i + direction + EDGE_KINDS.length) % EDGE_KINDS.length]! };
    }
    case 'farnsworth': {
      if (s.farnsworthWpm === null) return direction < 0 && s.wpm > 5 ? { ...s, farnsworthWpm: s.wpm - 1 } : s;
      const next = s.farnsworthWpm + direction;
      if (next >= s.wpm) return { ...s, farnsworthWpm: null };
      return { ...s, farnsworthWpm: clamp(next, NUMBER_FIELDS.farnsworth.min, s.wpm - 1) };
    }
    case 'wpm': {
      const f = NUMBER_FIELDS.wpm;
      const wpm = clamp(s.wpm + direction * f.step, f.min, f.max);
      const farnsworthWpm = s.farnsworthWpm !== null && s.farnsworthWpm >= wpm ? null : s.farnsworthWpm;
      return { ...s, wpm, farnsworthWpm };
    }
    case 'weight':
      return { ...s, weightPct: clamp(s.weightPct + direction * NUMBER_FIELDS.weight.step, NUMBER_FIELDS.weight.min, NUMBER_FIELDS.weight.max) };
    case 'rise':
      return { ...s, riseMs: clamp(roundTo(s.riseMs + direction * NUMBER_FIELDS.rise.step, 0.5), NUMBER_FIELDS.rise.min, NUMBER_FIELDS.rise.max) };
    case 'tone':
      return { ...s, toneHz: clamp(s.toneHz + direction * NUMBER_FIELDS.tone.step, NUMBER_FIELDS.tone.min, NUMBER_FIELDS.tone.max) };
  }
}

/** Parses what was typed into a field; returns the new settings or an error line. */
export function applyTyped(s: PlanSettings, field: PlanField, typed: string): { settings: PlanSettings } | { error: string } {
  if (field === 'message') return { settings: { ...s, message: typed } };
  if (field === 'edge') {
    const e = EDGE_KINDS.find((k) => k.startsWith(typed.trim().toLowerCase()));
    return e ? { settings: { ...s, edge: e } } : { error: `edge must be one of ${EDGE_KINDS.join(', ')} (got '${typed}')` };
  }
  const t = typed.trim().toLowerCase();
  if (field === 'farnsworth' && (t === '' || t === 'off' || t === '0')) return { settings: { ...s, farnsworthWpm: null } };
  const x = Number(t);
  const f = NUMBER_FIELDS[field];
  const label = FIELD_LABELS[field].toLowerCase();
  if (t === '' || !Number.isFinite(x)) return { error: `${label} must be a number (got '${typed}')` };
  if (x < f.min || x > f.max) return { error: `${label} must be from ${f.min} to ${f.max} ${f.unit} (got ${typed})` };
  switch (field) {
    case 'wpm':
      return { settings: { ...s, wpm: x, farnsworthWpm: s.farnsworthWpm !== null && s.farnsworthWpm >= x ? null : s.farnsworthWpm } };
    case 'farnsworth':
      return x >= s.wpm ? { error: `Farnsworth speed must be below the character speed ${s.wpm} wpm (got ${typed})` } : { settings: { ...s, farnsworthWpm: x } };
    case 'weight':
      return { settings: { ...s, weightPct: x } };
    case 'rise':
      return { settings: { ...s, riseMs: x } };
    case 'tone':
      return { settings: { ...s, toneHz: x } };
  }
}

/** Plans the message with the core planner; an invalid message gives its one-line error. */
export function computePlan(s: PlanSettings): { plan: KeyingPlan } | { error: string } {
  try {
    return { plan: planKeying(s.message, { wpm: s.wpm, farnsworthWpm: s.farnsworthWpm, weightPct: s.weightPct, substitute: false }) };
  } catch (err) {
    return { error: (err as Error).message };
  }
}
