/**
 * SNR estimate against known SNRs: keyform's definition is key-down carrier power over noise power
 * in a 2500 Hz bandwidth, which noiseSigmaForSnr implements (σ² = (a²/2)/SNR · (fs/2)/2500).
 */
import { describe, expect, it } from 'vitest';
import { decodeSamples } from '../../src/core/receive/index.js';
import { LogHistogram, SnrEstimator } from '../../src/core/receive/snr.js';
import { EDGE_KINDS } from '../../src/core/signal/edges.js';
import { addNoise, gaussianSource, noiseSigmaForSnr, seededRandom } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';

const AMP = 10 ** (-6 / 20);
const plan = planKeying('Q7ZKT DE Q3ABC TEST RST 599 NAME Q3ABC QTH', { wpm: 20 });

function estimate(edge: (typeof EDGE_KINDS)[number], sampleRate: number, snrDb: number, seed: number): number | null {
  const x = synthesizeTone({ marks: plan.marks, sampleRate, toneHz: 700, levelDb: -6, edge, riseMs: edge === 'hard' ? 0 : 5, padMs: 400 }).samples;
  addNoise(x, noiseSigmaForSnr(AMP, sampleRate, snrDb), seed);
  return decodeSamples(x, sampleRate).snrDb;
}

describe('SNR estimate', () => {
  for (const edge of EDGE_KINDS) {
    it(`reads the SNR it was given with ${edge} edges, −10 to +50 dB`, () => {
      for (const [sampleRate, snrDb] of [[8000, 0], [16000, 10], [8000, 20], [24000, 30]] as const) {
        expect(Math.abs(estimate(edge, sampleRate, snrDb, 40 + snrDb)! - snrDb)).toBeLessThan(1.5);
      }
      // Very clean: edge slots no longer cap the estimate (it used to read 22–34 dB here).
      for (const snrDb of [40, 50]) expect(Math.abs(estimate(edge, 16000, snrDb, 7)! - snrDb)).toBeLessThan(2);
      // Below the decoding threshold the marks are partly wrong, yet the level is still near.
      expect(Math.abs(estimate(edge, 8000, -10, 3)! - -10)).toBeLessThan(3);
    });
  }

  it('a noiseless recording has no SNR to report', () => {
    const x = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }).samples;
    expect(decodeSamples(x, 8000).snrDb).toBeNull();
  });

  it('median of exponential noise powers / ln 2 is their mean, and a few strong outliers barely move it', () => {
    // |z|² of complex Gaussian noise is exponential: median = ln 2 · mean [analytic].
    const g = gaussianSource(seededRandom(5));
    const e = new SnrEstimator();
    for (let i = 0; i < 20000; i++) e.addGap(0.5 * (g() ** 2 + g() ** 2)); // mean 1
    for (let i = 0; i < 1000; i++) e.addGap(1e4); // 5 % contaminated slots
    expect(e.noisePow()).toBeGreaterThan(0.97);
    expect(e.noisePow()).toBeLessThan(1.12);
    e.addMark(101);
    expect(10 * Math.log10(e.ratio()!)).toBeCloseTo(20, 0);
    const h = new LogHistogram();
    for (const v of [0, 1, 2, 3, 4]) h.add(v);
    expect(h.quantile(0.1)).toBe(0);
    expect(h.quantile(0.5)).toBeGreaterThan(1.98);
    expect(h.quantile(0.5)).toBeLessThan(2.02);
  });
});
