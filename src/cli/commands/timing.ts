import type { Command } from 'commander';
import { InputError } from '../../core/errors.js';
import { alignTimelines, type Alignment, type PlanElements } from '../../core/measure/align.js';
import { measureTiming, type ClassStats, type TimingReport } from '../../core/measure/timing.js';
import { planElementsFromJson } from '../../core/measure/timing-plan.js';
import type { Interval } from '../../core/timeline.js';
import { peekFile, readCaptureFile } from '../../io/capture.js';
import { readInputFile } from '../../io/files.js';
import { formatJson } from '../../io/json.js';
import { openAudio } from '../../io/audio-source.js';
import type { CommandContext } from '../io.js';
import { decodeAudioSource } from '../analyze-recording.js';
import { numberIn } from '../options.js';
import { createProgress } from '../progress.js';
import { addPlanOptions, messageFrom, planFromCli, type EncodeCliOptions } from './encode.js';

interface TimingCliOptions extends Omit<EncodeCliOptions, 'tone'> {
  expect?: string;
  expectFile?: string;
  expectPlan?: string;
  tolerance: number;
  activeLow?: boolean;
  column?: string;
  tone?: number;
  bin: number;
  range: number;
}

/** Where the observed marks came from. */
interface Observed {
  kind: 'wav' | 'capture' | 'json';
  marks: Interval[];
  details: Record<string, unknown>;
  warnings: string[];
}

async function readObserved(path: string, o: TimingCliOptions, ctx: CommandContext): Promise<Observed> {
  const head = (await peekFile(path, 512)).toString('latin1');
  // A .wav name is read as audio whatever it holds, so that a file that is not one says so.
  if (head.startsWith('RIFF') || /\.wave?$/i.test(path)) {
    // Streamed through the receiver chunk by chunk: memory stays bounded for long recordings.
    const audio = await openAudio(path, { reuseChunks: true });
    const progress = createProgress(ctx.io, { label: path, audioSeconds: audio.durationMs !== null ? audio.durationMs / 1000 : null });
    const { result, channel, channelNote } = await decodeAudioSource(audio, { toneHz: o.tone, onProgress: (f) => progress.update(f) });
    progress.done();
    if (result.marks.length === 0) throw new InputError(`${path}: no keyed tone found`);
    return {
      kind: 'wav',
      marks: result.marks.map(([a, b]) => [a, b]),
      details: { sampleRate: audio.sampleRate, channel, channelNote, toneHz: result.toneHz, snrDb: result.snrDb, decodedText: result.text, durationMs: result.durationMs },
      warnings: [...audio.warnings, ...(channelNote ? [channelNote] : []), ...result.warnings],
    };
  }
  if (head.trimStart().startsWith('{') || /\.json$/i.test(path)) {
    const text = (await readInputFile(path)).toString('utf8');
    let value: unknown;
    try {
      value = JSON.parse(text);
    } catch (err) {
      throw new InputError(`${path}: not valid JSON (${(err as Error).message})`);
    }
    const marks = typeof value === 'object' && value !== null ? (value as { marks?: unknown }).marks : undefined;
    if (!Array.isArray(marks)) throw new InputError(`${path}: a JSON input needs a "marks" list of [startMs, endMs]`);
    const plan = planElementsFromJson({ unitMs: 1, ...(value as object), characters: [] }, path);
    return { kind: 'json', marks: plan.marks, details: {}, warnings: [] };
  }
  const cap = await readCaptureFile(path, { activeLow: o.activeLow, column: o.column });
  return { kind: 'capture', marks: cap.marks, details: { timeUnit: cap.timeUnit, rows: cap.rows, stateColumn: cap.stateColumn }, warnings: cap.warnings };
}

/** The intended keying: elements to align with, and its full letter and word gaps [ms] when known. */
type Expected = PlanElements & { text: string; wpm: number; letterWordGapsMs: { letter: number; word: number } | null };

