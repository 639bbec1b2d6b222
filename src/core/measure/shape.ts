/**
 * Keying shape report: rise and fall, overshoot, chirp, spectrum, occupied / x-dB / necessary
 * bandwidth and a spectral-mask verdict — measured on a recording (`measureShape`) or predicted from
 * the plan and the synthesizer (`predictShape`), plus a table of rise time against bandwidth
 * (`sweepRise`). Pure: samples in, plain object out.
 */
import { checkRange, InputError } from '../errors.js';
import { type EdgeKind, EDGE_KINDS } from '../signal/edges.js';
import type { Interval } from '../timeline.js';
import { synthesizeTone } from '../signal/synth.js';
import { planKeying } from '../timing/plan.js';
import { modulationRateBaud, wpmFromUnitMs } from '../timing/speed.js';
import { emissionDesignator, necessaryBandwidthHz, occupiedBandwidth, powerDb, xDbBandwidth, type XdbBandwidth } from './bandwidth.js';
import { chirpFromTracks, type ChirpTrack } from './chirp.js';
import { classifyEdge, edgeWarnings, measureEdges, spreadOf, tracesFromSnippets, type EdgeAnalysis, type EdgeKindEstimate, type EdgeSnippet, type EdgeTraces, type MarkShape } from './edges.js';
import { sortedCopy } from './timing-stats.js';
import { checkMask, DEFAULT_MASK, validateMask, type MaskPoint, type MaskVerdict, type SpectralMask } from './mask.js';
import { complexBaseband, magnitude } from './shape-analytic.js';
import { densityAt, noiseDensityFromGaps } from './shape-noise.js';
import { envelopeNoiseBandwidthHz, MIN_EDGE_SNR_DB, MIN_SPECTRUM_SNR_DB, snrFromSums, type ShapeSnr } from './shape-snr.js';
import { SNR_BANDWIDTH_HZ } from '../signal/noise.js';
import { envelopePass, type EnvelopePass } from './shape-windows.js';
import { decodeSamples } from '../receive/index.js';
import { findTonePeak, segmentLengthForRbw, welchSpectrum, type PowerSpectrum } from './spectrum.js';

/** Offsets at which the click sideband level is reported [Hz]. */
export const CLICK_OFFSETS_HZ = [100, 250, 500, 1000] as const;
/** Levels of the x-dB bandwidths [dB below the carrier]. */
export const XDB_LEVELS = [20, 40, 60] as const;
/** Target resolution bandwidth of the averaged spectrum [Hz]. */
export const TARGET_RBW_HZ = 10;
/** Largest offset from the tone analysed [Hz]. */
export const MAX_SPAN_HZ = 5000;
/** Most points of the spectrum carried in the report. */
export const MAX_SPECTRUM_POINTS = 2048;

export const CAUTION =
  'keyform measures; it does not certify. Transmitting needs a licence and must follow your local regulations ' +
  '(bandwidth and key-click rules); mind RF exposure; isolate keying lines (opto-coupler or relay) and respect the rig maker\'s ' +
  'keying-line voltage and current. Defer to local rules and licensed practice.';

export const FILTER_NOTE =
  "A receiver's own filter lengthens the rise and fall it passes (a 500 Hz CW filter alone has a step response of roughly 1.4 ms, " +
  "from the rule of thumb rise ≈ 0.35 / (half its bandwidth)): " +
  'record through a wide filter, 2.4 kHz or more, or take the sidetone (common practice).';

export interface Spread {
  median: number | null;
  p10: number | null;
  p90: number | null;
}

export interface ClickLevel {
  offsetHz: number;
  /** Highest level within ±RBW of −offset and +offset [dBc]; null outside the analysed span. */
  lowerDbc: number | null;
  upperDbc: number | null;
}

/** What the recording's SNR allows the report to say (measured reports; always measurable when predicted). */
export interface ShapeMeasurability {
  /** Key-down carrier power over noise in 2500 Hz, from the wide envelope [dB]; null when predicted or not estimable. */
  snrDb: number | null;
  /** The same against the noise in the envelope's own band [dB]. */
  envelopeSnrDb: number | null;
  /** Where the key-down / key-up split for the estimate came from. */
  timingSource: 'receiver' | 'given' | 'plan' | 'shape';
  /** Thresholds below which the figures are left out [dB, same convention]. */
  minEdgeSnrDb: number;
  minSpectrumSnrDb: number;
  /** Rise, fall, overshoot, chirp and edge kind reported. */
  edges: boolean;
  /** Occupied and x-dB bandwidths, click levels and the mask verdict reported. */
  spectrum: boolean;
}

export interface ShapeReport {
  kind: 'measured' | 'predicted';
  measurable: ShapeMeasurability;
  sampleRate: number;
  toneHz: number;
  durationMs: number;
  marks: { found: number; measured: number };
  /** 10–90 % rise and fall times [ms]. */
  riseMs: Spread;
  fallMs: Spread;
  edgeKind: EdgeKindEstimate;
  /** Every mark found: 50 % times [ms], its 10–90 % rise and fall [ms], overshoot [%], chirp [Hz], or why it was left out. */
  perMark: Array<{ startMs: number; endMs: number; riseMs: number | null; fallMs: number | null; overshootPct: number | null; chirpHz: number | null; problem: string | null }>;
  overshootPct: { median: number | null; worst: number | null };
  /** Tone offset from the settled tone during the first `windowMs` of each mark [Hz]. */
  chirpHz: { median: number | null; worst: number | null; windowMs: number };
  envelope: { passBandHz: [number, number]; resolutionMs: number; stepOvershootPct: number; note: string };
  spectrum: {
    window: 'Hann';
    rbwHz: number;
    segmentLength: number;
    segments: number;
    reference: string;
    /** Offsets from the tone [Hz] and levels [dBc] (max-held when decimated). */
    offsetHz: number[];
    dbc: number[];
    /** Median noise level per bin, as it shows in `dbc`, from the key-up stretches [dBc]; null when there were none. */
    noiseFloorDbc: number | null;
  };
  /** ITU-R SM.328 occupied (99 %) bandwidth after removing the noise floor [Hz]. */
  occupiedBandwidthHz: number | null;
  occupiedBandEdgesHz: { lowerHz: number; upperHz: number } | null;
  noiseCorrection: { applied: boolean; uncorrectedHz: number | null; correctionPct: number | null; note: string };
  bandwidthAtDbcHz: { '20': number | null; '40': number | null; '60': number | null };
  bandwidthBasis: { '20': XdbBandwidth['basis']; '40': XdbBandwidth['basis']; '60': XdbBandwidth['basis'] };
  clickDbc: ClickLevel[];
  /** Where the unit came from: the plan, the shape's own marks, the caller, or the receiver's timing (noisy recordings). */
  speed: { unitMs: number | null; wpm: number | null; modulationRateBaud: number | null; source: 'plan' | 'measured' | 'given' | 'receiver' };
  /** ITU-R SM.1138 necessary bandwidth Bn = B·K [Hz]. */
  necessaryBandwidthHz: number | null;
  k: number;
  designator: string | null;
  occupiedToNecessary: number | null;
  necessaryNote: string;
  /** `pass` is null (not judged) when the recording is too noisy for the spectral figures or no mask point could be checked; `note` says why. */
  mask: Omit<MaskVerdict, 'pass'> & { pass: boolean | null; note: string | null; points: MaskPoint[]; shortestRiseMs: number | null; sweepEdge: EdgeKind };
  edges: EdgeTraces;
  warnings: string[];
  notes: string[];
}

