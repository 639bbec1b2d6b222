/**
 * Rise and fall times (10–90 % of each mark's settled level, Federal Standard 1037C's definition of
 * rise time) measured on a wide keying envelope, one mark at a time.
 */
import { checkRange } from '../errors.js';
import { quantileOfSorted, sortedCopy } from './timing-stats.js';

/** One measured edge. Times on the recording's clock [ms]. */
export interface EdgeMeasurement {
  /** Time of the 50 % crossing [ms from the first sample]. */
  at50Ms: number;
  /** 10 → 90 % time [ms]. */
  rise10to90Ms: number;
  /** Crossing times of 5, 10, 30, 50, 70, 90 and 95 % relative to the 10 % crossing, going up in level [ms]. */
  levelTimesMs: { p5: number; p10: number; p30: number; p50: number; p70: number; p90: number; p95: number };
}

/** One key-down as seen in the envelope. */
export interface MarkShape {
  /** 50 % key-down and key-up times [ms from the first sample]. */
  startMs: number;
  endMs: number;
  /** Settled (plateau) level, in envelope units. */
  settledLevel: number;
  /** Level before the mark (noise or carrier leak), in envelope units. */
  baseLevel: number;
  /** Plateau noise: standard deviation over the settled part (less its 1 ms moving average) / (settled − base). */
  plateauNoise: number;
  /** Peak (0.5 ms running mean) above the settled level during the first half of the mark [%]; 0 when within 3 σ of the plateau noise. */
  overshootPct: number;
  rise: EdgeMeasurement | null;
  fall: EdgeMeasurement | null;
  /** Why this mark's edges were not measured, if they were not. */
  problem: string | null;
}

/** What the mark finder saw, as counts (so that the analyses of several stretches can be added up). */
export interface EdgeCounts {
  /** Key-down runs shorter than the shortest mark, ignored. */
  bumps: number;
  /** Marks kept (the length of `marks`). */
  kept: number;
  tooShort: number;
  tooNoisy: number;
  /** The envelope ends during a key-down (that mark is left out). */
  endsInMark: boolean;
  /** On and off levels differ by less than 10 dB: no marks looked for. */
  noKeyDown: boolean;
}

export interface EdgeAnalysis {
  marks: MarkShape[];
  counts: EdgeCounts;
  /** Level that separated key-down from key-up (50 % between the 5th and 95th percentile). */
  thresholdLevel: number;
  /** 95th-percentile envelope level (key-down) and 5th-percentile level (key-up). */
  onLevel: number;
  offLevel: number;
  warnings: string[];
}

/**
 * Median of env[i0, i1), as quantileOfSorted(sorted, 0.5) would give it (the mean of the two middle values
 * for an even count), by selection on a copy: O(n) on average where sorting is O(n log n).
 * @example medianOf(Float32Array.of(5, 1, 4, 2), 0, 4) //=> 3
 */
export function medianOf(env: Float32Array, i0: number, i1: number): number {
  return selectQuantile(env.slice(Math.max(0, i0), Math.max(i0 + 1, Math.min(env.length, i1))), 0.5);
}

/**
 * quantileOfSorted(sorted a, q) without sorting: selection, which reorders `a` (pass a copy you own).
 * @param q - 0…1.
 */
export function selectQuantile(a: Float32Array, q: number): number {
  const n = a.length;
  if (n === 0) return NaN;
  const x = q * (n - 1);
  const k = Math.floor(x);
  const f = x - k;
  selectKth(a, k);
  const lo = a[k]!;
  if (k + 1 >= n) return lo;
  // The next order statistic is the smallest value right of k.
  let hi = a[k + 1]!;
  for (let i = k + 2; i < n; i++) if (a[i]! < hi) hi = a[i]!;
  return lo + (hi - lo) * f;
}

/**
 * Reorders `a` so that a[k] is the value a sort would put there, everything left of it ≤ it and
 * everything right of it ≥ it (Hoare's selection with a median-of-three pivot).
 */
