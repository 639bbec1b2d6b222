/**
 * First look at the keying: from a few seconds of complex baseband frames, find the unit length
 * (speed), the gap lengths and the signal and noise levels that the streaming stages start from.
 */

export interface TimingEstimate {
  /** Unit (dot) length [ms]. */
  unitMs: number;
  ditMs: number;
  dahMs: number;
  elementGapMs: number;
  /** Gap between letters [ms] (longer than 3 units with Farnsworth spacing). */
  letterGapMs: number;
  wordGapMs: number;
  /** Mean key-down power of one frame, carrier part only (|z|² units). */
  signalPow: number;
  /** Mean noise power of one frame (|z|² units). */
  noisePow: number;
  /** Number of marks the estimate rests on. */
  markCount: number;
  /** How well the runs fall on the unit grid, −0.5 (not at all) … 1 (all of them). */
  fit: number;
}

interface Run {
  on: boolean;
  start: number;
  length: number;
}

/** Candidate units: 20 ms (60 wpm) to 260 ms (below 5 wpm), 10 % apart. */
const CANDIDATE_UNITS_MS: number[] = (() => {
  const out: number[] = [];
  for (let u = 18; u <= 280; u *= 1.1) out.push(u);
  return out;
})();

/** Two-means (Otsu-style) threshold of a list of values. */
function twoMeans(values: Float64Array, n: number): { low: number; high: number; threshold: number } {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    min = Math.min(min, values[i]!);
    max = Math.max(max, values[i]!);
  }
  let t = (min + max) / 2;
  let low = min;
  let high = max;
  for (let iter = 0; iter < 20; iter++) {
    let s0 = 0, n0 = 0, s1 = 0, n1 = 0;
    for (let i = 0; i < n; i++) {
      const v = values[i]!;
      if (v < t) { s0 += v; n0++; } else { s1 += v; n1++; }
    }
    low = n0 ? s0 / n0 : min;
    high = n1 ? s1 / n1 : max;
    const next = (low + high) / 2;
    if (Math.abs(next - t) <= 1e-12 * (Math.abs(t) + 1e-30)) break;
    t = next;
  }
  return { low, high, threshold: t };
}

/** Slices a matched-filter envelope into runs with hysteresis and merges runs shorter than `minRun`. */
function slice(env: Float64Array, n: number, minRun: number): { runs: Run[]; low: number; high: number } {
  const { low, high, threshold } = twoMeans(env, n);
  const hyst = 0.1 * (high - low);
  const runs: Run[] = [];
  let on = env[0]! > threshold;
  let start = 0;
  for (let i = 1; i < n; i++) {
    const v = env[i]!;
    const next = on ? v > threshold - hyst : v > threshold + hyst;
    if (next !== on) {
      runs.push({ on, start, length: i - start });
      on = next;
      start = i;
    }
  }
  runs.push({ on, start, length: n - start });
  // Impulse rejection: an interior run shorter than minRun joins its neighbours.
  let changed = true;
  while (changed && runs.length > 2) {
    changed = false;
    // The first of the shortest interior runs under minRun (each comparison made for every run, so
    // that none is new to the engine when the first short run turns up).
    let shortest = -1;
    let shortestLength = minRun;
    for (let i = 1; i < runs.length - 1; i++) {
      const length = runs[i]!.length;
      if (length < shortestLength) {
        shortest = i;
        shortestLength = length;
      }
    }
    if (shortest > 0) {
      const prev = runs[shortest - 1]!;
      const next = runs[shortest + 1]!;
      prev.length += runs[shortest]!.length + next.length;
      runs.splice(shortest, 2);
      changed = true;
    }
  }
  return { runs, low, high };
}

const fit = (r: number, c: number): number => Math.exp(-((Math.log(r / c)) ** 2) / (2 * 0.2 * 0.2));

/**
 * Estimates speed, gaps and levels from complex baseband frames.
 *
 * For each candidate unit u (18…280 ms) the frames are integrated coherently over u (the matched
 * filter of a unit pulse), sliced between the two level clusters, runs shorter than 0.4·u are
 * rejected as impulses, and the run lengths are scored by how well marks fall on 1 and 3 units and
 * short gaps on 1 and 3 units (ITU-R M.1677-1 §2). The best-scoring u is refined from the runs.
 * @param re - Real parts of the frames.
 * @param im - Imaginary parts of the frames.
 * @param n - Number of frames to use.
 * @param frameMs - Frame length [ms], 0.5…20.
 * @returns The estimate, or null when fewer than two marks stand out of the noise.
 * @example estimateTiming(re, im, n, 2.5)?.unitMs //=> ≈ 60 for frames of 20 wpm keying
 */