export interface ShapeOptions {
  /** Tone frequency [Hz]; found as the strongest spectral peak between 100 Hz and 5 kHz when omitted. */
  toneHz?: number;
  /** SM.1138 K factor: 5 fading (default), 3 non-fading. */
  k?: number;
  /** Spectral mask; the common-practice default when omitted. */
  mask?: SpectralMask;
  /** Unit length [ms] to use instead of measuring it. */
  unitMs?: number;
  /** Find the shortest rise time that meets the mask at this speed (runs a sweep; default true). */
  findShortestRise?: boolean;
  /** Chirp window after key-down [ms]; default 10. */
  chirpWindowMs?: number;
  /** Envelope half band around the tone [Hz], 100…20000; default 4000, narrowed automatically for noisy recordings. */
  envelopeHalfBandHz?: number;
  /**
   * Key-down intervals [ms from the first sample] and unit [ms] from a receiver that has already run
   * (e.g. batch): used for the SNR estimate and, on noisy recordings, the speed. By default
   * measureShape runs the receiver (decodeSamples) itself.
   */
  timing?: { marks: Interval[]; unitMs: number | null };
  /**
   * SNR thresholds [dB] instead of MIN_EDGE_SNR_DB and MIN_SPECTRUM_SNR_DB — for measuring how the
   * figures degrade below them (test/shape/snr-thresholds.bench.ts), not for everyday use.
   */
  snrThresholdsDb?: { edges: number; spectrum: number };
  /** Called with the fraction done (0…1). */
  onProgress?: (fraction: number) => void;
}

const round = (x: number | null, digits = 3): number | null => (x === null || !Number.isFinite(x) ? null : Number(x.toFixed(digits)));

function roundSpread(s: Spread, digits = 3): Spread {
  return { median: round(s.median, digits), p10: round(s.p10, digits), p90: round(s.p90, digits) };
}

interface SpectralFigures {
  spectrum: PowerSpectrum;
  offsets: Float64Array;
  dbc: Float64Array;
  referencePower: number;
  occupied: ReturnType<typeof occupiedBandwidth>;
  uncorrected: ReturnType<typeof occupiedBandwidth>;
  noiseApplied: boolean;
  noiseFloorDbc: number | null;
  xdb: Record<'20' | '40' | '60', XdbBandwidth>;
  clicks: ClickLevel[];
  verdict: MaskVerdict;
}

/** Spectrum around the tone and every figure taken from it. */
function spectralFigures(
  samples: Float32Array,
  sampleRate: number,
  toneHz: number,
  mask: SpectralMask,
  quiet: ReadonlyArray<readonly [number, number]>,
  onProgress?: (f: number) => void,
): SpectralFigures {
  const L = Math.min(segmentLengthForRbw(sampleRate, TARGET_RBW_HZ), Math.max(64, 2 ** Math.floor(Math.log2(Math.max(64, samples.length)))));
  const spectrum = welchSpectrum(samples, sampleRate, { segmentLength: L, onProgress });
  const { binHz, binPower } = spectrum;
  const spanLow = Math.min(MAX_SPAN_HZ, toneHz - 2 * binHz);
  const spanHigh = Math.min(MAX_SPAN_HZ, sampleRate / 2 - toneHz - 2 * binHz);
  const k0 = Math.max(1, Math.ceil((toneHz - spanLow) / binHz));
  const k1 = Math.min(binPower.length - 2, Math.floor((toneHz + spanHigh) / binHz));
  const n = Math.max(0, k1 - k0 + 1);
  const offsets = new Float64Array(n);
  const power = new Float64Array(n);
  let ref = 0;
  for (let j = 0; j < n; j++) {
    offsets[j] = (k0 + j) * binHz - toneHz;
    power[j] = binPower[k0 + j]!;
    ref = Math.max(ref, power[j]!);
  }
  const dbc = new Float64Array(n);
  for (let j = 0; j < n; j++) dbc[j] = powerDb(power[j]! / (ref || 1));

  const noise = noiseDensityFromGaps(samples, sampleRate, quiet);
  const noiseApplied = noise.segments >= 4;
  const clean = new Float64Array(n);
  const floor: number[] = [];
  for (let j = 0; j < n; j++) {
    const nb = noiseApplied ? densityAt(noise, sampleRate, toneHz + offsets[j]!) * binHz : 0;
    floor.push(nb);
    clean[j] = Math.max(0, power[j]! - nb);
  }
  const occupied = occupiedBandwidth({ offsetHz: offsets, power: clean, binHz });
  const uncorrected = occupiedBandwidth({ offsetHz: offsets, power, binHz });
    const noiseDbc = new Array<number>(floor.length);
  for (let j = 0; j < floor.length; j++) noiseDbc[j] = powerDb(floor[j]! / (ref || 1));
  const medianNoiseDbc = noiseApplied ? sortedCopy(noiseDbc)[Math.floor(noiseDbc.length / 2)]! : -Infinity;
  const xdbAt = (x: number): XdbBandwidth => {
    const r = xDbBandwidth(offsets, dbc, x);
    // A level within 3 dB of the noise floor cannot be told from the noise.
    return -x < medianNoiseDbc + 3 ? { lowerHz: null, upperHz: null, widthHz: null, basis: 'below the noise floor' } : r;
  };
  const xdb = { '20': xdbAt(20), '40': xdbAt(40), '60': xdbAt(60) };
  const clicks: ClickLevel[] = [];
  for (const offsetHz of CLICK_OFFSETS_HZ) {
    clicks.push({ offsetHz, lowerDbc: levelNear(offsets, dbc, -offsetHz, spectrum.rbwHz), upperDbc: levelNear(offsets, dbc, offsetHz, spectrum.rbwHz) });
  }
  const verdict = checkMask(offsets, dbc, mask, noiseApplied ? noiseDbc : undefined);
  return { spectrum, offsets, dbc, referencePower: ref, occupied, uncorrected, noiseApplied, noiseFloorDbc: noiseApplied ? medianNoiseDbc : null, xdb, clicks, verdict };
}