async function expectedPlan(o: TimingCliOptions, ctx: CommandContext): Promise<Expected | null> {
  const given = [o.expect, o.expectFile, o.expectPlan].filter((x) => x !== undefined).length;
  if (given > 1) throw new InputError('give the intended message once: --expect TEXT, --expect-file FILE or --expect-plan PLAN.json');
  if (o.expectPlan !== undefined) {
    const raw = (await readInputFile(o.expectPlan)).toString('utf8');
    let value: unknown;
    try {
      value = JSON.parse(raw);
    } catch (err) {
      throw new InputError(`${o.expectPlan}: not valid JSON (${(err as Error).message})`);
    }
    return planElementsFromJson(value, o.expectPlan);
  }
  if (o.expect === undefined && o.expectFile === undefined) return null;
  // planFromCli reads only the planning fields, which timing shares with encode.
  const plan = planFromCli(await messageFrom(o.expect, o.expectFile), o as unknown as EncodeCliOptions);
  for (const w of plan.warnings) ctx.warn(w);
  const extra = plan.ditMs - plan.unitMs;
  return { ...plan, letterWordGapsMs: { letter: plan.gapsMs.letter + extra, word: plan.gapsMs.word + extra } };
}

/** Rounds every number in a JSON-bound value to `digits` decimals (exact core values print as 60, not 59.99999999999999). */
function roundDeep(value: unknown, digits = 4): unknown {
  const f = 10 ** digits;
  if (typeof value === 'number') return Number.isFinite(value) ? Math.round(value * f) / f : value;
  if (Array.isArray(value)) return value.map((v) => roundDeep(v, digits));
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, roundDeep(v, digits)]));
  return value;
}

const fx = (x: number | null, d = 1): string => (x === null ? '–' : x.toFixed(d));
const signed = (x: number, d = 1): string => `${x >= 0 ? '+' : ''}${x.toFixed(d)}`;
const cls = (s: ClassStats | null): string => (s === null ? 'none' : `${s.median.toFixed(2)} ± ${s.spread.toFixed(2)} (${s.count})`);

/** A small text histogram: one row per non-empty bin (labelled by its centre), `⋮` for skipped empty bins. */
export function histogramLines(report: TimingReport, width = 24): string[] {
  const h = report.histogram;
  const rows = h.marks.map((marks, k) => ({ label: (k * h.binUnits).toFixed(2).padStart(6), marks, gaps: h.gaps[k]! }));
  if (h.marksOver + h.gapsOver > 0) rows.push({ label: `>${h.maxUnits.toFixed(1)}`.padStart(6), marks: h.marksOver, gaps: h.gapsOver });
  const max = Math.max(1, ...rows.map((r) => Math.max(r.marks, r.gaps)));
  const bar = (n: number, ch: string): string => (n === 0 ? '' : ch.repeat(Math.max(1, Math.round((n / max) * width))));
  const out = [`  ${'units'.padStart(6)}  ${'marks'.padEnd(width + 6)}gaps`];
  let skipped = false;
  rows.forEach((r, k) => {
    if (r.marks + r.gaps === 0) {
      if (!skipped && k > 0) out.push(`  ${'⋮'.padStart(6)}`);
      skipped = true;
      return;
    }
    skipped = false;
    const m = `${bar(r.marks, '█')} ${r.marks || ''}`.trim();
    const g = `${bar(r.gaps, '░')} ${r.gaps || ''}`.trim();
    out.push(`  ${r.label}  ${m.padEnd(width + 6)}${g}`.trimEnd());
  });
  if (out[out.length - 1]!.trim() === '⋮') out.pop();
  return out;
}

