import { describe, expect, it } from 'vitest';
import { measureShape } from '../../src/core/measure/shape.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';

describe('occupied bandwidth measures the transmitter, not the recording noise', () => {
  const plan = planKeying('Q7ZKT TEST Q7ZKT', { wpm: 20 });
  for (const [edge, riseMs] of [['raised-cosine', 5], ['hard', 0]] as const) {
    it(`${edge} keying at 40 dB SNR: the noise-corrected 99 % band matches the noise-free one within 1 %`, () => {
      const fs = 16_000;
      const s = synthesizeTone({ marks: plan.marks, sampleRate: fs, toneHz: 1000, levelDb: -6, edge, riseMs, padMs: 500 });
      const clean = measureShape(s.samples, fs, { toneHz: 1000, findShortestRise: false });
      const noisy = Float32Array.from(s.samples);
      // 40 dB key-down carrier-to-noise in 2500 Hz (keyform's SNR convention, src/core/signal/noise.ts).
      addNoise(noisy, noiseSigmaForSnr(10 ** (-6 / 20), fs, 40), 3);
      const r = measureShape(noisy, fs, { toneHz: 1000, findShortestRise: false });
      expect(r.noiseCorrection.applied).toBe(true);
      expect(Math.abs(r.occupiedBandwidthHz! / clean.occupiedBandwidthHz! - 1)).toBeLessThan(0.01);
      // Without the correction the figure is wider, as the issue expects of a naive figure (2–37 %).
      const naiveExcess = r.noiseCorrection.uncorrectedHz! / clean.occupiedBandwidthHz! - 1;
      expect(naiveExcess).toBeGreaterThan(0.015);
      expect(naiveExcess).toBeLessThan(0.37);
      expect(r.noiseCorrection.correctionPct!).toBeCloseTo((100 * (r.noiseCorrection.uncorrectedHz! - r.occupiedBandwidthHz!)) / r.occupiedBandwidthHz!, 0);
      // Noise per bin: σ²·binHz/(fs/2) against the carrier's strongest bin [analytic]; just check it is reported and plausible.
      expect(r.spectrum.noiseFloorDbc!).toBeLessThan(-50);
      expect(r.spectrum.noiseFloorDbc!).toBeGreaterThan(-70);
    });
  }
});