/** Narrower envelope half-bands tried, in order, when most marks are too noisy for the wide one [Hz]. */
export const NARROWER_BANDS_HZ = [1500, 600, 300] as const;

/** Shortest element or gap taken as keying when estimating the unit [ms]. */
export const MIN_ELEMENT_MS = 8;

/**
 * Unit length [ms] from the marks and gaps: the median short mark and short gap (element gap = 1 unit),
 * ignoring runs under 8 ms. Null without marks.
 * @example estimateUnitMs([{ startMs: 0, endMs: 60 }, { startMs: 120, endMs: 300 }]) //=> 60
 */
export function estimateUnitMs(marks: ReadonlyArray<{ startMs: number; endMs: number }>): number | null {
  if (marks.length === 0) return null;
  // Runs shorter than 8 ms (faster than 100 wpm allows, even hand-sent) are noise, not elements.
  const durations = marks.map((m) => m.endMs - m.startMs).filter((d) => d >= MIN_ELEMENT_MS);
  const gaps: number[] = [];
  for (let i = 1; i < marks.length; i++) gaps.push(marks[i]!.startMs - marks[i - 1]!.endMs);
  gaps.splice(0, gaps.length, ...gaps.filter((g) => g >= MIN_ELEMENT_MS));
  const shortMedian = (xs: number[]): number | null => {
    if (xs.length === 0) return null;
    const s = sortedCopy(xs);
    const m = s[0]!;
    return spreadOf(s.filter((x) => x < 2 * m)).median;
  };
  const dot = shortMedian(durations);
  const gap = shortMedian(gaps);
  if (dot === null) return null;
  if (gap === null) return dot;
  const r = dot / gap;
  return r > 0.5 && r < 2 ? (dot + gap) / 2 : Math.min(dot, gap);
}

/** Runs a hard-keyed burst through the envelope: its 10–90 % rise and overshoot are the envelope's own. */
function envelopeStep(sampleRate: number, toneHz: number, halfBandHz: number): { riseMs: number; overshootPct: number } {
  const marks: Array<[number, number]> = [[0, 40]];
  const t = synthesizeTone({ marks, sampleRate, toneHz, levelDb: -6, edge: 'hard', riseMs: 0, padMs: 40 });
  const env = magnitude(complexBaseband(t.samples, sampleRate, { toneHz, halfBandHz }));
  const m = measureEdges(env, sampleRate).marks[0];
  return { riseMs: m?.rise?.rise10to90Ms ?? NaN, overshootPct: m?.overshootPct ?? NaN };
}

/**
 * Fewest marks that must reach the edge threshold on their own for a recording below it on average
 * (a fading signal) to have its edges measured on those marks alone.
 */
export const MIN_STRONG_MARKS = 5;

interface EdgeGate {
  ok: boolean;
  edges: EdgeAnalysis;
  tracks: ChirpTrack[];
  snippets: EdgeSnippet[];
  /** Marks left out for their own SNR, below the edge threshold. */
  weak: number;
}

/**
 * Which marks the edge figures may rest on: each mark's own SNR (its plateau level against the
 * key-up noise, in keyform's convention) must reach `minEdgeDb`. The edges are measurable when the
 * recording as a whole reaches it, or when at least MIN_STRONG_MARKS marks do (the peaks of a fading
 * signal); never without an SNR estimate. Predictions (no noise) pass as they are.
 */
function gateEdges(pass: EnvelopePass, snr: ShapeSnr | null, minEdgeDb: number): EdgeGate {
  // The SNR object's two figures read here, the rest in gateOnSnr: the SNR objects come in several
  // shapes (copies with a field added or replaced), which sent the compiled loop below back to slow
  // code and had it compiled again for each new shape.
  return gateOnSnr(pass, snr === null, snr?.snrDb ?? null, snr?.noisePower ?? 0, minEdgeDb);
}

function gateOnSnr(pass: EnvelopePass, predicted: boolean, snrDb: number | null, noisePower: number, minEdgeDb: number): EdgeGate {
  if (predicted) return { ok: true, edges: pass.edges, tracks: pass.chirpTracks, snippets: pass.snippets, weak: 0 };
  const none: EdgeGate = { ok: false, edges: { ...pass.edges, marks: [] }, tracks: [], snippets: [], weak: 0 };
  if (snrDb === null) return none;
  const pOff = noisePower;
  const bandHz = envelopeNoiseBandwidthHz(pass.baseband);
  let weak = 0;
  const marks: MarkShape[] = [];
  for (const m of pass.edges.marks) {
    const db = pOff > 0 ? 10 * Math.log10((Math.max(m.settledLevel * m.settledLevel - pOff, 1e-30) / pOff) * (bandHz / SNR_BANDWIDTH_HZ)) : Infinity;
    if (db >= minEdgeDb) marks.push(m);
    else {
      weak++;
      marks.push({ ...m, rise: null, fall: null, problem: `too noisy: its own SNR ${db.toFixed(1)} dB is below the ${minEdgeDb} dB needed to measure edges` });
    }
  }
  const strong = marks.filter((m) => m.rise && m.fall).length;
  if (!(snrDb >= minEdgeDb || strong >= MIN_STRONG_MARKS)) return { ...none, weak };
  const kept = new Set(marks.filter((m) => m.rise).map((m) => m.rise!.at50Ms));
  return {
    ok: true,
    edges: { ...pass.edges, marks },
    tracks: pass.chirpTracks.filter((t) => kept.has(t.startMs)),
    snippets: pass.snippets.filter((sn) => kept.has(sn.riseAt50Ms)),
    weak,
  };
}

interface ShapeInputs {
  samples: Float32Array;
  sampleRate: number;
  toneHz: number;
  kind: 'measured' | 'predicted';
  unit: { unitMs: number | null; source: ShapeReport['speed']['source'] };
  /** SNR estimate (measured reports only). */
  snr: (ShapeSnr & { timingSource: ShapeMeasurability['timingSource'] }) | null;
}