export function estimateTiming(re: Float64Array, im: Float64Array, n: number, frameMs: number): TimingEstimate | null {
  return estimateTimingCandidates(re, im, n, frameMs, 1)[0] ?? null;
}

/**
 * Like estimateTiming, but returns the `count` best-scoring candidate speeds (best first, plus the
 * best of each speed octave), for a caller that can test each against the data (e.g. with the
 * sequence decoder's likelihood).
 * @param count - How many candidates at most, ≥ 1.
 * @example estimateTimingCandidates(re, im, n, 2.5, 6).map((c) => Math.round(c.unitMs)) //=> [60, 61, 27, …]
 */
export function estimateTimingCandidates(re: Float64Array, im: Float64Array, n: number, frameMs: number, count: number): TimingEstimate[] {
  const pr = new Float64Array(n + 1);
  const pi = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) {
    pr[i + 1] = pr[i]! + re[i]!;
    pi[i + 1] = pi[i]! + im[i]!;
  }
  const env = new Float64Array(n);
  const scored: { score: number; u: number; w: number; runs: Run[]; counted: number }[] = [];
  for (const u of CANDIDATE_UNITS_MS) {
    const w = Math.max(1, Math.round(u / frameMs));
    const m = n - w + 1;
    if (m < 8 * w) break;
    windowMagnitudes(pr, pi, w, m, env);
    const { runs, low, high } = slice(env, m, Math.max(1, 0.4 * w));
    if (!(high > 1.5 * low)) continue;
    const { score, marks, counted } = scoreRuns(runs, frameMs, u);
    if (marks < 2) continue;
    scored.push({ score, u, w, runs, counted });
  }
  // The best candidates overall, and the best of each octave of speed, so that a noisy pre-roll
  // that favours one range still leaves the others to be tested.
  const ranked = scored.filter((c) => c.score > 0).sort((a, b) => b.score - a.score);
  const chosen = ranked.slice(0, Math.max(1, count - 4));
  for (const [lo, hi] of [[0, 36], [36, 72], [72, 144], [144, Infinity]] as const) {
    const best = ranked.find((c) => c.u >= lo && c.u < hi);
    if (best && !chosen.includes(best)) chosen.push(best);
  }
  return chosen.slice(0, count).map((c) => refine(re, im, n, frameMs, c.u, c.w, c.runs, c.score / Math.max(1, c.counted)));
}

// The two loops of each candidate, as leaf functions: called for every candidate, they are compiled
// once, while a loop inside estimateTimingCandidates itself (which runs once per recording) would be
// compiled "on stack" again for every recording a batch worker reads.

/** |sum of w frames| for each window start k = 0…m−1, from the prefix sums pr, pi, into env. */
function windowMagnitudes(pr: Float64Array, pi: Float64Array, w: number, m: number, env: Float64Array): void {
  for (let k = 0; k < m; k++) {
    const dr = pr[k + w]! - pr[k]!;
    const di = pi[k + w]! - pi[k]!;
    env[k] = Math.sqrt(dr * dr + di * di);
  }
}

/** How well the inner runs of a slicing fit whole dots and dashes of unit u [ms]. */
function scoreRuns(runs: Run[], frameMs: number, u: number): { score: number; marks: number; counted: number } {
  let score = 0;
  let marks = 0;
  let counted = 0;
  for (let i = 1; i < runs.length - 1; i++) {
    const run = runs[i]!;
    const r = (run.length * frameMs) / u;
    if (run.on) marks++;
    else if (r >= 5) continue;
    const f = Math.max(fit(r, 1), fit(r, 3));
    score += f - 0.5 * (1 - f);
    counted++;
  }
  return { score, marks, counted };
}

