import { Option, type Command } from 'commander';
import { InputError } from '../../core/errors.js';
import { EDGE_KINDS, type EdgeKind } from '../../core/signal/edges.js';
import { parseMaskCsv, type SpectralMask } from '../../core/measure/mask.js';
import {
  CAUTION, DEFAULT_SHAPE_WINDOW_S, DEFAULT_SHAPE_WINDOW_SAMPLES, FILTER_NOTE, MIN_STRONG_MARKS, predictShape, sweepRise, type ShapeReport, type SweepResult,
} from '../../core/measure/shape.js';
import { MIN_EDGE_SNR_DB, MIN_SPECTRUM_SNR_DB } from '../../core/measure/shape-snr.js';
import { readInputFile, writeOutputFile } from '../../io/files.js';
import { formatJson } from '../../io/json.js';
import { shapeSvg } from '../../io/svg.js';
import { measureShapeOfFile } from '../analyze-recording.js';
import type { CommandContext } from '../io.js';
import { numberIn, oneOf } from '../options.js';
import { createProgress } from '../progress.js';

export interface ShapeCliOptions {
  tone?: number;
  channel: number;
  k: number;
  mask?: string;
  wpm?: number;
  farnsworth?: number;
  predict?: boolean;
  sweep?: boolean;
  rise: number;
  edge: EdgeKind;
  message?: string;
  chirpWindow: number;
  json?: boolean;
  plot?: string;
  force?: boolean;
  from: number;
  seconds?: number;
}

const f = (x: number | null | undefined, digits = 1): string => (x === null || x === undefined ? '–' : x.toFixed(digits));
const hz = (x: number | null | undefined): string => (x === null || x === undefined ? '–' : `${x.toFixed(x >= 100 ? 0 : 1)} Hz`);

const TIMING_LABEL: Record<ShapeReport['measurable']['timingSource'], string> = {
  receiver: "the receiver's marks",
  given: 'the given marks',
  plan: 'the plan',
  shape: "the shape analysis's own marks",
};

