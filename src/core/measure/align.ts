/**
 * Alignment of observed marks with the planned elements of the intended message: estimates and
 * removes the time offset between the two, pairs elements by dynamic programming (so one missing
 * or extra element does not shift every pairing after it), and reports each element's start and
 * length error. Pure: plain data in, plain data out.
 */
import { checkRange, InputError } from '../errors.js';
import type { Interval } from '../timeline.js';
import type { PlannedElement } from '../timing/plan.js';
import { bandedAlign, type BandedAlignResult } from './timing-dp.js';
import { checkMarks, measureTiming, type GapClass } from './timing.js';
import { median } from './timing-stats.js';

/** What the alignment needs of a plan: its unit and elements (a KeyingPlan fits). */
export interface PlanElements {
  /** Unit (dot) length [ms]. */
  unitMs: number;
  elements: readonly PlannedElement[];
  /** Character texts, indexed by each element's `charIndex` (optional, for labels). */
  characters?: readonly { text: string }[];
}

export interface AlignOptions {
  /** Largest allowed start or length error [% of a unit], 0…1000; default 10. */
  tolerancePct?: number;
  /** Use this offset (observed time − planned time) [ms] instead of estimating it. */
  offsetMs?: number;
}

export type ElementStatus = 'ok' | 'early' | 'late' | 'long' | 'short' | 'missing';

/** One planned element and what was observed for it. Errors are observed − planned. */
export interface AlignedElement {
  /** Index into the plan's elements. */
  index: number;
  kind: 'dit' | 'dah';
  charIndex: number;
  /** The character this element belongs to ('' when the plan has no character list). */
  char: string;
  plannedStartMs: number;
  plannedEndMs: number;
  /** Observed start and end on the plan's time scale (offset removed) [ms]; null when missing. */
  observedStartMs: number | null;
  observedEndMs: number | null;
  startErrorMs: number | null;
  lengthErrorMs: number | null;
  /** Errors in % of the planned unit. */
  startErrorPct: number | null;
  lengthErrorPct: number | null;
  /** `ok` within tolerance; otherwise the direction of the larger error, or `missing`. */
  status: ElementStatus;
}

/** An observed mark that matches no planned element. */
export interface ExtraElement {
  /** Index into the observed marks. */
  observedIndex: number;
  /** On the plan's time scale (offset removed) [ms]. */
  startMs: number;
  endMs: number;
  /** Index of the last planned element before it, −1 when it comes first. */
  afterElement: number;
}

export interface Alignment {
  /** Observed time − planned time [ms], removed before comparing. */
  offsetMs: number;
  unitMs: number;
  tolerancePct: number;
  toleranceMs: number;
  elements: AlignedElement[];
  /** Indices of planned elements with no observed mark. */
  missing: number[];
  extra: ExtraElement[];
  matchedCount: number;
  /** Largest absolute start or length error among matched elements [ms] and [% of a unit]. */
  maxErrorMs: number;
  maxErrorPct: number;
  /** Plan index of the element with the largest error, or null when nothing matched. */
  worstElement: number | null;
  /** RMS of the start errors and of the length errors of matched elements [ms]. */
  rmsStartErrorMs: number;
  rmsLengthErrorMs: number;
  /** Every element present, none extra, every error within tolerance. */
  pass: boolean;
}

/** Cost of leaving a planned or observed element unpaired, in units of edge error. */
const SKIP_COST = 2;
/** Half-width of the search band around the expected observed mark [elements]. */
const BAND = 32;