function alignmentLines(a: Alignment, expectText: string, color: boolean, maxRows = 20): string[] {
  const lines: string[] = [];
  const paint = (s: string, code: number): string => (color ? `\u001b[${code}m${s}\u001b[0m` : s);
  lines.push(`Against:        "${expectText}" (unit ${a.unitMs.toFixed(1)} ms); offset ${a.offsetMs.toFixed(1)} ms removed`);
  lines.push(`Elements:       ${a.matchedCount} of ${a.elements.length} matched, ${a.missing.length} missing, ${a.extra.length} extra`);
  if (a.worstElement !== null) {
    const w = a.elements[a.worstElement]!;
    lines.push(`Largest error:  ${a.maxErrorMs.toFixed(1)} ms (${a.maxErrorPct.toFixed(0)} % of a unit) at element ${w.index + 1} (${w.kind} of ${w.char || '?'})`);
  }
  lines.push(`RMS error:      start ${a.rmsStartErrorMs.toFixed(1)} ms, length ${a.rmsLengthErrorMs.toFixed(1)} ms`);
  const problems = a.elements.filter((e) => e.status !== 'ok');
  if (problems.length + a.extra.length > 0) {
    lines.push(`Outside ±${a.toleranceMs.toFixed(1)} ms (${a.tolerancePct} % of a unit):`);
    lines.push('     #  char  elem  planned ms          start error         length error');
    for (const e of problems.slice(0, maxRows)) {
      const planned = `${e.plannedStartMs.toFixed(1)}–${e.plannedEndMs.toFixed(1)}`.padEnd(18);
      const head = `  ${String(e.index + 1).padStart(4)}  ${(e.char || '?').padEnd(4)}  ${e.kind.padEnd(4)}  ${planned}  `;
      if (e.status === 'missing') lines.push(`${head}missing`);
      else {
        const s = `${signed(e.startErrorMs!)} ms (${signed(e.startErrorPct!, 0)} %)`.padEnd(18);
        const l = `${signed(e.lengthErrorMs!)} ms (${signed(e.lengthErrorPct!, 0)} %)`.padEnd(18);
        lines.push(`${head}${s}  ${l}  ${e.status}`);
      }
    }
    if (problems.length > maxRows) lines.push(`  … and ${problems.length - maxRows} more (all in --json)`);
    for (const x of a.extra.slice(0, maxRows)) {
      lines.push(`  extra mark ${x.startMs.toFixed(1)}–${x.endMs.toFixed(1)} ms, after element ${x.afterElement + 1}`);
    }
    if (a.extra.length > maxRows) lines.push(`  … and ${a.extra.length - maxRows} more extra marks (all in --json)`);
  }
  lines.push(`Verdict:        ${a.pass ? paint('PASS', 32) : paint('FAIL', 31)} (tolerance ${a.tolerancePct} % of a unit)`);
  return lines;
}

/** The plain-text report. */
export function formatTimingReport(
  input: string,
  observed: Observed,
  r: TimingReport,
  alignment: { result: Alignment; text: string } | null,
  color: boolean,
): string {
  const what = observed.kind === 'wav' ? 'recording' : observed.kind === 'capture' ? 'logic capture' : 'timeline';
  const lines: string[] = [];
  lines.push(`Timing of ${input} (${what}, ${r.markCount} marks, ${(r.durationMs / 1000).toFixed(3)} s)`);
  if (observed.kind === 'wav') {
    const d = observed.details;
    lines.push(`Receiver:       tone ${fx(d.toneHz as number | null, 0)} Hz, SNR ${fx(d.snrDb as number | null)} dB, text "${String(d.decodedText)}"`);
  }
  lines.push(`Read as:        ${r.text}`);
  lines.push(`Speed:          ${r.wpm.toFixed(1)} wpm (unit ${r.unitMs.toFixed(1)} ms), effective ${r.effectiveWpm.toFixed(1)} wpm`);
  lines.push(`Weighting:      ${r.weightPct === null ? 'not measurable' : `${r.weightPct.toFixed(1)} %`}   dash/dot ratio ${fx(r.dahDitRatio, 2)}`);
  lines.push(`Marks (units):  dit ${cls(r.markUnits.dit)}   dah ${cls(r.markUnits.dah)}`);
  lines.push(`Gaps (units):   element ${cls(r.gapUnits.element)}   letter ${cls(r.gapUnits.letter)}   word ${cls(r.gapUnits.word)}`);
  lines.push(`Jitter:         ${r.jitterPct === null ? 'not measurable' : `${r.jitterPct.toFixed(1)} % of a unit`} (RMS edge deviation from a grid fitted to each character at its word's speed)`);
  if (r.driftWpm !== null) {
    lines.push(`Drift:          ${signed(r.driftWpm)} wpm from first to last word (${r.wordWpm[0]!.toFixed(1)} → ${r.wordWpm[r.wordWpm.length - 1]!.toFixed(1)} wpm over ${r.wordWpm.length} words)`);
  } else lines.push('Drift:          not measurable (one word)');
  lines.push('');
  lines.push('Lengths in units:');
  lines.push(...histogramLines(r));
  if (alignment) {
    lines.push('');
    lines.push(...alignmentLines(alignment.result, alignment.text, color));
  }
  return lines.join('\n') + '\n';
}