/** The human-readable report. */
export function formatShapeReport(r: ShapeReport, color: boolean): string {
  const bold = (s: string): string => (color ? `\x1b[1m${s}\x1b[22m` : s);
  const verdictColor = (s: string, ok: boolean): string => (color ? `\x1b[${ok ? 32 : 31}m${s}\x1b[39m` : s);
  const L: string[] = [];
  L.push(bold(`Keying shape (${r.kind === 'predicted' ? 'predicted from the plan and the synthesizer' : 'measured'})`));
  L.push(`  tone ${f(r.toneHz, 1)} Hz · ${r.sampleRate} Hz sampling · ${(r.durationMs / 1000).toFixed(2)} s · ${r.marks.found} marks, ${r.marks.measured} measured`);
  const ms = r.measurable;
  if (r.kind === 'measured') {
    const left = !ms.edges ? 'edges and spectral figures left out' : !ms.spectrum ? 'spectral figures left out' : 'enough for every figure';
    L.push(
      `  SNR ${ms.snrDb === null ? '–' : `${f(ms.snrDb)} dB`} (key-down carrier over noise in 2500 Hz, from ${TIMING_LABEL[ms.timingSource]}; ` +
        `edges need ${ms.minEdgeSnrDb} dB, spectrum ${ms.minSpectrumSnrDb} dB): ${left}`,
    );
  }
  L.push('');
  L.push(bold('Edges (10–90 % of each mark\'s settled level)'));
  if (ms.edges) {
    L.push(`  rise  median ${f(r.riseMs.median, 2)} ms   p10 ${f(r.riseMs.p10, 2)}   p90 ${f(r.riseMs.p90, 2)}`);
    L.push(`  fall  median ${f(r.fallMs.median, 2)} ms   p10 ${f(r.fallMs.p10, 2)}   p90 ${f(r.fallMs.p90, 2)}`);
    L.push(`  edge looks ${r.edgeKind} · overshoot median ${f(r.overshootPct.median)} %, worst ${f(r.overshootPct.worst)} %`);
  } else {
    L.push(`  rise, fall, overshoot and chirp not measured: the SNR is below ${ms.minEdgeSnrDb} dB`);
  }
  L.push(`  envelope ${f(r.envelope.passBandHz[0], 0)}–${f(r.envelope.passBandHz[1], 0)} Hz (a hard step reads ${f(r.envelope.resolutionMs, 2)} ms)`);
  if (ms.edges) L.push(`  chirp in the first ${r.chirpHz.windowMs} ms: median ${f(r.chirpHz.median)} Hz, worst ${f(r.chirpHz.worst)} Hz`);
  L.push('');
  L.push(bold('Spectrum'));
  L.push(`  ${r.spectrum.reference}`);
  if (!ms.spectrum) L.push(`  occupied and x-dB bandwidths and click levels not measured: the SNR is below ${ms.minSpectrumSnrDb} dB`);
  else L.push(`  occupied bandwidth (99 %, ITU-R SM.328)  ${hz(r.occupiedBandwidthHz)}` + (r.occupiedBandEdgesHz ? `   (${f(r.occupiedBandEdgesHz.lowerHz)} … +${f(r.occupiedBandEdgesHz.upperHz)} Hz)` : ''));
  if (r.noiseCorrection.applied && r.occupiedBandwidthHz !== null && (r.spectrum.noiseFloorDbc ?? -200) > -150) {
    L.push(`  noise floor ${f(r.spectrum.noiseFloorDbc)} dBc per bin, removed first: without that the figure would read ${hz(r.noiseCorrection.uncorrectedHz)} (${f(r.noiseCorrection.correctionPct)} % wider)`);
  }
  for (const x of ms.spectrum ? (['20', '40', '60'] as const) : []) {
    const basis = r.bandwidthBasis[x] === 'both sides' ? '' : `  (${r.bandwidthBasis[x]})`;
    L.push(`  bandwidth at −${x} dBc  ${hz(r.bandwidthAtDbcHz[x])}${basis}`);
  }
  if (ms.spectrum) L.push(`  clicks  ${r.clickDbc.map((c) => `±${c.offsetHz} Hz: ${f(c.lowerDbc)} / ${f(c.upperDbc)} dBc`).join('   ')}`);
  L.push('');
  L.push(bold('Necessary bandwidth (ITU-R SM.1138)'));
  L.push(`  B = ${f(r.speed.modulationRateBaud, 2)} baud (unit ${f(r.speed.unitMs, 1)} ms, ${f(r.speed.wpm, 1)} wpm, ${r.speed.source}) · K = ${r.k} · Bn = ${hz(r.necessaryBandwidthHz)} · ${r.designator ?? '–'}`);
  if (r.occupiedToNecessary !== null) L.push(`  occupied / necessary = ${f(r.occupiedToNecessary, 2)} (information, not a verdict)`);
  L.push(`  The Recommendation's own example converts speed as B ≈ 0.8 × wpm (25 wpm → 20 baud → 100 Hz, 100HA1AAN).`);
  L.push('');
  const m = r.mask;
  L.push(bold(`Spectral mask: ${m.name}`));
  if (m.pass === null) L.push(`  NOT JUDGED: ${m.note?.replace(/^not judged: /, '') ?? 'no verdict'}`);
  else L.push(`  ${verdictColor(m.pass ? 'PASS' : 'FAIL', m.pass)}` + (m.worstExcessDb !== null ? `   (worst ${m.worstExcessDb > 0 ? 'excess' : 'margin'} ${f(Math.abs(m.worstExcessDb))} dB)` : ''));
  for (const v of m.violations) {
    L.push(`  over by ${f(v.excessDb)} dB at ${v.offsetHz > 0 ? '+' : ''}${f(v.offsetHz, 0)} Hz: ${f(v.measuredDbc)} dBc against ${f(v.limitDbc)} dBc (mask point ±${v.pointOffsetHz} Hz)`);
  }
  if (m.noiseLimitedPointsHz.length > 0 && r.measurable.spectrum) {
    L.push(`  below the recording's noise floor, not checked: the stretch from ±${m.noiseLimitedPointsHz.join(', ±')} Hz (record at a higher level or closer to the transmitter)`);
  }
  if (m.uncheckedPointsHz.length > 0) L.push(`  not checked (outside the analysed span): ±${m.uncheckedPointsHz.join(', ±')} Hz`);
  if (m.shortestRiseMs !== null) L.push(`  shortest ${m.sweepEdge} rise (10–90 %) that meets the mask at this speed: ${f(m.shortestRiseMs)} ms`);
  L.push('');
  for (const w of r.warnings) L.push(`warning: ${w}`);
  if (r.kind === 'measured') L.push(`note: ${FILTER_NOTE}`);
  L.push(`caution: ${CAUTION}`);
  return L.join('\n') + '\n';
}