/** Index of the first value ≥ x in a sorted array. */
function lowerBound(sorted: ArrayLike<number>, x: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function nearestIndex(sorted: ArrayLike<number>, x: number): number {
  const k = lowerBound(sorted, x);
  if (k === 0) return 0;
  if (k >= sorted.length) return sorted.length - 1;
  return x - sorted[k - 1]! <= sorted[k]! - x ? k - 1 : k;
}

/**
 * Pairs observed marks with planned elements by edge times: planned element j is expected at its
 * planned times plus `shiftMs(j)` on the observed time base. Pairing costs the two edge errors in
 * units; leaving an element unpaired costs `SKIP_COST`.
 */
function pairByTime(obs: readonly Interval[], plan: readonly PlannedElement[], shiftMs: (j: number) => number, unit: number): BandedAlignResult {
  const starts = Float64Array.from(obs, (o) => o[0]);
  return bandedAlign({
    n: obs.length,
    m: plan.length,
    center: (j) => nearestIndex(starts, plan[j]!.startMs + shiftMs(j)),
    pairCost: (i, j) => {
      const d = shiftMs(j);
      const p = plan[j]!;
      const o = obs[i]!;
      const c = (Math.abs(o[0] - d - p.startMs) + Math.abs(o[1] - d - p.endMs)) / unit;
      return c < 2 * SKIP_COST ? c : Infinity;
    },
    skipCost: SKIP_COST,
    band: BAND,
  });
}

const GAP_MISMATCH: Record<GapClass, Record<GapClass, number>> = {
  element: { element: 0, letter: 0.5, word: 0.5 },
  letter: { element: 0.5, letter: 0, word: 0.25 },
  word: { element: 0.5, letter: 0.25, word: 0 },
};

/**
 * Pairs by symbols, ignoring absolute time: dot or dash, and the class of the gap after it. Survives
 * a speed different from the plan's, drift and stretched word gaps, where edge times drift apart.
 */
function pairBySymbols(obs: readonly Interval[], plan: readonly PlannedElement[], unit: number): number[] {
  const seen = measureTiming({ marks: obs }, { unitMsHint: unit }).elements;
  const meant = measureTiming({ marks: plan.map((p): Interval => [p.startMs, p.endMs]) }, { unitMsHint: unit }).elements;
  const n = obs.length;
  const m = plan.length;
  return bandedAlign({
    n,
    m,
    center: (j) => (j * n) / m,
    pairCost: (i, j) => {
      const a = seen[i]!;
      const b = meant[j]!;
      const gap = a.gapAfter === null || b.gapAfter === null ? 0 : GAP_MISMATCH[a.gapAfter][b.gapAfter];
      return (a.kind === plan[j]!.kind ? 0 : 1) + gap;
    },
    skipCost: 1,
    band: Math.max(BAND, Math.abs(n - m) + BAND),
  }).pairs;
}

/**
 * A smooth time map from symbol pairs: the running median (5 pairs) of observed − planned start,
 * interpolated linearly in planned time between paired elements. Null without pairs.
 */
function warpFromPairs(obs: readonly Interval[], plan: readonly PlannedElement[], pairs: readonly number[]): ((j: number) => number) | null {
  const js = pairs.flatMap((i, j) => (i >= 0 ? [j] : []));
  if (js.length === 0) return null;
  const d = js.map((j) => obs[pairs[j]!]![0] - plan[j]!.startMs);
  // Symmetric windows (narrower at the ends) so that a steady drift is not biased at the ends.
  const smooth = d.map((_, k) => {
    const half = Math.min(2, k, d.length - 1 - k);
    return median(d.slice(k - half, k + half + 1));
  });
  const shift = new Float64Array(plan.length);
  let k = 0;
  for (let j = 0; j < plan.length; j++) {
    while (k + 1 < js.length && js[k + 1]! <= j) k++;
    const j0 = js[k]!;
    if (j <= j0 || k + 1 >= js.length) shift[j] = smooth[k]!;
    else {
      const j1 = js[k + 1]!;
      const t0 = plan[j0]!.startMs;
      const t1 = plan[j1]!.startMs;
      const f = t1 > t0 ? (plan[j]!.startMs - t0) / (t1 - t0) : 0;
      shift[j] = smooth[k]! + f * (smooth[k + 1]! - smooth[k]!);
    }
  }
  return (j) => shift[j]!;
}

/** A first offset: the start difference under which most planned starts meet an observed start. */
function roughOffset(obs: readonly Interval[], plan: readonly PlannedElement[], unit: number): number {
  const starts = Float64Array.from(obs, (o) => o[0]);
  const k = Math.min(12, obs.length, plan.length);
  const candidates = new Set<number>();
  for (let a = 0; a < k; a++) {
    for (let b = 0; b < k; b++) {
      candidates.add(obs[a]![0] - plan[b]!.startMs);
      candidates.add(obs[obs.length - 1 - a]![0] - plan[plan.length - 1 - b]!.startMs);
    }
  }
  let best = 0;
  let bestHits = -1;
  let bestSum = Infinity;
  // Score on at most about 2000 planned elements, evenly spread, to bound the work on long logs.
  const step = Math.max(1, Math.floor(plan.length / 2000));
  for (const off of candidates) {
    let hits = 0;
    let sum = 0;
    for (let j = 0; j < plan.length; j += step) {
      const p = plan[j]!;
      const t = p.startMs + off;
      const d = Math.abs(starts[nearestIndex(starts, t)]! - t);
      if (d < 0.5 * unit) {
        hits++;
        sum += d;
      }
    }
    if (hits > bestHits || (hits === bestHits && sum < bestSum)) [best, bestHits, bestSum] = [off, hits, sum];
  }
  return best;
}

/**
 * Aligns observed marks with the planned elements of the intended message.
 *
 * @param observed - Observed key-down intervals `marks` [ms] on any time base (time order, not overlapping).
 * @param plan - The intended keying: unit [ms] and planned elements (a KeyingPlan from planKeying fits).
 * @param options - Tolerance [% of a unit] (default 10) and an optional fixed offset [ms].
 * @returns The offset removed, each planned element with its start and length error (ms and % of a
 *   unit), missing and extra elements, the largest error and a pass/fail verdict.
 * @example
 * const plan = planKeying('Q7ZKT', { wpm: 20 });
 * alignTimelines({ marks: plan.marks.map(([a, b]) => [a + 500, b + 500]) }, plan).offsetMs //=> 500
 */
export function alignTimelines(observed: { marks: readonly Interval[] }, plan: PlanElements, options: AlignOptions = {}): Alignment {
  checkMarks(observed.marks);
  if (plan.elements.length === 0) throw new InputError('the intended message has no elements');
  const unit = checkRange('plan unit', plan.unitMs, 1, 2000, 'ms');
  const tolerancePct = checkRange('tolerance', options.tolerancePct ?? 10, 0, 1000, '%');
  const obs = observed.marks;
  const elementsIn = plan.elements;

  const unpaired = (r: BandedAlignResult): number => {
    const paired = r.pairs.filter((i) => i >= 0).length;
    return elementsIn.length - paired + (obs.length - paired);
  };
  let pairs: number[];
  if (options.offsetMs !== undefined) {
    const fixed = checkRange('offset', options.offsetMs, -1e12, 1e12, 'ms');
    pairs = pairByTime(obs, elementsIn, () => fixed, unit).pairs;
  } else {
    // Candidate 1: one offset for the whole message, refined by the median start difference.
    let offset = roughOffset(obs, elementsIn, unit);
    let byOffset = pairByTime(obs, elementsIn, () => offset, unit);
    for (let round = 0; round < 3; round++) {
      const diffs = byOffset.pairs.flatMap((i, j) => (i >= 0 ? [obs[i]![0] - elementsIn[j]!.startMs] : []));
      if (diffs.length === 0 || median(diffs) === offset) break;
      offset = median(diffs);
      byOffset = pairByTime(obs, elementsIn, () => offset, unit);
    }
    pairs = byOffset.pairs;
    // Candidate 2: edge times against a time map that follows the observation (other speed,
    // drift, longer gaps). Candidate 3: the symbol pairs themselves, for timing too far from the
    // plan for edge times to pair. The fewest unpaired elements win; ties go to edge times.
    let best = unpaired(byOffset);
    // No alignment leaves fewer than |observed − planned| elements unpaired: one that does is kept.
    if (best > Math.abs(obs.length - elementsIn.length)) {
      const bySymbols = pairBySymbols(obs, elementsIn, unit);
      const warp = warpFromPairs(obs, elementsIn, bySymbols);
      if (warp !== null) {
        const byWarp = pairByTime(obs, elementsIn, warp, unit);
        const a = unpaired(byWarp);
        if (a < best || (a === best && byWarp.cost < byOffset.cost - 1e-9)) [pairs, best] = [byWarp.pairs, a];
      }
      if (unpaired({ pairs: bySymbols, cost: 0 }) < best) pairs = bySymbols;
    }
  }
  // The offset removed: given, or the median start difference of paired elements (robust to a few wrong starts).
  const diffs = pairs.flatMap((i, j) => (i >= 0 ? [obs[i]![0] - elementsIn[j]!.startMs] : []));
  const offsetMs = options.offsetMs ?? (diffs.length > 0 ? median(diffs) : 0);

  const toleranceMs = (tolerancePct / 100) * unit;
  const pct = (ms: number): number => (100 * ms) / unit;
  let maxErrorMs = 0;
  let worstElement: number | null = null;
  let sumStart2 = 0;
  let sumLen2 = 0;
  let matchedCount = 0;
  const missing: number[] = [];
  const elements: AlignedElement[] = elementsIn.map((p, j) => {
    const base = {
      index: j,
      kind: p.kind,
      charIndex: p.charIndex,
      char: plan.characters?.[p.charIndex]?.text ?? '',
      plannedStartMs: p.startMs,
      plannedEndMs: p.endMs,
    };
    const i = pairs[j]!;
    if (i < 0) {
      missing.push(j);
      return { ...base, observedStartMs: null, observedEndMs: null, startErrorMs: null, lengthErrorMs: null, startErrorPct: null, lengthErrorPct: null, status: 'missing' };
    }
    const s = obs[i]![0] - offsetMs;
    const e = obs[i]![1] - offsetMs;
    const startErrorMs = s - p.startMs;
    const lengthErrorMs = e - s - (p.endMs - p.startMs);
    matchedCount++;
    sumStart2 += startErrorMs * startErrorMs;
    sumLen2 += lengthErrorMs * lengthErrorMs;
    const worst = Math.max(Math.abs(startErrorMs), Math.abs(lengthErrorMs));
    if (worstElement === null || worst > maxErrorMs + 1e-9) [maxErrorMs, worstElement] = [worst, j]; // the first of equal errors
    let status: ElementStatus = 'ok';
    if (worst > toleranceMs) {
      status = Math.abs(startErrorMs) >= Math.abs(lengthErrorMs) ? (startErrorMs > 0 ? 'late' : 'early') : lengthErrorMs > 0 ? 'long' : 'short';
    }
    return {
      ...base,
      observedStartMs: s,
      observedEndMs: e,
      startErrorMs,
      lengthErrorMs,
      startErrorPct: pct(startErrorMs),
      lengthErrorPct: pct(lengthErrorMs),
      status,
    };
  });

  const pairedObs = new Set(pairs.filter((i) => i >= 0));
  const extra: ExtraElement[] = [];
  let lastPlanBefore = -1;
  const planOfObs = new Map<number, number>();
  pairs.forEach((i, j) => i >= 0 && planOfObs.set(i, j));
  obs.forEach(([a, b], i) => {
    if (pairedObs.has(i)) {
      lastPlanBefore = planOfObs.get(i)!;
      return;
    }
    // The last planned element that starts before this mark (on the plan's time scale).
    let after = lastPlanBefore;
    while (after + 1 < elementsIn.length && elementsIn[after + 1]!.startMs <= a - offsetMs) after++;
    extra.push({ observedIndex: i, startMs: a - offsetMs, endMs: b - offsetMs, afterElement: after });
  });

  return {
    offsetMs,
    unitMs: unit,
    tolerancePct,
    toleranceMs,
    elements,
    missing,
    extra,
    matchedCount,
    maxErrorMs,
    maxErrorPct: pct(maxErrorMs),
    worstElement,
    rmsStartErrorMs: matchedCount > 0 ? Math.sqrt(sumStart2 / matchedCount) : 0,
    rmsLengthErrorMs: matchedCount > 0 ? Math.sqrt(sumLen2 / matchedCount) : 0,
    pass: missing.length === 0 && extra.length === 0 && maxErrorMs <= toleranceMs,
  };
}