function selectKth(a: Float32Array, k: number): void {
  let left = 0;
  let right = a.length - 1;
  while (right > left) {
    const mid = (left + right) >> 1;
    // Median of three as the pivot, moved to a[mid].
    if (a[mid]! < a[left]!) swap(a, mid, left);
    if (a[right]! < a[left]!) swap(a, right, left);
    if (a[right]! < a[mid]!) swap(a, right, mid);
    const pivot = a[mid]!;
    let i = left;
    let j = right;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        swap(a, i, j);
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else return;
  }
}

function swap(a: Float32Array, i: number, j: number): void {
  const t = a[i]!;
  a[i] = a[j]!;
  a[j] = t;
}

/**
 * Noise of env[i0, i1): standard deviation of the envelope minus its moving average over `win`
 * samples, so a slow trend (an edge that has not settled) does not count as noise.
 */
function residualStdOf(env: Float32Array, i0: number, i1: number, win: number): number {
  const a = Math.max(0, i0);
  const b = Math.min(env.length, i1);
  const h = Math.max(1, Math.floor(win / 2));
  if (b - a < 2 * h + 2) return 0;
  let run = 0;
  for (let i = a; i < a + 2 * h + 1; i++) run += env[i]!;
  let s2 = 0;
  let n = 0;
  for (let c = a + h; c + h < b; c++) {
    const d = env[c]! - run / (2 * h + 1);
    s2 += d * d;
    n++;
    if (c + h + 1 < b) run += env[c + h + 1]! - env[c - h]!;
  }
  return n > 0 ? Math.sqrt(s2 / n) : 0;
}

/** Standard deviation of env[i0, i1). */
function stdOf(env: Float32Array, i0: number, i1: number): number {
  let s = 0;
  let s2 = 0;
  let n = 0;
  for (let i = Math.max(0, i0); i < Math.min(env.length, i1); i++) {
    s += env[i]!;
    s2 += env[i]! * env[i]!;
    n++;
  }
  if (n < 2) return 0;
  const m = s / n;
  return Math.sqrt(Math.max(0, s2 / n - m * m));
}

/**
 * Median, 10th and 90th percentile of a list (linear interpolation; nulls when empty).
 * @example spreadOf([1, 2, 3, 4, 5]) //=> { median: 3, p10: 1.4, p90: 4.6 }
 */
export function spreadOf(values: ArrayLike<number>): { median: number | null; p10: number | null; p90: number | null } {
  if (values.length === 0) return { median: null, p10: null, p90: null };
  const s = sortedCopy(values);
  return { median: quantileOfSorted(s, 0.5), p10: quantileOfSorted(s, 0.1), p90: quantileOfSorted(s, 0.9) };
}

/**
 * Time [fractional sample index] where the envelope crosses `level`, searching from `from` towards
 * `limit` (either direction) for the first sample on the far side of the level.
 */
function crossing(env: Float32Array, level: number, from: number, limit: number, above: boolean): number | null {
  const dir = limit >= from ? 1 : -1;
  const beyond = (v: number): boolean => (above ? v >= level : v < level);
  let inside: number; // last sample not beyond the level
  let out: number; // first sample beyond it
  if (beyond(env[from]!)) {
    // Already past the level: step back (away from `limit`) to where it was crossed.
    let j = from;
    for (let n = 0; n < 100_000; n++) {
      const k = j - dir;
      if (k < 0 || k >= env.length || !beyond(env[k]!)) break;
      j = k;
    }
    out = j;
    inside = j - dir;
    if (inside < 0 || inside >= env.length) return out;
  } else {
    let i = from;
    for (;;) {
      const k = i + dir;
      if (dir > 0 ? k > limit : k < limit) return null;
      if (beyond(env[k]!)) break;
      i = k;
    }
    inside = i;
    out = i + dir;
  }
  const a = env[inside]!;
  const v = env[out]!;
  const f = a === v ? 0 : (level - a) / (v - a);
  return inside + dir * f;
}

const LEVELS = [0.05, 0.1, 0.3, 0.5, 0.7, 0.9, 0.95] as const;

/**
 * Measures one edge around the 50 % index `i50`. For a rising edge the levels above 50 % are found
 * searching forward (first time the level is reached) and those below searching backward.
 */
