/**
 * The edge analysis takes plateau and gap levels as medians, and the envelope's key-up and key-down
 * levels as 5th and 95th percentiles, found by selection rather than by sorting; they must equal the
 * same statistics of the sorted values (linear interpolation between order statistics), ties and all.
 */
import { describe, expect, it } from 'vitest';
import { medianOf, selectQuantile } from '../../src/core/measure/edges.js';
import { seededRandom } from '../../src/core/signal/noise.js';

function sortedMedian(values: Float32Array): number {
  const s = Array.from(values).sort((a, b) => a - b);
  const n = s.length;
  return n % 2 === 1 ? s[(n - 1) / 2]! : (s[n / 2 - 1]! + s[n / 2]!) / 2;
}

/** Linear interpolation between the order statistics around q·(n − 1) (the usual "type 7" quantile). */
function sortedPercentile(values: Float32Array, q: number): number {
  const s = Array.from(values).sort((a, b) => a - b);
  const x = q * (s.length - 1);
  const i = Math.floor(x);
  return s[i]! + (s[Math.min(s.length - 1, i + 1)]! - s[i]!) * (x - i);
}

describe('medianOf', () => {
  it('equals the median of the sorted values, for any length, ties included', () => {
    const random = seededRandom(17);
    let cases = 0;
    for (let t = 0; t < 3000; t++) {
      const n = 1 + Math.floor(random() * 80);
      const levels = 1 + Math.floor(random() * 12); // few distinct values: many ties
      const env = Float32Array.from({ length: n + 10 }, () => Math.floor(random() * levels) * 0.25);
      const i0 = Math.floor(random() * 5);
      const got = medianOf(env, i0, i0 + n);
      expect(got).toBeCloseTo(sortedMedian(env.subarray(i0, i0 + n)), 6);
      cases++;
    }
    expect(cases).toBe(3000);
    expect(medianOf(Float32Array.of(5, 1, 4, 2), 0, 4)).toBe(3);
    expect(medianOf(Float32Array.of(7), 0, 1)).toBe(7);
  });

  it('selectQuantile gives the 5th and 95th percentiles of the sorted values (the envelope levels)', () => {
    const random = seededRandom(23);
    for (let t = 0; t < 1000; t++) {
      const n = 1 + Math.floor(random() * 300);
      const a = Float32Array.from({ length: n }, () => (random() < 0.3 ? 0.01 * Math.floor(random() * 5) : random()));
      for (const q of [0.05, 0.5, 0.95]) expect(selectQuantile(a.slice(), q)).toBeCloseTo(sortedPercentile(a, q), 6);
    }
  });
});