function composeReport(
  input: ShapeInputs,
  options: ShapeOptions,
  analysis: { pass: EnvelopePass; step: { riseMs: number; overshootPct: number }; timingMarks?: Interval[] },
  warnings: string[],
): ShapeReport {
  const { samples, sampleRate, toneHz } = input;
  const progress = options.onProgress ?? (() => {});
  const k = checkRange('K', options.k ?? 5, 1, 10);
  const mask = validateMask(options.mask ?? DEFAULT_MASK);
  const { pass, step } = analysis;
  const baseband = pass.baseband;
  const snrDb = input.snr?.snrDb ?? null;
  const minEdge = options.snrThresholdsDb?.edges ?? MIN_EDGE_SNR_DB;
  const minSpectrum = options.snrThresholdsDb?.spectrum ?? MIN_SPECTRUM_SNR_DB;
  // A measured report stands behind a figure only with an SNR estimate at or above its threshold; a prediction has no noise.
  const predicted = input.snr === null;
  const gate = gateEdges(pass, input.snr, minEdge);
  const edgesOk = gate.ok;
  const spectrumOk = predicted || (snrDb !== null && snrDb >= minSpectrum);
  // Below the edge threshold the shape's own marks are noise bumps: none are kept, and their warnings say nothing useful.
  const edges = gate.edges;
  // Below the edge threshold the shape's own marks are noise bumps: the receiver's marks stand in for them.
  const receiverMarks: Interval[] = !edgesOk && input.snr ? analysis.timingMarks ?? [] : [];
  if (!predicted && snrDb === null) {
    warnings.push(
      'the SNR could not be estimated (neither the receiver nor the shape analysis found enough key-down and key-up time, at least 50 ms of each): ' +
        'rise, fall, overshoot, chirp, the bandwidths and the mask verdict are left out (null)',
    );
  } else if (!edgesOk) {
    warnings.push(
      `the recording is too noisy to measure the keying shape: SNR ${snrDb!.toFixed(1)} dB (key-down carrier over noise in 2500 Hz), ` +
        `below the ${minEdge} dB needed for rise, fall, overshoot and chirp` +
        (spectrumOk ? '' : ` and the ${minSpectrum} dB needed for the bandwidths and the mask`) +
        ': those figures are left out (null). Record closer to the transmitter, or through an attenuator from its output',
    );
  } else if (!spectrumOk) {
    warnings.push(
      `the recording is too noisy for the spectral figures: SNR ${snrDb!.toFixed(1)} dB (key-down carrier over noise in 2500 Hz), ` +
        `below the ${minSpectrum} dB needed for the occupied and x-dB bandwidths, click levels and the mask verdict: those are left out (null)`,
    );
  }
  if (edgesOk && gate.weak > 0) {
    warnings.push(
      `${gate.weak} of ${edges.marks.length} marks are below the ${minEdge} dB SNR needed for edges on their own (a weak or fading signal; ` +
        `the recording's average is ${snrDb!.toFixed(1)} dB): rise, fall, overshoot and chirp rest on the others`,
    );
  }
  const measured = edges.marks.filter((m) => m.rise && m.fall);
  const rises = measured.map((m) => m.rise!.rise10to90Ms);
  const falls = measured.map((m) => m.fall!.rise10to90Ms);
  const riseMs = spreadOf(rises);
  const fallMs = spreadOf(falls);
  const resolutionMs = step.riseMs;
  const both = [...measured.map((m) => m.rise!), ...measured.map((m) => m.fall!)];
  // Share of the 10–90 % time spent below the half-way level in time order: 0.268 for an RC edge, rising or falling.
  const asymmetry = spreadOf([
    ...measured.map((m) => m.rise!.levelTimesMs.p50 / m.rise!.rise10to90Ms),
    ...measured.map((m) => 1 - m.fall!.levelTimesMs.p50 / m.fall!.rise10to90Ms),
  ]).median;
  const spread = spreadOf(both.map((e) => (e.levelTimesMs.p95 - e.levelTimesMs.p5) / e.rise10to90Ms)).median;
  const allEdges = spreadOf([...rises, ...falls]).median;
  const edgeKind = classifyEdge({ rise10to90Ms: allEdges, asymmetry, spread }, resolutionMs);
  if (allEdges !== null && allEdges < 3 * resolutionMs && edgeKind !== 'hard') {
    warnings.push(
      `the measured edges (${allEdges.toFixed(2)} ms) are less than 3× the envelope's own response (${resolutionMs.toFixed(2)} ms): ` +
        'they are probably somewhat shorter than measured; a higher tone gives a wider envelope',
    );
  }
  if (edgeKind === 'hard') {
    warnings.push(
      `the edges are about as fast as the envelope can show (a hard step reads ${resolutionMs.toFixed(2)} ms with ${step.overshootPct.toFixed(1)} % overshoot ` +
        'through it): the true rise and fall are shorter, and the overshoot is mostly the envelope\'s own ringing',
    );
    warnings.push(
      "hard edges spread past the envelope's band, which leaves a false phase swing after each edge: chirp below about 7 Hz " +
        'cannot be told from it here (chirp-free hard keying reads up to 6.3 Hz in keyform\'s own runs)',
    );
  }
  const overs = measured.map((m) => m.overshootPct);
  const chirps = edgesOk ? chirpFromTracks(gate.tracks, { windowMs: options.chirpWindowMs }) : [];
  const chirpValues = chirps.map((c) => c.chirpHz);
  const chirpByStart = new Map(chirps.map((c) => [c.startMs, c.chirpHz]));
  let worstChirp: number | null = null;
  for (const c of chirpValues) if (worstChirp === null || Math.abs(c) > Math.abs(worstChirp)) worstChirp = c;
  progress(0.5);

  // Key-up stretches clear of the edges, for the noise floor.
  const perMs = sampleRate / 1000;
  const guardMs = 10 + 4 * (allEdges ?? 5);
  const quiet: Array<[number, number]> = [];
  let prev = 0;
  const keyDowns = edgesOk ? edges.marks.map((m) => [m.startMs, m.endMs] as const) : receiverMarks;
  for (const [startMs, endMs] of keyDowns) {
    quiet.push([Math.round(prev * perMs), Math.round((startMs - guardMs) * perMs)]);
    prev = endMs + guardMs;
  }
  quiet.push([Math.round(prev * perMs), samples.length]);
  const fig = spectralFigures(samples, sampleRate, toneHz, mask, quiet.filter(([a, b]) => b > a), (f) => progress(0.5 + 0.3 * f));
  if (!fig.noiseApplied && input.kind === 'measured') {
    warnings.push('no key-up stretch long enough to estimate the noise floor; the occupied bandwidth includes the recording\'s noise');
  }
  const obw = spectrumOk ? fig.occupied : null;
  const unObw = spectrumOk ? fig.uncorrected : null;
  const correctionPct = obw && unObw && obw.widthHz > 0 ? ((unObw.widthHz - obw.widthHz) / obw.widthHz) * 100 : null;

  const unitMs = input.unit.unitMs;
  const baud = unitMs !== null ? modulationRateBaud(unitMs) : null;
  const bn = baud !== null ? necessaryBandwidthHz(baud, k) : null;
  if (unitMs === null) warnings.push('no marks to measure the speed from; necessary bandwidth not computed');
  else if (input.unit.source === 'receiver') warnings.push(`the speed (for the necessary bandwidth) is the receiver's: unit ${unitMs.toFixed(1)} ms`);
  else if (input.unit.source === 'measured' && edges.marks.length < 4) {
    warnings.push(`the speed rests on only ${edges.marks.length} mark(s); give the unit with --wpm for a sure necessary bandwidth`);
  }
  const wpm = unitMs !== null ? wpmFromUnitMs(unitMs) : null;

  let shortest: number | null = null;
  const sweepEdge: EdgeKind = edgeKind === 'linear' || edgeKind === 'exponential' ? edgeKind : 'raised-cosine';
  if ((options.findShortestRise ?? true) && wpm !== null && wpm >= 1 && wpm <= 100) {
    const sweep = sweepRise({ wpm, edge: sweepEdge, k, mask, onProgress: (f) => progress(0.8 + 0.2 * f) });
    shortest = sweep.shortestRiseMs;
  }
  progress(1);

  // Spectrum for the report, max-held down to at most MAX_SPECTRUM_POINTS.
  const group = Math.max(1, Math.ceil(fig.dbc.length / MAX_SPECTRUM_POINTS));
  const offsetHz: number[] = [];
  const dbc: number[] = [];
  for (let j = 0; j < fig.dbc.length; j += group) {
    let best = -Infinity;
    let sum = 0;
    let n = 0;
    for (let i = j; i < Math.min(fig.dbc.length, j + group); i++) {
      best = Math.max(best, fig.dbc[i]!);
      sum += fig.offsets[i]!;
      n++;
    }
    offsetHz.push(round(sum / n, 2)!);
    dbc.push(round(best, 2)!);
  }

  const traces = tracesFromSnippets(gate.snippets, sampleRate, Math.max(2, 1.5 * (allEdges ?? 2)), 121, 40);
  const notMeasured: XdbBandwidth = { lowerHz: null, upperHz: null, widthHz: null, basis: 'below the noise floor' };
  const xd = spectrumOk ? fig.xdb : { '20': notMeasured, '40': notMeasured, '60': notMeasured };
  const mask_ = maskSummary(fig.verdict, mask, spectrumOk, snrDb, minSpectrum);
  const lowSnrProblem = snrDb === null ? 'the SNR could not be estimated' : `too noisy: SNR ${snrDb.toFixed(1)} dB, below the ${minEdge} dB needed to measure edges`;
  return {
    kind: input.kind,
    measurable: {
      snrDb: round(snrDb, 1),
      envelopeSnrDb: round(input.snr?.envelopeSnrDb ?? null, 1),
      timingSource: input.snr?.timingSource ?? 'plan',
      minEdgeSnrDb: minEdge,
      minSpectrumSnrDb: minSpectrum,
      edges: edgesOk,
      spectrum: spectrumOk,
    },
    sampleRate,
    toneHz: round(toneHz, 2)!,
    durationMs: round((samples.length * 1000) / sampleRate, 1)!,
    marks: { found: edgesOk ? edges.marks.length : receiverMarks.length, measured: measured.length },
    riseMs: roundSpread(riseMs),
    fallMs: roundSpread(fallMs),
    edgeKind,
    perMark: !edgesOk
      ? receiverMarks.map(([startMs, endMs]) => ({ startMs: round(startMs, 2)!, endMs: round(endMs, 2)!, riseMs: null, fallMs: null, overshootPct: null, chirpHz: null, problem: lowSnrProblem }))
      : edges.marks.map((m) => ({
      startMs: round(m.startMs, 2)!,
      endMs: round(m.endMs, 2)!,
      riseMs: m.rise ? round(m.rise.rise10to90Ms, 3) : null,
      fallMs: m.fall ? round(m.fall.rise10to90Ms, 3) : null,
      overshootPct: round(m.overshootPct, 2) ?? 0,
      chirpHz: round(chirpByStart.get(m.rise?.at50Ms ?? NaN) ?? null, 2),
      problem: m.problem,
    })),
    overshootPct: { median: round(spreadOf(overs).median, 2), worst: overs.length ? round(Math.max(...overs), 2) : null },
    chirpHz: { median: round(spreadOf(chirpValues).median, 2), worst: round(worstChirp, 2), windowMs: options.chirpWindowMs ?? 10 },
    envelope: {
      passBandHz: [round(baseband.passBandHz[0], 1)!, round(baseband.passBandHz[1], 1)!],
      resolutionMs: round(resolutionMs, 3)!,
      stepOvershootPct: round(step.overshootPct, 2)!,
      note: `rise and fall measured on a ${Math.round(baseband.passBandHz[0])}–${Math.round(baseband.passBandHz[1])} Hz analytic envelope (a hard step reads ${resolutionMs.toFixed(2)} ms through it). ${FILTER_NOTE}`,
    },
    spectrum: {
      window: 'Hann',
      rbwHz: round(fig.spectrum.rbwHz, 3)!,
      segmentLength: fig.spectrum.segmentLength,
      segments: fig.spectrum.segments,
      reference: `0 dBc = the strongest bin of the averaged spectrum (Hann window, 75 % overlap, RBW ${fig.spectrum.rbwHz.toFixed(2)} Hz)`,
      offsetHz,
      dbc,
      noiseFloorDbc: round(fig.noiseFloorDbc, 1),
    },
    occupiedBandwidthHz: obw ? round(obw.widthHz, 1) : null,
    occupiedBandEdgesHz: obw ? { lowerHz: round(obw.lowerHz, 1)!, upperHz: round(obw.upperHz, 1)! } : null,
    noiseCorrection: {
      applied: fig.noiseApplied,
      uncorrectedHz: unObw ? round(unObw.widthHz, 1) : null,
      correctionPct: fig.noiseApplied ? round(correctionPct, 2) : null,
      note: !spectrumOk
        ? 'not measured: the recording is too noisy for the occupied bandwidth'
        : fig.noiseApplied
        ? 'the noise floor measured in the key-up stretches was subtracted before integrating the 99 % band (ITU-R SM.328)'
        : 'no noise correction',
    },
    bandwidthAtDbcHz: { '20': round(xd['20'].widthHz, 1), '40': round(xd['40'].widthHz, 1), '60': round(xd['60'].widthHz, 1) },
    bandwidthBasis: { '20': xd['20'].basis, '40': xd['40'].basis, '60': xd['60'].basis },
    clickDbc: spectrumOk ? fig.clicks : fig.clicks.map((c) => ({ ...c, lowerDbc: null, upperDbc: null })),
    speed: { unitMs: round(unitMs, 3), wpm: round(wpm, 2), modulationRateBaud: round(baud, 3), source: input.unit.source },
    necessaryBandwidthHz: round(bn, 2),
    k,
    designator: bn !== null ? emissionDesignator(bn) : null,
    occupiedToNecessary: obw && bn ? round(obw.widthHz / bn, 2) : null,
    necessaryNote:
      `ITU-R SM.1138: Bn = B·K for on-off keyed telegraphy, B = 1/unit = ${baud?.toFixed(2) ?? '?'} baud from the ${input.unit.source} timing, K = ${k} ` +
      `(${k === 5 ? 'fading circuit' : k === 3 ? 'non-fading circuit' : 'as given'}). The Recommendation's own example uses the traditional conversion B ≈ 0.8 × wpm ` +
      '(25 wpm → 20 baud → 100 Hz, 100HA1AAN). Keyed signals with sensible shaping usually occupy somewhat more than Bn: information, not a verdict.',
    mask: { ...mask_, shortestRiseMs: shortest, sweepEdge },
    edges: traces,
    warnings,
    notes: [FILTER_NOTE, CAUTION],
  };
}