function measureEdge(
  env: Float32Array,
  i50: number,
  base: number,
  settled: number,
  rising: boolean,
  backLimit: number,
  fwdLimit: number,
  msPerSample: number,
): EdgeMeasurement | null {
  const times: number[] = [];
  for (const p of LEVELS) {
    const level = base + p * (settled - base);
    let t: number | null;
    if (rising) t = p >= 0.5 ? crossing(env, level, i50, fwdLimit, true) : crossing(env, level, i50, backLimit, false);
    else t = p >= 0.5 ? crossing(env, level, i50, backLimit, true) : crossing(env, level, i50, fwdLimit, false);
    if (t === null) return null;
    times.push(t);
  }
  // For a falling edge time runs the other way as the level goes up.
  const sign = rising ? 1 : -1;
  const t10 = times[1]!;
  const rel = times.map((t) => sign * (t - t10) * msPerSample);
  return {
    at50Ms: times[3]! * msPerSample,
    rise10to90Ms: rel[5]!,
    levelTimesMs: { p5: rel[0]!, p10: 0, p30: rel[2]!, p50: rel[3]!, p70: rel[4]!, p90: rel[5]!, p95: rel[6]! },
  };
}

export interface EdgeOptions {
  /** Smallest key-down to consider [ms], 0.1…1000; shorter bumps are ignored. Default 2 ms. */
  minMarkMs?: number;
  /**
   * Keep only marks (and count only bumps) whose key-down lies in [keepFromMs, keepToMs) of this
   * envelope [ms]; the others still serve as neighbours. For analysing a long recording in
   * overlapping stretches. Default: all.
   */
  keepFromMs?: number;
  keepToMs?: number;
}

/**
 * The warnings that go with a mark finder's counts.
 * @example edgeWarnings({ bumps: 3, kept: 10, tooShort: 0, tooNoisy: 0, endsInMark: false, noKeyDown: false }, 2) //=> ['3 key-down bumps shorter than 2 ms ignored']
 */
export function edgeWarnings(c: EdgeCounts, minMarkMs = 2): string[] {
  const out: string[] = [];
  if (c.noKeyDown && c.kept === 0) {
    out.push('no clear key-down: the signal is too weak or too noisy to find marks (on/off levels differ by less than 10 dB)');
    return out;
  }
  if (c.endsInMark) out.push('the recording ends during a mark; that mark is left out');
  if (c.bumps > 0) out.push(`${c.bumps} key-down bumps shorter than ${minMarkMs} ms ignored`);
  if (c.tooShort > 0) out.push(`${c.tooShort} of ${c.kept} marks too short to reach a settled level; their edges are left out`);
  if (c.tooNoisy > 0) out.push(`${c.tooNoisy} of ${c.kept} marks too noisy to measure (plateau noise above 5 % of the step)`);
  return out;
}

/** env[0], env[stride], env[2·stride], … as a new array (a leaf function: see keyDownRuns). */
function everyNth(env: Float32Array, stride: number): Float32Array {
  const out = new Float32Array(Math.ceil(env.length / stride));
  for (let i = 0, k = 0; i < env.length; i += stride, k++) out[k] = env[i]!;
  return out;
}

/**
 * Key-down runs with hysteresis (on at threshold + hyst, off below threshold − hyst); each run's
 * recorded boundaries are its 50 % threshold crossings [sample indices, end exclusive]. A leaf
 * function, so that the sample loop is compiled once and kept from one recording to the next.
 * @returns The closed runs, and the start of a run still open at the end (or null).
 */
function keyDownRuns(env: Float32Array, threshold: number, hyst: number): { runs: Array<[number, number]>; openStart: number | null } {
  const runs: Array<[number, number]> = [];
  let down = false;
  let start = 0;
  for (let i = 0; i < env.length; i++) {
    const v = env[i]!;
    if (!down && v >= threshold + hyst) {
      down = true;
      let j = i;
      while (j > 0 && env[j - 1]! >= threshold) j--;
      start = j;
    } else if (down && v < threshold - hyst) {
      down = false;
      let j = i;
      while (j > start && env[j - 1]! < threshold) j--;
      runs.push([start, j]);
    }
  }
  return { runs, openStart: down ? start : null };
}

/**
 * Finds the marks in a wide envelope and measures each one's rise and fall (10–90 % of the step from
 * the level before the mark to the mark's settled level), overshoot and plateau noise.
 * @param env - Envelope (non-negative), one value per sample.
 * @param sampleRate - Sample rate [Hz], 1000…384000.
 * @returns Marks with their edges, and warnings for marks too short or too noisy to measure.
 * @example measureEdges(envelopeOfFiveMsRaisedCosineDot, 48000).marks[0].rise.rise10to90Ms //=> ≈ 5
 */