export function registerTiming(program: Command, ctx: CommandContext): void {
  const cmd = program
    .command('timing')
    .argument('<input>', 'WAV recording, logic capture CSV (time,state), or a JSON timeline with "marks"')
    .summary('measure how a message was keyed, and how far it is from the intended one')
    .description(
      [
        'Measure speed, weighting, dash/dot ratio, gap lengths, jitter and drift',
        'of a recording or of a logic capture of the keying line; with an intended',
        'message, align it element by element and report start and length errors.',
        '',
        'A capture CSV has a header naming the time unit (time_s, time_ms,',
        '"Time [s]"; a bare "time" means seconds) and a state column (1/0,',
        'high/low, on/off, down/up), one row per edge.',
        'The planning options (--wpm, --weight …) describe the message given with',
        '--expect or --expect-file. Exit code 1 when the alignment is outside the',
        'tolerance.',
      ].join('\n'),
    )
    .option('--expect <text>', 'the intended message (planned with the options below)')
    .option('--expect-file <file>', 'read the intended message from a text file')
    .option('--expect-plan <file>', 'the intended keying as a plan JSON from `keyform encode --format json`');
  addPlanOptions(cmd)
    .option('--tolerance <pct>', 'largest allowed start or length error (% of a unit, 0–1000)', numberIn('--tolerance', 0, 1000), 10)
    .option('--active-low', 'capture: state 0/low means key down')
    .option('--column <name>', 'capture: name of the state column (default: state, key, level or value, else the second column)')
    .option('--tone <hz>', 'WAV: tone frequency (Hz; found automatically by default)', numberIn('--tone', 1, 96_000))
    .option('--bin <units>', 'histogram bin width (units, 0.05–2)', numberIn('--bin', 0.05, 2), 0.25)
    .option('--range <units>', 'centre of the last histogram bin (units, 2–200)', numberIn('--range', 2, 200), 10)
    .option('--json', 'print everything as JSON')
    .addHelpText(
      'after',
      `
Examples:
  keyform timing keyer.csv
  keyform timing keyer.csv --expect "Q7ZKT TEST" --wpm 22 --tolerance 5
  keyform encode "Q7ZKT/B" --out plan.json && keyform timing beacon.wav --expect-plan plan.json --json

Caution: a keying line can carry voltage; connect a logic analyser through isolation (opto-coupler
or relay) and follow the rig maker's documentation. Transmitting needs a licence and must follow
local regulations; mind RF exposure.`,
    )
    .action(async (input: string, o: TimingCliOptions) => {
      const plan = await expectedPlan(o, ctx);
      const observed = await readObserved(input, o, ctx);
      for (const w of observed.warnings) ctx.warn(w);
      const report = measureTiming(
        { marks: observed.marks },
        {
          unitMsHint: plan ? plan.unitMs : undefined,
          // The plan's letter/word boundary (geometric mean of its gaps), so Farnsworth letter gaps stay letter gaps.
          wordSplitUnits: plan?.letterWordGapsMs ? Math.sqrt(plan.letterWordGapsMs.letter * plan.letterWordGapsMs.word) / plan.unitMs : undefined,
          histogramBinUnits: o.bin,
          histogramMaxUnits: o.range,
        },
      );
      for (const w of report.warnings) ctx.warn(w);
      if (plan && Math.abs(plan.unitMs / report.unitMs - 1) > 0.05) {
        const hint = o.expectPlan === undefined ? ' (set --wpm?)' : '';
        ctx.warn(`measured ${report.wpm.toFixed(1)} wpm, but the intended message is planned at ${plan.wpm} wpm${hint}`);
      }
      const alignment = plan ? alignTimelines({ marks: observed.marks }, plan, { tolerancePct: o.tolerance }) : null;
      if (alignment && !alignment.pass) ctx.setExitCode(1);
      if (o.json) {
        const { warnings, ...rest } = report;
        const json = {
          input,
          source: { kind: observed.kind, ...observed.details },
          ...rest,
          ...(plan && alignment ? { expect: { text: plan.text, wpm: plan.wpm, unitMs: plan.unitMs }, alignment } : {}),
          warnings: [...observed.warnings, ...warnings],
        };
        ctx.io.stdout.write(formatJson(roundDeep(json)));
        return;
      }
      ctx.io.stdout.write(formatTimingReport(input, observed, report, plan && alignment ? { result: alignment, text: plan.text } : null, ctx.color));
    });
}
