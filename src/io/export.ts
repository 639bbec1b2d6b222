import type { KeyingPlan } from '../core/timing/plan.js';
import { quantizeToTicks, toUnitBits } from '../core/timing/ticks.js';
import type { Interval } from '../core/timeline.js';
import { InputError } from '../core/errors.js';

export const EXPORT_FORMATS = ['json', 'csv', 'c', 'bits', 'wav'] as const;
export type ExportFormat = (typeof EXPORT_FORMATS)[number];

/** Format implied by a file name's extension, or undefined. */
export function formatFromPath(path: string): ExportFormat | undefined {
  const ext = path.toLowerCase().split('.').pop() ?? '';
  const map: Record<string, ExportFormat> = { json: 'json', csv: 'csv', h: 'c', c: 'c', bits: 'bits', txt: 'bits', wav: 'wav' };
  return map[ext];
}

/** Rounds to 1 µs so that sums of float unit lengths print cleanly. */
export const roundMs = (ms: number): number => Math.round(ms * 1000) / 1000;
const roundIv = (iv: Interval): Interval => [roundMs(iv[0]), roundMs(iv[1])];

/** The plan as a plain JSON object (field names are a stable interface). */
export function planToJson(plan: KeyingPlan): Record<string, unknown> {
  return {
    text: plan.text,
    wpm: plan.wpm,
    farnsworthWpm: plan.farnsworthWpm,
    unitMs: roundMs(plan.unitMs),
    totalMs: roundMs(plan.totalMs),
    durationMs: roundMs(plan.ptt.length > 0 ? plan.ptt[plan.ptt.length - 1]![1] - plan.ptt[0]![0] : plan.totalMs),
    characterCount: plan.characterCount,
    weightPct: plan.weightPct,
    compensationMs: plan.compensationMs,
    ditMs: roundMs(plan.ditMs),
    dahMs: roundMs(plan.dahMs),
    gapsMs: { element: roundMs(plan.gapsMs.element), letter: roundMs(plan.gapsMs.letter), word: roundMs(plan.gapsMs.word) },
    repeat: plan.repeat,
    everyMs: plan.everyMs,
    messageMs: roundMs(plan.messageMs),
    marks: plan.marks.map(roundIv),
    ...(plan.ptt.length > 0 ? { ptt: plan.ptt.map(roundIv), pttLeadMs: plan.pttLeadMs, pttTailMs: plan.pttTailMs } : {}),
    characters: plan.characters.map((c) => ({ text: c.text, pattern: c.pattern, startMs: roundMs(c.startMs), endMs: roundMs(c.endMs) })),
    warnings: plan.warnings,
  };
}

/** CSV: one row per interval (`down`, `up`, and `ptt` when PTT times are set). */
export function planToCsv(plan: KeyingPlan): string {
  const rows: string[] = ['state,startMs,durationMs'];
  for (const [a, b] of plan.ptt) rows.push(`ptt,${roundMs(a)},${roundMs(b - a)}`);
  plan.marks.forEach(([a, b], i) => {
    rows.push(`down,${roundMs(a)},${roundMs(b - a)}`);
    const next = plan.marks[i + 1];
    if (next) rows.push(`up,${roundMs(b)},${roundMs(next[0] - b)}`);
  });
  return rows.join('\n') + '\n';
}

/** The plan at one character per unit. */
export function planToBits(plan: KeyingPlan): { text: string; exact: boolean } {
  const { bits, exact } = toUnitBits(plan.marks, plan.unitMs);
  return { text: bits + '\n', exact };
}

/** A valid C identifier from a user's name (letters, digits, underscores; no leading digit). */
export function cIdentifier(name: string): string {
  let id = name.replace(/[^A-Za-z0-9_]/g, '_');
  if (!/^[A-Za-z_]/.test(id)) id = `k_${id}`;
  if (id.replace(/_/g, '') === '') throw new InputError(`--name must contain a letter or figure (got '${name}')`);
  return id;
}

const SAFETY = [
  'Caution: transmitting needs a licence and must follow local regulations; mind RF exposure.',
  'Keying lines of real transmitters can carry voltage: interface through isolation (opto-coupler',
  'or relay) and defer to local rules and licensed practice.',
];

/** C header for keyer firmware: durations in integer timer ticks, rounded with error diffusion. */
export function planToCHeader(plan: KeyingPlan, tickHz: number, name: string): string {
  const id = cIdentifier(name);
  const upper = id.toUpperCase();
  const q = quantizeToTicks(plan.marks, tickHz);
  const max = Math.max(...q.steps, 0);
  const type = max <= 65535 ? 'uint16_t' : 'uint32_t';
  const ticksOf = (ms: number): number => Math.round((ms * tickHz) / 1000);
  const safeText = plan.text.replace(/\*\//g, '* /');
  const lines: string[] = [];
  lines.push('/*');
  lines.push(` * keyform keying plan for "${safeText}" (generated; edit the plan, not this file).`);
  lines.push(` * Speed ${plan.wpm} wpm${plan.farnsworthWpm ? `, Farnsworth ${plan.farnsworthWpm} wpm` : ''}, unit ${roundMs(plan.unitMs)} ms, weight ${plan.weightPct} %, compensation ${plan.compensationMs} ms.`);
  lines.push(` * ${plan.characterCount} characters, ${plan.marks.length} marks, ${roundMs(plan.totalMs)} ms from first key-down to last key-up${plan.repeat > 1 ? ` (${plan.repeat} repeats)` : ''}.`);
  lines.push(` * Timer ${tickHz} Hz. Edge times are rounded to ticks (error diffusion): largest per-element`);
  lines.push(` * rounding error ${q.maxStepErrorTicks.toFixed(3)} ticks, largest drift at any edge ${q.maxDriftTicks.toFixed(3)} ticks,`);
  lines.push(` * total drift ${q.totalDriftTicks.toFixed(3)} ticks (${roundMs((q.totalDriftTicks * 1000) / tickHz)} ms).`);
  lines.push(` * ${id}_steps alternates key-down and key-up, starting with key-down.`);
  lines.push(' *');
  for (const s of SAFETY) lines.push(` * ${s}`);
  lines.push(' */');
  lines.push(`#ifndef KEYFORM_${upper}_H`);
  lines.push(`#define KEYFORM_${upper}_H`);
  lines.push('');
  lines.push('#include <stdint.h>');
  lines.push('');
  lines.push(`#define ${upper}_TICK_HZ ${tickHz}UL`);
  lines.push(`#define ${upper}_STEP_COUNT ${q.steps.length}U`);
  lines.push(`#define ${upper}_TOTAL_TICKS ${q.steps.reduce((a, b) => a + b, 0)}UL`);
  if (plan.ptt.length > 0) {
    lines.push(`#define ${upper}_PTT_LEAD_TICKS ${ticksOf(plan.pttLeadMs)}UL`);
    lines.push(`#define ${upper}_PTT_TAIL_TICKS ${ticksOf(plan.pttTailMs)}UL`);
  }
  lines.push('');
  lines.push(`static const ${type} ${id}_steps[${upper}_STEP_COUNT] = {`);
  for (let i = 0; i < q.steps.length; i += 12) lines.push(`  ${q.steps.slice(i, i + 12).join(', ')},`);
  lines.push('};');
  lines.push('');
  lines.push(`#endif /* KEYFORM_${upper}_H */`);
  return lines.join('\n') + '\n';
}

export const SAFETY_NOTE = SAFETY.join(' ');
