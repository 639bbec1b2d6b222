import { describe, expect, it } from 'vitest';
import { fitLine, median, quantile, splitTwoClasses, standardDeviation } from '../../src/core/measure/timing-stats.js';
import { bandedAlign } from '../../src/core/measure/timing-dp.js';

describe('timing statistics helpers', () => {
  it('computes quantiles, median and sample standard deviation by their definitions', () => {
    expect(quantile([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantile([1, 2, 3, 4], 0.25)).toBe(1.75); // (n − 1)·q = 0.75 between 1 and 2
    expect(median([5, 1, 3])).toBe(3);
    expect(standardDeviation([2, 4, 4, 4, 5, 5, 7, 9])).toBeCloseTo(Math.sqrt(32 / 7), 12); // Σ(x − 5)² = 32
  });

  it('splits dots from dashes at the geometric midpoint of the nearest members', () => {
    const s = splitTwoClasses([60, 62, 59, 180, 185, 178])!;
    expect(s.threshold).toBeCloseTo(Math.sqrt(62 * 178), 9);
    expect(s.lowMean).toBeCloseTo(Math.cbrt(60 * 62 * 59), 9);
    expect(splitTwoClasses([60, 60, 60])).toBeNull();
  });

  it('fits a straight line exactly through collinear points', () => {
    const { slope, intercept } = fitLine([0, 1, 2, 3], [1, 3, 5, 7]);
    expect(slope).toBeCloseTo(2, 12);
    expect(intercept).toBeCloseTo(1, 12);
  });

  it('aligns with the fewest skips when only some pairs are allowed', () => {
    const planned = ['a', 'b', 'c', 'd'];
    const observed = ['a', 'c', 'x', 'd'];
    const r = bandedAlign({
      n: observed.length,
      m: planned.length,
      center: (j) => j,
      pairCost: (i, j) => (observed[i] === planned[j] ? 0 : Infinity),
      skipCost: 1,
      band: 2,
    });
    expect(r.pairs).toEqual([0, -1, 1, 3]); // b missing, x extra
    expect(r.cost).toBe(2);
  });
});
