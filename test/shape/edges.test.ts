import { describe, expect, it } from 'vitest';
import { classifyEdge, measureEdges } from '../../src/core/measure/edges.js';
import { complexBaseband, magnitude } from '../../src/core/measure/shape-analytic.js';
import { addNoise } from '../../src/core/signal/noise.js';

type Shape = 'raised-cosine' | 'linear' | 'exponential';

/**
 * Edge shapes written out here from their formulas (independent of keyform's synthesizer), with their
 * analytic 10–90 % times for a transition parameter p (ramp length T, or RC time constant τ):
 * raised cosine ½(1 − cos(π t/T)) → T·(acos(−0.8) − acos(0.8))/π = 0.5903·T;
 * linear t/T → 0.8·T; single pole 1 − e^(−t/τ) → τ·ln 9 = 2.197·τ [analytic].
 */
const SHAPES: Record<Shape, { value: (t: number, p: number) => number; rise10to90: (p: number) => number }> = {
  'raised-cosine': {
    value: (t, T) => (t <= 0 ? 0 : t >= T ? 1 : 0.5 * (1 - Math.cos((Math.PI * t) / T))),
    rise10to90: (T) => (T * (Math.acos(-0.8) - Math.acos(0.8))) / Math.PI,
  },
  linear: { value: (t, T) => Math.min(1, Math.max(0, t / T)), rise10to90: (T) => 0.8 * T },
  exponential: { value: (t, tau) => (t <= 0 ? 0 : 1 - Math.exp(-t / tau)), rise10to90: (tau) => tau * Math.log(9) },
};

/** Marks of `markMs` every `periodMs`, each edge of the given shape; the fall mirrors the rise. */
function keyedTone(shape: Shape, p: number, fs: number, toneHz: number, markMs: number, periodMs: number, count: number): Float32Array {
  const total = Math.ceil(((count * periodMs + 200) * fs) / 1000);
  const x = new Float32Array(total);
  const f = SHAPES[shape].value;
  for (let n = 0; n < total; n++) {
    const tMs = (n * 1000) / fs - 100;
    const k = Math.floor(tMs / periodMs);
    let env = 0;
    if (k >= 0 && k < count) {
      const t = tMs - k * periodMs;
      // Rise from t = 0; fall starts at markMs and decays the same way (from the level reached).
      env = t < markMs ? f(t, p) : f(markMs, p) * (1 - f(t - markMs, p));
    }
    x[n] = 0.5 * env * Math.sin((2 * Math.PI * toneHz * n) / fs);
  }
  return x;
}

function medianRise(x: Float32Array, fs: number, toneHz: number): { rise: number; fall: number; analysis: ReturnType<typeof measureEdges> } {
  const analysis = measureEdges(magnitude(complexBaseband(x, fs, { toneHz })), fs);
  const med = (v: number[]): number => v.sort((a, b) => a - b)[Math.floor(v.length / 2)]!;
  const ok = analysis.marks.filter((m) => m.rise && m.fall);
  return { rise: med(ok.map((m) => m.rise!.rise10to90Ms)), fall: med(ok.map((m) => m.fall!.rise10to90Ms)), analysis };
}

describe('rise and fall 10–90 %', () => {
  // A tone of 5 kHz at 48 kHz leaves a ±4 kHz envelope band: a hard step reads about 0.1 ms through it.
  const fs = 48_000;
  const toneHz = 5000;
  for (const shape of ['raised-cosine', 'linear', 'exponential'] as const) {
    for (const riseMs of [1, 2, 5, 10]) {
      it(`measures ${riseMs} ms ${shape} edges within 3 % of the analytic 10–90 % time`, () => {
        const p = riseMs / SHAPES[shape].rise10to90(1); // transition parameter giving this 10–90 % time
        expect(SHAPES[shape].rise10to90(p)).toBeCloseTo(riseMs, 9);
        const x = keyedTone(shape, p, fs, toneHz, 100, 250, 4);
        const { rise, fall, analysis } = medianRise(x, fs, toneHz);
        expect(analysis.marks.length).toBe(4);
        expect(Math.abs(rise / riseMs - 1)).toBeLessThan(0.03);
        expect(Math.abs(fall / riseMs - 1)).toBeLessThan(0.03);
      });
    }
  }

  it('tells the edge kinds apart from their crossing times', () => {
    for (const shape of ['raised-cosine', 'linear', 'exponential'] as const) {
      const x = keyedTone(shape, 5 / SHAPES[shape].rise10to90(1), fs, toneHz, 100, 250, 3);
      const { analysis } = medianRise(x, fs, toneHz);
      const e = analysis.marks[1]!.rise!;
      const kind = classifyEdge({ rise10to90Ms: e.rise10to90Ms, asymmetry: e.levelTimesMs.p50 / e.rise10to90Ms, spread: (e.levelTimesMs.p95 - e.levelTimesMs.p5) / e.rise10to90Ms }, 0.1);
      expect(kind).toBe(shape === 'raised-cosine' ? 'raised-cosine-like' : shape);
    }
  });

  it('measures a 10 % overshoot after the rise', () => {
    // 5 ms linear ramp, then a half-sine bump of +10 % lasting 8 ms, then the settled level.
    const x = new Float32Array(Math.round(0.6 * fs));
    for (let n = 0; n < x.length; n++) {
      const t = (n * 1000) / fs - 100; // ms from key-down
      let env = 0;
      if (t >= 0 && t < 300) env = t < 6.25 ? t / 6.25 : t < 14.25 ? 1 + 0.1 * Math.sin((Math.PI * (t - 6.25)) / 8) : 1;
      else if (t >= 300 && t < 306.25) env = 1 - (t - 300) / 6.25;
      x[n] = 0.5 * env * Math.sin((2 * Math.PI * toneHz * n) / fs);
    }
    const { analysis } = medianRise(x, fs, toneHz);
    expect(analysis.marks).toHaveLength(1);
    expect(Math.abs(analysis.marks[0]!.overshootPct - 10)).toBeLessThan(0.5);
  });

  it('leaves out marks too short to settle, with a warning', () => {
    // 10 ms raised-cosine edges (ramp 16.9 ms) on 12 ms marks never reach a plateau.
    const x = keyedTone('raised-cosine', 10 / SHAPES['raised-cosine'].rise10to90(1), fs, toneHz, 12, 100, 3);
    const { analysis } = medianRise(x, fs, toneHz);
    expect(analysis.marks.every((m) => m.rise === null)).toBe(true);
    expect(analysis.warnings.join(' ')).toMatch(/too short/);
  });

  it('leaves out marks too noisy to measure, with a warning', () => {
    const x = keyedTone('raised-cosine', 5 / 0.5903, fs, toneHz, 100, 250, 3);
    addNoise(x, 0.25, 11);
    const analysis = measureEdges(magnitude(complexBaseband(x, fs, { toneHz })), fs);
    expect(analysis.warnings.join(' ')).toMatch(/too noisy|no clear key-down/);
  });
});
