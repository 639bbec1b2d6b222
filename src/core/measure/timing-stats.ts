/**
 * Small statistics helpers for the timing report: means, medians, spreads, a two-class split of
 * durations on a log scale, and a straight-line fit. Pure functions over plain number arrays.
 */

/** Arithmetic mean, or NaN for an empty list. @example mean([1, 2, 3]) //=> 2 */
export function mean(values: ArrayLike<number>): number {
  if (values.length === 0) return NaN;
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i]!;
  return s / values.length;
}

/**
 * The values sorted ascending, as a new Float64Array. A typed array sorts numerically without a
 * comparator; a comparator written inline would be a new function at every call, whose compiled
 * code the engine cannot keep from one recording to the next.
 */
export function sortedCopy(values: ArrayLike<number>): Float64Array {
  return Float64Array.from(values).sort();
}

/**
 * Quantile by linear interpolation between order statistics (the usual "type 7" definition).
 * @param q - Probability, 0…1.
 * @example quantile([1, 2, 3, 4], 0.5) //=> 2.5
 */
export function quantile(values: readonly number[], q: number): number {
  return quantileOfSorted(sortedCopy(values), q);
}

/** {@link quantile} of values already sorted ascending. @example quantileOfSorted([1, 2, 3, 4], 0.5) //=> 2.5 */
export function quantileOfSorted(s: ArrayLike<number>, q: number): number {
  if (s.length === 0) return NaN;
  const pos = (s.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return s[lo]! + (s[hi]! - s[lo]!) * (pos - lo);
}

/** Median. @example median([3, 1, 2]) //=> 2 */
export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}

/**
 * Mean of the values left after dropping a `fraction` of them at each end (20 % by default): robust
 * to a few outliers like the median, but without the median's pull towards one step of a coarse
 * time grid (edges quantised by a receiver).
 * @param fraction - Share dropped at each end, 0…0.49.
 * @example trimmedMean([1, 2, 3, 4, 100]) //=> 3 (drops 1 and 100)
 */
export function trimmedMean(values: readonly number[], fraction = 0.2): number {
  if (values.length === 0) return NaN;
  const s = sortedCopy(values);
  const k = Math.floor(s.length * fraction);
  return mean(s.subarray(k, s.length - k));
}

/** Sample standard deviation (n − 1 in the denominator); 0 for fewer than two values. @example standardDeviation([1, 3]) //=> 1.414… */
export function standardDeviation(values: readonly number[]): number {
  if (values.length < 2) return 0;
  const m = mean(values);
  let s = 0;
  for (const v of values) s += (v - m) * (v - m);
  return Math.sqrt(s / (values.length - 1));
}

export interface TwoClassSplit {
  /** Values below this belong to the lower class (the geometric midpoint between the two classes' nearest members). */
  threshold: number;
  /** Geometric means of the lower and upper class. */
  lowMean: number;
  highMean: number;
}

/**
 * Best split of positive durations into a shorter and a longer class: the threshold that minimises
 * the within-class variance of log(duration) (Otsu's criterion on a log scale). Returns null for
 * fewer than two distinct values.
 * @example splitTwoClasses([60, 62, 180, 185]).threshold //=> 105.6 (√(62·180))
 */
export function splitTwoClasses(values: readonly number[]): TwoClassSplit | null {
  const logs = sortedCopy(positiveLogs(values));
  const n = logs.length;
  if (n < 2 || logs[0] === logs[n - 1]) return null;
  const prefix = new Float64Array(n + 1);
  const prefix2 = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) {
    prefix[i + 1] = prefix[i]! + logs[i]!;
    prefix2[i + 1] = prefix2[i]! + logs[i]! * logs[i]!;
  }
  let best = Infinity;
  let bestK = -1;
  for (let k = 1; k < n; k++) {
    if (logs[k] === logs[k - 1]) continue;
    const sLo = prefix[k]!;
    const sHi = prefix[n]! - sLo;
    const within = prefix2[n]! - (sLo * sLo) / k - (sHi * sHi) / (n - k);
    if (within < best) {
      best = within;
      bestK = k;
    }
  }
  if (bestK < 0) return null;
  return {
    threshold: Math.exp((logs[bestK - 1]! + logs[bestK]!) / 2),
    lowMean: Math.exp(prefix[bestK]! / bestK),
    highMean: Math.exp((prefix[n]! - prefix[bestK]!) / (n - bestK)),
  };
}

/**
 * Least-squares straight line y = intercept + slope·x. With fewer than two distinct x the slope is 0.
 * @example fitLine([0, 1, 2], [1, 3, 5]) //=> { slope: 2, intercept: 1 }
 */
export function fitLine(xs: readonly number[], ys: readonly number[]): { slope: number; intercept: number } {
  const mx = mean(xs);
  const my = mean(ys);
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < xs.length; i++) {
    sxx += (xs[i]! - mx) * (xs[i]! - mx);
    sxy += (xs[i]! - mx) * (ys[i]! - my);
  }
  const slope = sxx > 0 ? sxy / sxx : 0;
  return { slope, intercept: my - slope * mx };
}

/** ln of the positive values, in order. */
function positiveLogs(values: readonly number[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < values.length; i++) if (values[i]! > 0) out.push(Math.log(values[i]!));
  return out;
}

/**
 * Runs the helpers once at load on a few values, with both kinds of array they are given (plain and
 * typed), so that every operation in them has been seen before the engine compiles them. Otherwise
 * the first call, on a recording's thousands of durations, is compiled in mid-loop without having
 * seen the code after the loop, and reaching that code sends it back to slow code (for mean, dozens
 * of times per recording) and has it compiled again; a batch worker paid that for every function on
 * its first recordings.
 */
function primeHelpers(): void {
  const fractions = [1, 2, 2, 4, 9.5];
  const integers = [1, 2, 2, 4, 9];
  const typed = Float64Array.from(fractions);
  // (Ten rounds: the engine starts recording what a function meets only after its first few calls.)
  for (let round = 0; round < 10; round++) {
    for (const plain of [fractions, integers]) {
      mean(plain);
      median(plain);
      quantile(plain, 0.5);
      trimmedMean(plain);
      standardDeviation(plain);
      splitTwoClasses(plain);
      fitLine(plain, plain);
    }
    mean(typed);
  }
}
primeHelpers();