export function measureEdges(env: Float32Array, sampleRate: number, options: EdgeOptions = {}): EdgeAnalysis {
  checkRange('sample rate', sampleRate, 1000, 384_000, 'Hz');
  const minMarkMs = checkRange('shortest mark', options.minMarkMs ?? 2, 0.1, 1000, 'ms');
  const msPerSample = 1000 / sampleRate;
  const warnings: string[] = [];
  const N = env.length;
  const keepFrom = (options.keepFromMs ?? -Infinity) / msPerSample;
  const keepTo = (options.keepToMs ?? Infinity) / msPerSample;
  const counts: EdgeCounts = { bumps: 0, kept: 0, tooShort: 0, tooNoisy: 0, endsInMark: false, noKeyDown: false };
  // Levels from a decimated sorted copy (bounded cost on long recordings).
  const stride = Math.max(1, Math.floor(N / 200_000));
  const pick = everyNth(env, stride);
  const onLevel = selectQuantile(pick, 0.95);
  const offLevel = selectQuantile(pick, 0.05);
  const threshold = offLevel + 0.5 * (onLevel - offLevel);
  const hyst = 0.1 * (onLevel - offLevel);
  const result: EdgeAnalysis = { marks: [], counts, thresholdLevel: threshold, onLevel, offLevel, warnings };
  if (!(onLevel > 0) || onLevel < 3 * offLevel) {
    counts.noKeyDown = true;
    warnings.push(...edgeWarnings(counts, minMarkMs));
    return result;
  }

  const { runs, openStart } = keyDownRuns(env, threshold, hyst);
  counts.endsInMark = openStart !== null && openStart >= keepFrom && openStart < keepTo;
  const minLen = minMarkMs / msPerSample;
  const kept: Array<[number, number]> = [];
  for (const run of runs) {
    if (run[1] - run[0] >= minLen) kept.push(run);
    else if (run[0] >= keepFrom && run[0] < keepTo) counts.bumps++;
  }

  const levels = { offLevel, msPerSample, sampleRate };
  for (let m = 0; m < kept.length; m++) {
    const a = kept[m]![0];
    if (!(a >= keepFrom && a < keepTo)) continue;
    result.marks.push(measureMark(env, kept, m, levels, counts));
  }
  counts.kept = result.marks.length;
  warnings.push(...edgeWarnings(counts, minMarkMs));
  return result;
}

/**
 * Levels, overshoot and edges of kept run m (a function of its own, called once per mark, so that
 * its compiled code is kept from one recording to the next); counts its problems.
 */
