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

  it('gives bit for bit the frames of one call when a long input is copied into its memory in pieces, and through load/mixLoaded', () => {
    // Pieces end on frame boundaries (where the sample loop closes its partial sums anyway): a range
    // longer than the mixer holds gives exactly the frames a mixer holding it all would give, which
    // the per-slot ranges (load once, mixLoaded per slot) must reproduce too.
    const rate = 48000;
    const spf = 120;
    const n = 300_001;
    const random = seededRandom(5);
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = Math.sin((2 * Math.PI * 700 * i) / rate) * 0.3 + (random() - 0.5) * 0.2;
    const one = new Mixer(rate, 700, spf);
    expect(one.capacity).toBeLessThan(n);
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    const gr = new Float64Array(n);
    const gi = new Float64Array(n);
    const frames = one.processRange(x, 0, n, re, im, gr, gi);
    expect(frames).toBe(Math.floor(n / spf));
    // Reference: each frame summed the way the sample loop does (four partial sums from the frame's
    // start, then re + ((re1 + re2) + re3)), before the phasor and the 1/n: only its magnitude is
    // compared here, to the mixer's, since the phasor rotates it.
    const w = (2 * Math.PI * 700) / rate;
    for (const f of [0, 545, 546, 2499]) {
      let s0 = 0;
      let c0 = 0;
      for (let k = 0; k < spf; k++) {
        s0 += x[f * spf + k]! * Math.cos(w * k);
        c0 -= x[f * spf + k]! * Math.sin(w * k);
      }
      expect(Math.hypot(re[f]!, im[f]!)).toBeCloseTo(Math.hypot(s0, c0) / spf, 9);
    }
    const slots = new Mixer(rate, 700, spf);
    const block = 6 * spf;
    const piece = block * Math.floor(slots.capacity / block);
    let got = 0;
    for (let p0 = 0; p0 < n; p0 += piece) {
      const p1 = Math.min(n, p0 + piece);
      slots.load(x, p0, p1);
      for (let off = p0; off < p1; off += block) {
        const k = slots.mixLoaded(off - p0, Math.min(p1, off + block) - p0);
        for (let j = 0; j < k; j++) {
          expect(slots.frameRe[j]).toBe(re[got + j]);
          expect(slots.frameIm[j]).toBe(im[got + j]);
          expect(slots.frameGainRe[j]).toBe(gr[got + j]);
          expect(slots.frameGainIm[j]).toBe(gi[got + j]);
        }
        got += k;
      }
    }
    expect(got).toBe(frames);
    expect(() => slots.load(x, 0, slots.capacity + 1)).toThrow(RangeError);
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