/** Unit, gaps and levels from the runs of one candidate slicing. */
function refine(re: Float64Array, im: Float64Array, n: number, frameMs: number, u: number, w: number, runs: Run[], fit: number): TimingEstimate {
  // Refine from the runs that fall near a class.
  let sDit = 0, nDit = 0, sDah = 0, nDah = 0, sGap = 0, nGap = 0;
  const longGaps: number[] = [];
  for (let i = 1; i < runs.length - 1; i++) {
    const ms = runs[i]!.length * frameMs;
    const r = ms / u;
    if (runs[i]!.on) {
      if (r < 2) { sDit += ms; nDit++; } else { sDah += ms; nDah++; }
    } else if (r < 2) { sGap += ms; nGap++; } else longGaps.push(ms);
  }
  let unitMs: number;
  const pieces: number[] = [];
  if (nDit) pieces.push(sDit / nDit);
  if (nDah) pieces.push(sDah / nDah / 3);
  if (nGap) pieces.push(sGap / nGap);
  unitMs = pieces.length ? pieces.reduce((a, b) => a + b, 0) / pieces.length : u;
  const ditMs = nDit ? sDit / nDit : unitMs;
  const dahMs = nDah ? sDah / nDah : 3 * unitMs;
  const elementGapMs = nGap ? sGap / nGap : unitMs;
  const { letterGapMs, wordGapMs } = splitLongGaps(longGaps, unitMs);
  // Levels: frames well inside runs (the envelope of window k covers frames k…k+w−1).
  let sOn = 0, nOn = 0, sOff = 0, nOff = 0;
  const margin = Math.ceil(w / 4);
  for (const run of runs) {
    const a = run.start + Math.floor(w / 2) + margin;
    const b = run.start + run.length + Math.floor(w / 2) - margin;
    for (let k = Math.max(0, a); k < Math.min(n, b); k++) {
      const p = re[k]! * re[k]! + im[k]! * im[k]!;
      if (run.on) { sOn += p; nOn++; } else { sOff += p; nOff++; }
    }
  }
  const noisePow = nOff ? sOff / nOff : 0;
  const signalPow = Math.max((nOn ? sOn / nOn : 0) - noisePow, 0);
  const markCount = runs.filter((r) => r.on).length;
  return { unitMs, ditMs, dahMs, elementGapMs, letterGapMs, wordGapMs, signalPow, noisePow, markCount, fit };
}

/**
 * A copy of an estimate with other levels. Written out rather than spread ({ ...e }): the engine
 * spreads an object with fractional fields by first making those fields of its shape general ones,
 * which throws away code compiled for the shape (and boxes every later store to them).
 */
export function withLevels(e: TimingEstimate, signalPow: number, noisePow: number): TimingEstimate {
  return {
    unitMs: e.unitMs, ditMs: e.ditMs, dahMs: e.dahMs, elementGapMs: e.elementGapMs, letterGapMs: e.letterGapMs, wordGapMs: e.wordGapMs,
    signalPow, noisePow, markCount: e.markCount, fit: e.fit,
  };
}

/**
 * Splits gaps of two units or more into letter and word gaps. Farnsworth spacing stretches both in
 * the ratio 3 : 7 (QEX 1990), so two clusters about 2.3× apart are letter and word gaps; a single
 * cluster is letter gaps if short or numerous, else word gaps.
 * @param gapsMs - Gaps of two units or more [ms]. @param unitMs - Unit [ms].
 * @returns Letter and word gap [ms].
 * @example splitLongGaps([180, 185, 175, 420], 60) //=> { letterGapMs: ≈ 180, wordGapMs: 420 }
 */
export function splitLongGaps(gapsMs: number[], unitMs: number): { letterGapMs: number; wordGapMs: number } {
  if (gapsMs.length === 0) return { letterGapMs: 3 * unitMs, wordGapMs: 7 * unitMs };
  const logs = gapsMs.map((g) => Math.log(g)).sort((a, b) => a - b);
  let bestSplit = -1;
  let bestGain = 0;
  const total = logs.reduce((a, b) => a + b, 0);
  let left = 0;
  for (let i = 1; i < logs.length; i++) {
    left += logs[i - 1]!;
    const m0 = left / i;
    const m1 = (total - left) / (logs.length - i);
    const gain = i * (logs.length - i) * (m1 - m0) ** 2;
    if (m1 - m0 > Math.log(1.6) && gain > bestGain) {
      bestGain = gain;
      bestSplit = i;
    }
  }
  if (bestSplit > 0) {
    const letter = Math.exp(logs.slice(0, bestSplit).reduce((a, b) => a + b, 0) / bestSplit);
    const word = Math.exp(logs.slice(bestSplit).reduce((a, b) => a + b, 0) / (logs.length - bestSplit));
    return { letterGapMs: letter, wordGapMs: Math.max(word, 1.6 * letter) };
  }
  // One cluster. Below 5 units: letter gaps. Longer: three or more of them are stretched letter
  // gaps (Farnsworth spacing; letter gaps outnumber word gaps several times in plain text), one or
  // two are more likely standard word gaps.
  const mean = Math.exp(total / logs.length);
  if (mean < 5 * unitMs || logs.length >= 3) return { letterGapMs: mean, wordGapMs: Math.max(7 * unitMs, (7 / 3) * mean) };
  return { letterGapMs: Math.max(3 * unitMs, (3 / 7) * mean), wordGapMs: mean };
}
