import { describe, expect, it } from 'vitest';
import { measureShape } from '../../src/core/measure/shape.js';
import { planStretches, STRETCH_MS } from '../../src/core/measure/shape-windows.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import type { Interval } from '../../src/core/timeline.js';

describe('long recordings are analysed a stretch at a time', () => {
  const PAD_MS = 500;
  const plan = planKeying(Array.from({ length: 5 }, () => 'VVV Q7ZKT/B JO01').join(' '), { wpm: 18 });
  const marks: Interval[] = plan.marks.map(([a, b]) => [a + PAD_MS, b + PAD_MS]);

  it('cuts in key-up gaps, so no mark is split, and the stretches cover the recording without overlap', () => {
    const recordMs = plan.totalMs + 2 * PAD_MS;
    const st = planStretches(recordMs, marks);
    expect(st.length).toBe(Math.round(recordMs / STRETCH_MS));
    expect(st[0]!.keepFromMs).toBe(0);
    expect(st[st.length - 1]!.keepToMs).toBe(recordMs);
    for (let k = 1; k < st.length; k++) {
      const cut = st[k]!.keepFromMs;
      expect(st[k - 1]!.keepToMs).toBe(cut);
      expect(marks.some(([a, b]) => a <= cut && cut <= b)).toBe(false);
    }
  });

  it(`a ${Math.round(plan.totalMs / 1000)} s recording: every planned mark found once, rise within 3 % of the synthesized 5 ms`, () => {
    const fs = 8000;
    const x = synthesizeTone({ marks: plan.marks, sampleRate: fs, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: PAD_MS }).samples;
    addNoise(x, noiseSigmaForSnr(10 ** (-6 / 20), fs, 45), 2);
    const r = measureShape(x, fs, { toneHz: 700, findShortestRise: false });
    expect(r.marks.found).toBe(marks.length);
    // Each mark's 50 % key-down within 1 ms of the plan's: the ramp starts at the planned key-down and a raised
    // cosine of length T is half-way at T/2, with T = 5 ms / 0.5903 (its 10–90 % time is 0.5903·T) [analytic].
    const halfRampMs = 5 / ((Math.acos(-0.8) - Math.acos(0.8)) / Math.PI) / 2;
    r.perMark.forEach((m, i) => expect(Math.abs(m.startMs - (marks[i]![0] + halfRampMs))).toBeLessThan(1));
    expect(Math.abs(r.riseMs.median! / 5 - 1)).toBeLessThan(0.03);
    expect(r.edges.rising.length).toBeGreaterThan(10);
    expect(r.edges.rising.length).toBeLessThanOrEqual(40);
  });
});