/**
 * The mask part of the report: the verdict rounded, or not judged (pass null, no violations) when the
 * recording is too noisy for spectral figures or when no point of the mask could be checked.
 */
function maskSummary(v: MaskVerdict, mask: SpectralMask, spectrumOk: boolean, snrDb: number | null, minSpectrumDb: number): Omit<ShapeReport['mask'], 'shortestRiseMs' | 'sweepEdge'> {
  const rounded = {
    ...v,
    worstExcessDb: round(v.worstExcessDb, 2),
    violations: v.violations.map((x) => ({ ...x, offsetHz: round(x.offsetHz, 1)!, limitDbc: round(x.limitDbc, 2)!, measuredDbc: round(x.measuredDbc, 2)!, excessDb: round(x.excessDb, 2)! })),
    points: mask.points,
  };
  if (!spectrumOk) {
    return {
      ...rounded, pass: null, violations: [], worstExcessDb: null,
      note:
        snrDb === null
          ? 'not judged: the SNR could not be estimated, so the spectrum cannot be told from the recording\'s noise'
          : `not judged: SNR ${snrDb.toFixed(1)} dB is below the ${minSpectrumDb} dB needed to tell the transmitter's spectrum from the recording's noise`,
    };
  }
  if (v.pass && v.judgedBins === 0) {
    return { ...rounded, pass: null, note: "not judged: no point of the mask could be checked above the recording's noise floor or within the analysed span" };
  }
  return { ...rounded, note: null };
}