/** The rise-time sweep as a table. */
export function formatSweep(s: SweepResult): string {
  const L: string[] = [];
  L.push(`Rise time against bandwidth at ${f(s.wpm, 1)} wpm, ${s.edge} edges (necessary bandwidth ${hz(s.necessaryBandwidthHz)}, mask: ${s.mask})`);
  L.push('  rise ms   occupied 99 %   at −40 dBc   mask');
  for (const r of s.rows) {
    L.push(`  ${f(r.riseMs).padStart(7)}   ${hz(r.occupiedBandwidthHz).padStart(13)}   ${hz(r.at40DbcHz).padStart(10)}   ${r.pass ? 'pass' : `fail (+${f(r.worstExcessDb)} dB)`}`);
  }
  L.push(s.shortestRiseMs !== null ? `shortest rise time that meets the mask: ${f(s.shortestRiseMs)} ms` : 'no rise time in the table meets the mask');
  L.push(`caution: ${CAUTION}`);
  return L.join('\n') + '\n';
}

async function loadMask(path: string | undefined): Promise<SpectralMask | undefined> {
  if (path === undefined) return undefined;
  return parseMaskCsv((await readInputFile(path)).toString('utf8'), path);
}

export function registerShape(program: Command, ctx: CommandContext): void {
  program
    .command('shape')
    .argument('[file]', 'WAV recording of the keyed tone (mono, or pick a channel)')
    .summary('rise and fall, key clicks, chirp, occupied and necessary bandwidth, spectral mask')
    .description(
      'Measure the keying shape of a recording: 10–90 % rise and fall per mark, overshoot, chirp, averaged spectrum, ' +
        'occupied bandwidth (ITU-R SM.328), x-dB bandwidths, click levels, necessary bandwidth and designator (ITU-R SM.1138), ' +
        'and a pass/fail check against a spectral mask. Or predict the same report from a speed and an edge shape (--predict), ' +
        'or tabulate rise time against bandwidth (--sweep).',
    )
    .option('--tone <hz>', 'tone frequency (Hz); default: the strongest peak between 100 Hz and 5 kHz', numberIn('--tone', 1, 96_000))
    .option('--channel <n>', 'channel of a multi-channel WAV (1 = first)', numberIn('--channel', 1, 64, { integer: true }), 1)
    .option('--k <k>', 'ITU-R SM.1138 factor K: 5 fading circuit, 3 non-fading (1–10)', numberIn('--k', 1, 10), 5)
    .option('--mask <file>', "spectral mask as CSV lines 'offsetHz,maxDbc' (default: keyform's common-practice mask)")
    .option('-w, --wpm <wpm>', 'speed (wpm, PARIS, 1–100): with a recording, use it instead of measuring the unit; needed with --predict', numberIn('--wpm', 1, 100))
    .option('--farnsworth <wpm>', '--predict: overall speed with Farnsworth spacing (wpm; the unit and B stay those of --wpm)', numberIn('--farnsworth', 1, 100))
    .option('--predict', 'predict the report from --wpm, --rise and --edge instead of measuring a recording')
    .option('--sweep', 'table of rise time against occupied and −40 dBc bandwidth, with the shortest rise that meets the mask')
    .option('--rise <ms>', '--predict: 10–90 % rise and fall time (ms, 0–50)', numberIn('--rise', 0, 50), 5)
    .addOption(new Option('--edge <kind>', `--predict/--sweep: edge shape (${EDGE_KINDS.join(', ')})`).argParser(oneOf('--edge', EDGE_KINDS)).default('raised-cosine'))
    .option('--message <text>', "--predict/--sweep: text keyed for the prediction (default 'PARIS PARIS')")
    .option('--chirp-window <ms>', 'how long after key-down to look for chirp (ms, 0.5–200)', numberIn('--chirp-window', 0.5, 200), 10)
    .option('--from <s>', 'start the analysis this far into the recording (s, 0–86400)', numberIn('--from', 0, 86_400), 0)
    .option(
      '--seconds <s>',
      `length of the stretch analysed (s, 0.05–86400; default ${DEFAULT_SHAPE_WINDOW_S}, or ${DEFAULT_SHAPE_WINDOW_SAMPLES / 2 ** 20} Mi samples at high rates): the analysis holds the stretch in memory, and the rest of a long file is not read`,
      numberIn('--seconds', 0.05, 86_400),
    )
    .option('--json', 'print the report as JSON')
    .option('--plot <file>', 'write an SVG: spectrum with necessary bandwidth and mask, and the edge overlay')
    .option('--force', 'replace --plot if it exists')
    .addHelpText(
      'after',
      `
Examples:
  keyform shape recordings/beacon-after-fix.wav
  keyform shape q7zkt-tx.wav --tone 700 --plot q7zkt-shape.svg
  keyform shape q7zkt-tx.wav --k 3 --mask my-mask.csv --json
  keyform shape q7zkt-b-overnight.wav --from 1800 --seconds 120
  keyform shape --predict --wpm 25 --rise 5 --edge raised-cosine
  keyform shape --predict --sweep --wpm 30 --edge linear

Exit status 1 when the spectrum exceeds the mask (not when the recording is too noisy to judge it).
Below ${MIN_EDGE_SNR_DB} dB SNR (key-down carrier over noise in 2500 Hz) rise, fall, overshoot and chirp are left out
(unless at least ${MIN_STRONG_MARKS} marks reach it on their own, as at the peaks of a fading signal: then those marks are used);
below ${MIN_SPECTRUM_SNR_DB} dB the bandwidths, click levels and the mask verdict too ("not judged").
Record through a wide filter (2.4 kHz or more) or take the sidetone: a receiver's CW filter lengthens edges.
Caution: ${CAUTION}`,
    )
    .action(async (file: string | undefined, o: ShapeCliOptions) => {
      const mask = await loadMask(o.mask);
      if (o.predict && file !== undefined) throw new InputError('give a recording or --predict, not both');
      if (!o.predict && file === undefined && !o.sweep) throw new InputError('no recording: give FILE, or --predict --wpm N');
      const progress = createProgress(ctx.io, { label: file ?? 'shape' });
      try {
        if (o.sweep && (o.predict || file === undefined)) {
          if (o.wpm === undefined) throw new InputError('--sweep needs --wpm (or a recording to measure the speed from)');
          const s = sweepRise({ wpm: o.wpm, farnsworthWpm: o.farnsworth ?? null, edge: o.edge, k: o.k, mask, text: o.message, onProgress: (x) => progress.update(x) });
          progress.done();
          ctx.io.stdout.write(o.json ? formatJson(s) : formatSweep(s));
          return;
        }
        let report: ShapeReport;
        /** The stretch analysed, when it is not the whole recording. */
        let stretch: { fromS: number; toS: number; totalS: number | null } | null = null;
        if (o.predict) {
          if (o.wpm === undefined) throw new InputError('--predict needs --wpm');
          report = predictShape({ wpm: o.wpm, farnsworthWpm: o.farnsworth ?? null, riseMs: o.rise, edge: o.edge, text: o.message, k: o.k, mask, chirpWindowMs: o.chirpWindow, onProgress: (x) => progress.update(x) });
        } else {
          const shaped = await measureShapeOfFile(file!, {
            channel: o.channel - 1,
            fromS: o.from,
            seconds: o.seconds,
            shape: { toneHz: o.tone, k: o.k, mask, unitMs: o.wpm !== undefined ? 1200 / o.wpm : undefined, chirpWindowMs: o.chirpWindow },
            onProgress: (x) => progress.update(x),
          });
          report = shaped.report;
          if (shaped.note) {
            stretch = shaped.note.stretch;
            report.warnings.push(`${shaped.note.text}: ${o.seconds === undefined ? `--seconds (default ${shaped.seconds} s here) and --from choose the stretch` : '--from and --seconds chose the stretch'}`);
          }
        }
        progress.done();
        let sweep: SweepResult | null = null;
        if (o.sweep) {
          const wpm = report.speed.wpm;
          if (wpm !== null && wpm >= 1 && wpm <= 100) {
            const edge: EdgeKind = report.mask.sweepEdge;
            sweep = sweepRise({ wpm, edge, k: o.k, mask, text: o.message });
          } else {
            ctx.warn('no sweep: the speed could not be measured from this recording (give it with --wpm)');
          }
        }
        if (o.plot) {
          await writeOutputFile(o.plot, shapeSvg(report), { force: o.force });
          ctx.io.stderr.write(`keyform: wrote ${o.plot}\n`);
        }
        if (o.json) ctx.io.stdout.write(formatJson({ ...report, ...(stretch ? { stretch } : {}), ...(sweep ? { sweep } : {}) }));
        else ctx.io.stdout.write(formatShapeReport(report, ctx.color) + (sweep ? '\n' + formatSweep(sweep) : ''));
        if (report.mask.pass === false) ctx.setExitCode(1);
      } finally {
        progress.done();
      }
    });
}
