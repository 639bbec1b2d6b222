/**
 * Alignment of observed marks with the planned elements of the intended message: estimates and
 * removes the time offset between the two, pairs elements by dynamic programming (so one missing
 * or extra element does not shift every pairing after it), and reports each element's start and
 * length error. Pure: plain data in, plain data out.
 */
import { checkRange, InputError } from '../errors.js';
import type { Interval } from '../timeline.js';
import type { PlannedElement } from '../timing/plan.js';
import { checkMarks } from './timing.js';
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
/** Half-width of the search band around the time-nearest observed mark [elements]. */
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
 * Pairs observed marks with planned elements by dynamic programming (edit distance with timing
 * costs): pairing costs the edge errors in units, leaving an element unpaired costs `SKIP_COST`.
 * Works in a band around the time-nearest mark, so memory grows with the message, not its square.
 * @returns For each planned element, the index of its observed mark or −1.
 */
function pairElements(obs: readonly Interval[], plan: readonly PlannedElement[], offsetMs: number, unit: number): number[] {
  const n = obs.length;
  const m = plan.length;
  const starts = Float64Array.from(obs, (o) => o[0] - offsetMs);
  // Row j = plan elements consumed; column i = observed marks consumed; row j covers i in [lo[j], hi[j]].
  const lo = new Int32Array(m + 1);
  const hi = new Int32Array(m + 1);
  for (let j = 1; j <= m; j++) {
    const c = nearestIndex(starts, plan[j - 1]!.startMs) + 1;
    lo[j] = Math.max(0, c - BAND);
    hi[j] = Math.min(n, c + BAND);
  }
  lo[0] = 0;
  hi[0] = Math.min(n, BAND);
  hi[m] = n;
  for (let j = m - 1; j >= 0; j--) lo[j] = Math.min(lo[j]!, lo[j + 1]!);
  for (let j = 1; j <= m; j++) hi[j] = Math.max(hi[j]!, hi[j - 1]!);
  for (let j = m - 1; j >= 0; j--) hi[j] = Math.max(hi[j]!, lo[j + 1]!);

  const cost: Float64Array[] = [];
  const from: Uint8Array[] = []; // 1 pair, 2 missing (up), 3 extra (left)
  const at = (j: number, i: number): number => (i < lo[j]! || i > hi[j]! ? Infinity : cost[j]![i - lo[j]!]!);
  for (let j = 0; j <= m; j++) {
    const width = hi[j]! - lo[j]! + 1;
    const row = new Float64Array(width);
    const back = new Uint8Array(width);
    for (let i = lo[j]!; i <= hi[j]!; i++) {
      let best = j === 0 && i === 0 ? 0 : Infinity;
      let how = 0;
      if (j > 0 && i > 0) {
        const p = plan[j - 1]!;
        const o = obs[i - 1]!;
        const pairCost = (Math.abs(o[0] - offsetMs - p.startMs) + Math.abs(o[1] - offsetMs - p.endMs)) / unit;
        if (pairCost < 2 * SKIP_COST) {
          const c = at(j - 1, i - 1) + pairCost;
          if (c < best) [best, how] = [c, 1];
        }
      }
      if (j > 0) {
        const c = at(j - 1, i) + SKIP_COST;
        if (c < best) [best, how] = [c, 2];
      }
      if (i > lo[j]!) {
        const c = row[i - 1 - lo[j]!]! + SKIP_COST;
        if (c < best) [best, how] = [c, 3];
      }
      row[i - lo[j]!] = best;
      back[i - lo[j]!] = how;
    }
    cost.push(row);
    from.push(back);
  }
  const pairs = new Array<number>(m).fill(-1);
  let j = m;
  let i = n;
  while (j > 0 || i > 0) {
    const how = from[j]![i - lo[j]!]!;
    if (how === 1) {
      pairs[j - 1] = i - 1;
      j--;
      i--;
    } else if (how === 2) j--;
    else if (how === 3) i--;
    else throw new Error('alignment backtrack left its band'); // cannot happen: bands are connected
  }
  return pairs;
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
  for (const off of candidates) {
    let hits = 0;
    let sum = 0;
    for (const p of plan) {
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

  let offsetMs: number;
  let pairs: number[];
  if (options.offsetMs !== undefined) {
    offsetMs = checkRange('offset', options.offsetMs, -1e12, 1e12, 'ms');
    pairs = pairElements(obs, elementsIn, offsetMs, unit);
  } else {
    offsetMs = roughOffset(obs, elementsIn, unit);
    pairs = pairElements(obs, elementsIn, offsetMs, unit);
    // Refine: the median start difference of paired elements (robust to a few wrong starts).
    for (let round = 0; round < 3; round++) {
      const diffs = pairs.flatMap((i, j) => (i >= 0 ? [obs[i]![0] - elementsIn[j]!.startMs] : []));
      if (diffs.length === 0) break;
      const next = median(diffs);
      if (next === offsetMs) break;
      offsetMs = next;
      pairs = pairElements(obs, elementsIn, offsetMs, unit);
    }
  }

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
    if (worstElement === null || worst > maxErrorMs) [maxErrorMs, worstElement] = [worst, j];
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