/**
 * Warnings when the recording starts or ends with the key down: the cut is a hard edge of its own and
 * adds clicks to the spectrum that the transmitter did not make.
 */
function cutEdgeWarnings(ends: EnvelopePass['ends'], sampleRate: number): string[] {
  const n = Math.max(1, Math.round(sampleRate * 0.005));
  const out: string[] = [];
  const why = 'the cut is a hard edge the transmitter did not make, and its clicks show in the spectrum; record some silence around the signal';
  if (ends.peak > 0 && ends.length > 4 * n) {
    // The first and last few ms of the envelope are affected by the filter's start-up; look just inside them.
    if (ends.startMean > 0.3 * ends.peak) out.push(`the recording starts with the key down: ${why}`);
    if (ends.endMean > 0.3 * ends.peak) out.push(`the recording ends with the key down: ${why}`);
  }
  return out;
}

/** Default stretch of a recording the shape analysis is given [s] (at most DEFAULT_SHAPE_WINDOW_SAMPLES samples). */
export const DEFAULT_SHAPE_WINDOW_S = 300;
/** 2^24 samples (64 MiB as 32-bit floats): 349 s at 48 kHz, 87 s at 192 kHz. */
export const DEFAULT_SHAPE_WINDOW_SAMPLES = 2 ** 24;

/**
 * How much of a recording to analyse by default at `sampleRate` [s]: five minutes (fewer at high
 * rates) give hundreds of marks for the edge statistics and thousands of spectrum segments, and keep
 * the analysis's memory bounded whatever the recording's length (it holds its samples).
 * @example defaultShapeWindowS(8000) //=> 300
 */
export function defaultShapeWindowS(sampleRate: number): number {
  return Math.min(DEFAULT_SHAPE_WINDOW_S, Math.floor(DEFAULT_SHAPE_WINDOW_SAMPLES / sampleRate));
}

/**
 * When the analysed stretch is not the whole recording: where it lies (rounded to the ms) and a
 * sentence saying so, for the report's warnings. Null when it is the whole recording.
 * @param fromS - Start of the stretch in the recording [s].
 * @param lengthS - Its length [s].
 * @param totalS - The recording's length [s], or null when unknown (a pipe).
 */
export function stretchNote(fromS: number, lengthS: number, totalS: number | null): { stretch: { fromS: number; toS: number; totalS: number | null }; text: string } | null {
  const ms = (x: number): number => Math.round(x * 1000) / 1000;
  const toS = fromS + lengthS;
  if (fromS <= 0 && (totalS === null || toS >= totalS - 0.001)) return null;
  const stretch = { fromS: ms(fromS), toS: ms(toS), totalS: totalS === null ? null : ms(totalS) };
  return { stretch, text: `analysed ${stretch.fromS}–${stretch.toS} s of the recording's ${stretch.totalS ?? '?'} s (times in this report count from ${stretch.fromS} s)` };
}

/**
 * Measures the keying shape of a recording of a keyed tone.
 * @param samples - Mono samples (any scale); at least 50 ms.
 * @param sampleRate - Sample rate [Hz], 8000…192000.
 * @param options - Tone, K factor, mask, unit, the receiver's timing if already known; `onProgress(fraction)` for long recordings.
 * @returns A ShapeReport (stable JSON shape). Below MIN_EDGE_SNR_DB the edge figures, below
 *   MIN_SPECTRUM_SNR_DB the spectral figures are null and the mask is not judged (`mask.pass` null);
 *   `measurable` says which, with the SNR estimated from the receiver's key-down / key-up split.
 * @example measureShape(samples, 48000, { toneHz: 700 }).riseMs.median //=> ≈ 5 for 5 ms raised-cosine edges
 */