function measureMark(
  env: Float32Array,
  kept: ReadonlyArray<readonly [number, number]>,
  m: number,
  levels: { offLevel: number; msPerSample: number; sampleRate: number },
  counts: EdgeCounts,
): MarkShape {
  const { offLevel, msPerSample, sampleRate } = levels;
  const N = env.length;
  const [a, b] = kept[m]!;
  const prevEnd = m > 0 ? kept[m - 1]![1] : 0;
  const nextStart = m + 1 < kept.length ? kept[m + 1]![0] : N;
  const D = b - a;
  const settled = medianOf(env, a + Math.floor(0.25 * D), b - Math.floor(0.25 * D));
  const gapBefore = a - prevEnd;
  const gapAfter = nextStart - b;
  const baseBefore = m === 0 && gapBefore < 4 ? offLevel : medianOf(env, prevEnd + Math.floor(0.25 * gapBefore), a - Math.floor(0.25 * gapBefore));
  const baseAfter = gapAfter < 4 ? offLevel : medianOf(env, b + Math.floor(0.25 * gapAfter), nextStart - Math.floor(0.25 * gapAfter));
  const span = settled - baseBefore;
  const plateauNoise = span > 0 ? residualStdOf(env, a + Math.floor(0.25 * D), b - Math.floor(0.25 * D), Math.round(sampleRate / 1000)) / span : Infinity;
  // Peak of a 0.5 ms running mean, so that noise on the plateau does not read as overshoot.
  const w = Math.max(1, Math.round(sampleRate / 2000));
  let peak = 0;
  let run = 0;
  for (let i = a; i < a + D / 2; i++) {
    run += env[i]!;
    if (i - a >= w) run -= env[i - w]!;
    if (i - a >= w - 1) peak = Math.max(peak, run / w);
  }
  const mark: MarkShape = {
    startMs: a * msPerSample,
    endMs: b * msPerSample,
    settledLevel: settled,
    baseLevel: baseBefore,
    plateauNoise,
    // An excess within 3 σ of the plateau's spread is not told from the noise: reported as 0.
    overshootPct: settled > 0 && peak - settled > 3 * stdOf(env, a + Math.floor(0.25 * D), b - Math.floor(0.25 * D)) ? (peak / settled - 1) * 100 : 0,
    rise: null,
    fall: null,
    problem: null,
  };
  if (!(span > 0) || plateauNoise > 0.05) {
    mark.problem = 'too noisy';
    counts.tooNoisy++;
    return mark;
  }
  const riseEdge = measureEdge(env, a, baseBefore, settled, true, Math.max(0, prevEnd + Math.floor(gapBefore / 2)), a + Math.floor(D / 2), msPerSample);
  const fallEdge = measureEdge(env, b - 1, baseAfter, settled, false, b - Math.ceil(D / 2), Math.min(N - 1, b + Math.floor(gapAfter / 2)), msPerSample);
  // A mark has settled when its rise has reached 90 % before the middle part used for the level.
  const settledOk =
    riseEdge !== null &&
    fallEdge !== null &&
    riseEdge.at50Ms + (riseEdge.levelTimesMs.p95 - riseEdge.levelTimesMs.p50) <= (a + 0.25 * D) * msPerSample &&
    fallEdge.at50Ms - (fallEdge.levelTimesMs.p95 - fallEdge.levelTimesMs.p50) >= (b - 0.25 * D) * msPerSample;
  if (!settledOk) {
    mark.problem = 'too short to settle';
    counts.tooShort++;
    return mark;
  }
  mark.rise = riseEdge;
  mark.fall = fallEdge;
  return mark;
}

export interface EdgeTraces {
  /** Time axis relative to each edge's 50 % crossing [ms]. */
  timeMs: number[];
  /** Normalised level (0 = base, 1 = settled) of rising edges, one array per edge. */
  rising: number[][];
  /** Falling edges, the same way. */
  falling: number[][];
}

/** A copy of the envelope around one measured mark's edges, for the overlay (kept for a few marks only). */
export interface EdgeSnippet {
  /** 50 % times of the rise and fall [ms, on the recording's clock]. */
  riseAt50Ms: number;
  fallAt50Ms: number;
  baseLevel: number;
  settledLevel: number;
  /** Envelope from sample index `riseFrom` (and `fallFrom`) on the recording's clock. */
  riseFrom: number;
  rise: Float32Array;
  fallFrom: number;
  fall: Float32Array;
}

/** Half-length of the envelope kept around each edge for the overlay [ms]; the overlay's window is capped at it. */
export const SNIPPET_HALF_MS = 40;

/**
 * Copies the envelope around a measured mark's rise and fall (±SNIPPET_HALF_MS), with `offsetSamples`
 * added to the indices (the envelope's first sample on the recording's clock).
 * @example edgeSnippet(env, 48000, mark, 0).rise.length //=> 3842 (80 ms at 48 kHz, plus 2)
 */
export function edgeSnippet(env: Float32Array, sampleRate: number, m: MarkShape, offsetSamples = 0): EdgeSnippet | null {
  if (!m.rise || !m.fall) return null;
  const offsetMs = (offsetSamples * 1000) / sampleRate;
  const cut = (at50Ms: number): [number, Float32Array] => {
    const i0 = Math.max(0, Math.floor(((at50Ms - SNIPPET_HALF_MS) * sampleRate) / 1000));
    const i1 = Math.min(env.length, Math.ceil(((at50Ms + SNIPPET_HALF_MS) * sampleRate) / 1000) + 2);
    return [i0 + offsetSamples, env.slice(i0, Math.max(i0, i1))];
  };
  const [riseFrom, rise] = cut(m.rise.at50Ms);
  const [fallFrom, fall] = cut(m.fall.at50Ms);
  return { riseAt50Ms: m.rise.at50Ms + offsetMs, fallAt50Ms: m.fall.at50Ms + offsetMs, baseLevel: m.baseLevel, settledLevel: m.settledLevel, riseFrom, rise, fallFrom, fall };
}

