import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { alignTimelines } from '../../src/core/measure/align.js';
import { measureTiming } from '../../src/core/measure/timing.js';
import { planKeying } from '../../src/core/timing/plan.js';
import type { Interval } from '../../src/core/timeline.js';

/** Any timeline: positive mark and gap lengths [ms]. */
const timeline = fc
  .array(fc.tuple(fc.double({ min: 1, max: 800, noNaN: true }), fc.double({ min: 1, max: 3000, noNaN: true })), { minLength: 1, maxLength: 120 })
  .map((pairs) => {
    const marks: Interval[] = [];
    let t = 0;
    for (const [len, gap] of pairs) {
      marks.push([t, t + len]);
      t += len + gap;
    }
    return marks;
  });

describe('timing report properties', () => {
  it('measures any timeline without failing, with counts that add up', () => {
    fc.assert(
      fc.property(timeline, (marks) => {
        const r = measureTiming({ marks });
        expect(r.unitMs).toBeGreaterThan(0);
        const m = r.histogram.marks.reduce((a, b) => a + b, 0) + r.histogram.marksOver;
        const g = r.histogram.gaps.reduce((a, b) => a + b, 0) + r.histogram.gapsOver;
        expect(m).toBe(marks.length);
        expect(g).toBe(marks.length - 1);
        const gaps = ['element', 'letter', 'word'] as const;
        expect(gaps.reduce((s, c) => s + (r.gapUnits[c]?.count ?? 0), 0)).toBe(marks.length - 1);
      }),
      { numRuns: 150, seed: 4 },
    );
  });

  it('accounts for every planned and observed element in any alignment', () => {
    const plan = planKeying('Q7ZKT DE Q3ABC', { wpm: 20 });
    fc.assert(
      fc.property(timeline, fc.double({ min: -5000, max: 5000, noNaN: true }), (marks, shiftMs) => {
        const observed = marks.map(([a, b]): Interval => [a + shiftMs, b + shiftMs]);
        const a = alignTimelines({ marks: observed }, plan);
        expect(a.matchedCount + a.missing.length).toBe(plan.elements.length);
        expect(a.matchedCount + a.extra.length).toBe(observed.length);
        expect(a.pass).toBe(a.missing.length === 0 && a.extra.length === 0 && a.maxErrorMs <= a.toleranceMs);
      }),
      { numRuns: 150, seed: 5 },
    );
  });
});
