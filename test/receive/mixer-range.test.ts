/**
 * The mixer fed piece by piece (ranges of any length, starting mid-frame) must give the frames it
 * gives for the whole input at once, and a sine at the mixing tone must come out as frames of
 * magnitude a/2 (x·e^(−jωn) = (a/2)·e^(jθ) + (a/2)·e^(−j(2ωn+θ)); the boxcar averages the second term
 * away up to its image gain [analytic]).
 */
import { describe, expect, it } from 'vitest';
import { Mixer } from '../../src/core/receive/mixer.js';
import { seededRandom } from '../../src/core/signal/noise.js';

describe('Mixer.processRange', () => {
  it('gives the same frames in pieces of any length as in one call', () => {
    for (const [rate, tone, spf] of [[8000, 700, 20], [44100, 650, 110], [22050, 1000, 55]] as const) {
      const n = 5000;
      const random = seededRandom(rate);
      const x = new Float32Array(n);
      for (let i = 0; i < n; i++) x[i] = Math.sin((2 * Math.PI * tone * i) / rate) * 0.3 + (random() - 0.5) * 0.1;
      const whole = new Mixer(rate, tone, spf);
      const reA = new Float64Array(n);
      const imA = new Float64Array(n);
      const frames = whole.process(x, reA, imA);
      expect(frames).toBe(Math.floor(n / spf));

      const pieces = new Mixer(rate, tone, spf);
      const reB = new Float64Array(n);
      const imB = new Float64Array(n);
      let got = 0;
      for (let off = 0; off < n; ) {
        const len = 1 + Math.floor(random() * 3 * spf);
        const to = Math.min(n, off + len);
        got += pieces.processRange(x, off, to, reB.subarray(got), imB.subarray(got));
        off = to;
      }
      expect(got).toBe(frames);
      for (let f = 0; f < frames; f++) {
        expect(reB[f]!).toBeCloseTo(reA[f]!, 12);
        expect(imB[f]!).toBeCloseTo(imA[f]!, 12);
      }
    }
  });

  it('turns a sine at the tone into frames of magnitude a/2 (image gain taken out)', () => {
    const rate = 48000;
    const tone = 700;
    const spf = 120;
    const a = 0.4;
    const n = 48000;
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = a * Math.cos((2 * Math.PI * tone * i) / rate + 0.3);
    const m = new Mixer(rate, tone, spf);
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    const gr = new Float64Array(n);
    const gi = new Float64Array(n);
    const frames = m.processRange(x, 0, n, re, im, gr, gi);
    expect(frames).toBe(n / spf);
    for (let f = 0; f < frames; f += 37) {
      // c = (z − G·conj(z)) / (1 − |G|²) (see Mixer.process).
      const g2 = gr[f]! ** 2 + gi[f]! ** 2;
      const cr = (re[f]! - (gr[f]! * re[f]! + gi[f]! * im[f]!)) / (1 - g2);
      const ci = (im[f]! - (gi[f]! * re[f]! - gr[f]! * im[f]!)) / (1 - g2);
      expect(Math.hypot(cr, ci)).toBeCloseTo(a / 2, 5); // float32 samples: about 1e-7 relative
    }
  });
});