/**
 * Samples edges on a common time axis around their 50 % crossings, for a persistence-style overlay:
 * every `ceil(n / maxEdges)`-th snippet, `points` samples each, over ±halfWindowMs (at most SNIPPET_HALF_MS).
 * @example tracesFromSnippets(snippets, 48000, 10, 121).timeMs.length //=> 121
 */
export function tracesFromSnippets(snippets: readonly EdgeSnippet[], sampleRate: number, halfWindowMs: number, points = 121, maxEdges = 40): EdgeTraces {
  const half = Math.min(halfWindowMs, SNIPPET_HALF_MS);
  const timeMs: number[] = [];
  for (let p = 0; p < points; p++) timeMs.push(-half + (2 * half * p) / (points - 1));
  const sample = (from: number, env: Float32Array, tMs: number, base: number, settled: number): number => {
    const i = Math.floor((tMs * sampleRate) / 1000);
    const x = (tMs * sampleRate) / 1000;
    const j = i - from;
    if (j < 0 || j + 1 >= env.length) return 0;
    const v = env[j]! + (env[j + 1]! - env[j]!) * (x - i);
    return (v - base) / (settled - base);
  };
  const rising: number[][] = [];
  const falling: number[][] = [];
  const every = Math.max(1, Math.ceil(snippets.length / maxEdges));
  snippets.forEach((s, k) => {
    if (k % every !== 0) return;
    rising.push(timeMs.map((t) => round4(sample(s.riseFrom, s.rise, s.riseAt50Ms + t, s.baseLevel, s.settledLevel))));
    falling.push(timeMs.map((t) => round4(sample(s.fallFrom, s.fall, s.fallAt50Ms + t, s.baseLevel, s.settledLevel))));
  });
  return { timeMs: timeMs.map(round4), rising, falling };
}

/**
 * Samples every measured edge on a common time axis around its 50 % crossing, for a persistence-style
 * overlay. At most `maxEdges` of each kind, `points` samples each.
 * @example traceEdges(env, 48000, analysis.marks, 10, 121).timeMs.length //=> 121
 */
export function traceEdges(env: Float32Array, sampleRate: number, marks: readonly MarkShape[], halfWindowMs: number, points = 121, maxEdges = 40): EdgeTraces {
  const snippets = marks.map((m) => edgeSnippet(env, sampleRate, m)).filter((x): x is EdgeSnippet => x !== null);
  return tracesFromSnippets(snippets, sampleRate, halfWindowMs, points, maxEdges);
}

function round4(x: number): number {
  return Math.round(x * 1e4) / 1e4;
}

export type EdgeKindEstimate = 'hard' | 'exponential' | 'linear' | 'raised-cosine-like' | 'unknown';

/**
 * Edge kind from the median normalised crossing times. Reference ratios [analytic]:
 * (t50 − t10)/(t90 − t10) is 0.5 for symmetric edges and 0.268 for a single-pole (RC) edge;
 * (t95 − t5)/(t90 − t10) is 1.125 for a linear ramp, 1.208 for a raised cosine, 1.340 for RC.
 * An edge not much slower than the envelope's own response (`resolutionMs`) is called hard.
 * @example classifyEdge({ rise10to90Ms: 5, asymmetry: 0.5, spread: 1.21 }, 0.2) //=> 'raised-cosine-like'
 */
export function classifyEdge(stats: { rise10to90Ms: number | null; asymmetry: number | null; spread: number | null }, resolutionMs: number): EdgeKindEstimate {
  const { rise10to90Ms, asymmetry, spread } = stats;
  if (rise10to90Ms === null || asymmetry === null || spread === null) return 'unknown';
  if (rise10to90Ms < Math.max(0.3, 2 * resolutionMs)) return 'hard';
  if (asymmetry < 0.38) return 'exponential';
  if (spread < 1.166) return 'linear';
  return 'raised-cosine-like';
}
