import { describe, expect, it } from 'vitest';
import { measureShape } from '../../src/core/measure/shape.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';

describe('chirp from the instantaneous phase', () => {
  const plan = planKeying('Q7ZKT Q7ZKT', { wpm: 20 });
  const base = { marks: plan.marks, sampleRate: 48_000, toneHz: 700, levelDb: -6, edge: 'raised-cosine' as const, riseMs: 5, padMs: 300 };

  it('reports a 30 Hz exponential pull at key-down within 10 %', () => {
    // The oscillator starts 30 Hz high at key-down and settles with a 10 ms time constant.
    const pull = (t: number): number => 30 * Math.exp(-Math.max(0, t) / 10);
    const tone = synthesizeTone({ ...base, chirp: pull });
    addNoise(tone.samples, noiseSigmaForSnr(10 ** (-6 / 20), 48_000, 40), 5);
    const r = measureShape(tone.samples, 48_000, { toneHz: 700, findShortestRise: false });
    expect(r.marks.measured).toBe(plan.marks.length);
    expect(Math.abs(r.chirpHz.median! / 30 - 1)).toBeLessThan(0.1);
    // The worst mark carries its own noise on top (about 2 Hz rms per 1 ms average at this SNR).
    expect(Math.abs(r.chirpHz.worst! / 30 - 1)).toBeLessThan(0.2);
  });

  it('reports the same pull without noise within 10 % on every mark', () => {
    const tone = synthesizeTone({ ...base, chirp: (t) => 30 * Math.exp(-Math.max(0, t) / 10) });
    const r = measureShape(tone.samples, 48_000, { toneHz: 700, findShortestRise: false });
    expect(Math.abs(r.chirpHz.median! / 30 - 1)).toBeLessThan(0.1);
    expect(Math.abs(r.chirpHz.worst! / 30 - 1)).toBeLessThan(0.1);
  });

  it('reports a pull downwards with its sign', () => {
    const tone = synthesizeTone({ ...base, chirp: (t) => -30 * Math.exp(-Math.max(0, t) / 10) });
    const r = measureShape(tone.samples, 48_000, { toneHz: 700, findShortestRise: false });
    expect(Math.abs(r.chirpHz.median! / -30 - 1)).toBeLessThan(0.1);
  });

  it('reports next to nothing for a clean tone', () => {
    const tone = synthesizeTone(base);
    const r = measureShape(tone.samples, 48_000, { findShortestRise: false });
    expect(Math.abs(r.chirpHz.worst!)).toBeLessThan(1);
  });
});