export function measureShape(samples: Float32Array, sampleRate: number, options: ShapeOptions = {}): ShapeReport {
  checkRange('sample rate', sampleRate, 8000, 192_000, 'Hz');
  if (samples.length < sampleRate * 0.05) throw new InputError(`the recording is too short to analyse (${((samples.length / sampleRate) * 1000).toFixed(1)} ms; need at least 50 ms)`);
  const progress = options.onProgress ?? (() => {});
  const warnings: string[] = [];
  let toneHz = options.toneHz;
  if (toneHz === undefined) {
    const L = Math.min(segmentLengthForRbw(sampleRate, TARGET_RBW_HZ), 2 ** Math.floor(Math.log2(samples.length)));
    const found = findTonePeak(welchSpectrum(samples, sampleRate, { segmentLength: Math.max(64, L) }), 100, Math.min(5000, sampleRate / 2 - 100));
    if (found === null) throw new InputError('no tone found between 100 Hz and 5 kHz; give it with --tone');
    toneHz = found;
  } else if (!(toneHz > 0 && toneHz < sampleRate / 2)) {
    throw new InputError(`tone must be above 0 and below sampleRate/2 = ${sampleRate / 2} Hz (got ${toneHz})`);
  }
  progress(0.05);
  const tone = toneHz;
  // Key-down intervals from the receiver (given, or run here): it finds marks far below the SNR at which edges can be measured.
  let timing = options.timing;
  let timingSource: ShapeMeasurability['timingSource'] = 'given';
  if (timing === undefined) {
    const decoded = decodeSamples(samples, sampleRate, { toneHz: tone, onProgress: (f) => progress(0.05 + 0.15 * f) });
    timing = { marks: decoded.marks, unitMs: decoded.marks.length > 0 ? decoded.unitMs : null };
    timingSource = 'receiver';
  } else {
    // A caller's timing may cover more than these samples (batch looks at an excerpt).
    const endMs = (samples.length * 1000) / sampleRate;
    timing = { marks: timing.marks.filter(([a]) => a < endMs), unitMs: timing.unitMs };
  }
  const chirp = { windowMs: options.chirpWindowMs };
  const analyse = (halfBandHz: number | undefined, p0: number, p1: number) => {
    const step = envelopeStep(sampleRate, tone, halfBandHz ?? 4000);
    const pass = envelopePass(samples, sampleRate, {
      toneHz: tone,
      halfBandHz,
      timingMarks: timing.marks,
      chirp: { ...chirp, resolutionMs: step.riseMs },
      onProgress: (f) => progress(p0 + (p1 - p0) * f),
    });
    return { pass, step };
  };
  const measuredCount = (p: EnvelopePass): number => p.edges.marks.filter((m) => m.rise).length;
  let best = analyse(options.envelopeHalfBandHz, 0.2, 0.3);
  let snr: NonNullable<ShapeInputs['snr']> = { ...snrFromSums(best.pass.snr, sampleRate, best.pass.baseband), timingSource };
  if (snr.snrDb === null && best.pass.edges.marks.length > 0) {
    // The receiver found no marks (pure noise, or too few marks for it): estimate from the shape's own
    // marks. On noise they are the envelope's random peaks, whose level over the troughs reads far below
    // the thresholds, so noise is still not measured as a transmitter.
    const own: Interval[] = best.pass.edges.marks.map((m) => [m.startMs, m.endMs]);
    const again = envelopePass(samples, sampleRate, { toneHz: tone, halfBandHz: options.envelopeHalfBandHz, timingMarks: own, chirp });
    snr = { ...snrFromSums(again.snr, sampleRate, again.baseband), timingSource: 'shape' };
  }
  // Judged at the 0.1 dB the report shows, so that a figure and its verdict agree.
  snr = { ...snr, snrDb: round(snr.snrDb, 1) };
  const edgesOk = gateEdges(best.pass, snr, options.snrThresholdsDb?.edges ?? MIN_EDGE_SNR_DB).ok;
  if (edgesOk && options.envelopeHalfBandHz === undefined && best.pass.edges.marks.length >= 3) {
    // Too noisy for the wide envelope: try narrower ones, trading edge resolution for noise.
    for (const halfBandHz of NARROWER_BANDS_HZ) {
      const measuredShare = measuredCount(best.pass) / best.pass.edges.marks.length;
      if (measuredShare >= 0.5 || halfBandHz >= best.pass.baseband.narrowestSideHz) continue;
      const next = analyse(halfBandHz, 0.3, 0.35);
      // Only when it finds about the same marks: a narrow envelope on noise alone finds many bumps.
      const sameMarks = Math.abs(next.pass.edges.marks.length / best.pass.edges.marks.length - 1) <= 0.3;
      if (sameMarks && measuredCount(next.pass) > measuredCount(best.pass)) {
        best = next;
        warnings.push(`the recording is noisy: edges measured on a narrower envelope (tone ± ${halfBandHz} Hz), so edges shorter than a few times its own step read long`);
      }
    }
  }
  const { pass } = best;
  const finalOk = gateEdges(pass, snr, options.snrThresholdsDb?.edges ?? MIN_EDGE_SNR_DB).ok;
  if (finalOk) {
    warnings.push(...edgeWarnings(pass.edges.counts));
    warnings.push(...cutEdgeWarnings(pass.ends, sampleRate));
    if (pass.edges.marks.length === 0) warnings.push('no marks found: rise, fall and chirp are not measured');
  }
  let unit: ShapeInputs['unit'];
  if (options.unitMs !== undefined) unit = { unitMs: checkRange('unit', options.unitMs, 1, 2000, 'ms'), source: 'given' };
  else if (!finalOk) unit = { unitMs: timing.unitMs, source: 'receiver' };
  else unit = { unitMs: estimateUnitMs(pass.edges.marks), source: 'measured' };
  return composeReport(
    { samples, sampleRate, toneHz, kind: 'measured', unit, snr },
    { ...options, onProgress: (f) => progress(0.35 + 0.65 * f) },
    { pass, step: best.step, timingMarks: timing.marks },
    warnings,
  );
}

export interface PredictOptions extends Omit<ShapeOptions, 'toneHz' | 'unitMs'> {
  /** Character speed [wpm, PARIS], 1…100. */
  wpm: number;
  /** Overall speed with Farnsworth spacing [wpm]; the unit (and so B) stays that of `wpm`. */
  farnsworthWpm?: number | null;
  /** 10–90 % rise and fall time [ms], 0…50 (ignored for hard keying). */
  riseMs: number;
  edge: EdgeKind;
  /** Text keyed for the prediction; default 'PARIS PARIS' (the standard word). */
  text?: string;
  /** Key-down intervals [ms] to use instead of planning `text` (e.g. a plan the caller already has). */
  marks?: Interval[];
  /** Optional chirp model: tone offset [Hz] at t ms after each key-down. */
  chirp?: (msSinceKeyDown: number) => number;
}

/** Sample rate and tone used for predictions: wide enough for ±5 kHz of spectrum and a sharp envelope. */
export const PREDICT_SAMPLE_RATE = 24_000;
export const PREDICT_TONE_HZ = 6000;

function synthesizePrediction(o: PredictOptions): { samples: Float32Array; unitMs: number } {
  if (!(EDGE_KINDS as readonly string[]).includes(o.edge)) throw new InputError(`edge must be one of ${EDGE_KINDS.join(', ')} (got '${o.edge}')`);
  const plan = planKeying(o.text ?? 'PARIS PARIS', { wpm: o.wpm, farnsworthWpm: o.farnsworthWpm ?? null });
  const tone = synthesizeTone({
    marks: o.marks && o.marks.length > 0 ? o.marks : plan.marks,
    sampleRate: PREDICT_SAMPLE_RATE,
    toneHz: PREDICT_TONE_HZ,
    levelDb: -6,
    edge: o.edge,
    riseMs: o.edge === 'hard' ? 0 : o.riseMs,
    padMs: 300,
    chirp: o.chirp,
  });
  return { samples: tone.samples, unitMs: plan.unitMs };
}

/**
 * The shape report predicted from the keying plan and the synthesizer alone (no recording): the
 * synthesized signal is analysed exactly as a recording would be, with the planned unit.
 * @example predictShape({ wpm: 20, riseMs: 5, edge: 'raised-cosine' }).necessaryBandwidthHz //=> 83.33
 */
export function predictShape(options: PredictOptions): ShapeReport {
  checkRange('wpm', options.wpm, 1, 100, 'wpm');
  checkRange('rise', options.riseMs, 0, 50, 'ms');
  const { samples, unitMs } = synthesizePrediction(options);
  const progress = options.onProgress ?? (() => {});
  const step = envelopeStep(PREDICT_SAMPLE_RATE, PREDICT_TONE_HZ, 4000);
  const pass = envelopePass(samples, PREDICT_SAMPLE_RATE, {
    toneHz: PREDICT_TONE_HZ,
    timingMarks: [],
    chirp: { windowMs: options.chirpWindowMs, resolutionMs: step.riseMs },
    onProgress: (f) => progress(0.3 * f),
  });
  const warnings = edgeWarnings(pass.edges.counts);
  return composeReport(
    { samples, sampleRate: PREDICT_SAMPLE_RATE, toneHz: PREDICT_TONE_HZ, kind: 'predicted', unit: { unitMs, source: 'plan' }, snr: null },
    { ...options, onProgress: (f) => progress(0.3 + 0.7 * f) },
    { pass, step },
    warnings,
  );
}

export interface SweepOptions {
  wpm: number;
  farnsworthWpm?: number | null;
  edge: EdgeKind;
  /** Rise times to try [ms]; default 0.5 … 15 ms in 0.5 ms steps. */
  risesMs?: number[];
  k?: number;
  mask?: SpectralMask;
  text?: string;
  onProgress?: (fraction: number) => void;
}

export interface SweepRow {
  riseMs: number;
  occupiedBandwidthHz: number | null;
  at40DbcHz: number | null;
  pass: boolean;
  worstExcessDb: number | null;
}

export interface SweepResult {
  wpm: number;
  edge: EdgeKind;
  mask: string;
  necessaryBandwidthHz: number;
  rows: SweepRow[];
  /** Shortest rise time in the table from which every longer one meets the mask [ms], or null. */
  shortestRiseMs: number | null;
}

/**
 * Rise time against occupied and −40 dBc bandwidth at a given speed, with the shortest rise time that
 * meets the mask (spectral figures only; no edge or chirp analysis).
 * @example sweepRise({ wpm: 20, edge: 'raised-cosine' }).shortestRiseMs //=> 2.5 (default mask)
 */
export function sweepRise(options: SweepOptions): SweepResult {
  checkRange('wpm', options.wpm, 1, 100, 'wpm');
  const mask = validateMask(options.mask ?? DEFAULT_MASK);
  const rises = options.risesMs ?? Array.from({ length: 30 }, (_, i) => (i + 1) * 0.5);
  rises.forEach((r) => checkRange('rise', r, 0, 50, 'ms'));
  const rows: SweepRow[] = [];
  let unitMs = 0;
  rises.forEach((riseMs, i) => {
    const syn = synthesizePrediction({ wpm: options.wpm, farnsworthWpm: options.farnsworthWpm, edge: options.edge, riseMs, text: options.text });
    unitMs = syn.unitMs;
    const fig = spectralFigures(syn.samples, PREDICT_SAMPLE_RATE, PREDICT_TONE_HZ, mask, []);
    rows.push({
      riseMs,
      occupiedBandwidthHz: fig.occupied ? round(fig.occupied.widthHz, 1) : null,
      at40DbcHz: round(fig.xdb['40'].widthHz, 1),
      pass: fig.verdict.pass,
      worstExcessDb: round(fig.verdict.worstExcessDb, 1),
    });
    options.onProgress?.((i + 1) / rises.length);
  });
  let shortest: number | null = null;
  const byRise = [...rows].sort((a, b) => a.riseMs - b.riseMs);
  for (let i = byRise.length - 1; i >= 0 && byRise[i]!.pass; i--) shortest = byRise[i]!.riseMs;
  return {
    wpm: options.wpm,
    edge: options.edge,
    mask: mask.name,
    necessaryBandwidthHz: round(necessaryBandwidthHz(modulationRateBaud(unitMs), options.k ?? 5), 2)!,
    rows,
    shortestRiseMs: shortest,
  };
}

/** Highest level [dBc] within ±rbwHz of the offset `f` [Hz], to 0.1 dB; null when no bin is that near. */
function levelNear(offsets: Float64Array, dbc: Float64Array, f: number, rbwHz: number): number | null {
  let best: number | null = null;
  for (let j = 0; j < offsets.length; j++) if (Math.abs(offsets[j]! - f) <= rbwHz) best = best === null ? dbc[j]! : Math.max(best, dbc[j]!);
  return best === null ? null : round(best, 1);
}
