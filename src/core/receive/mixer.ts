import { FRACTIONAL_ZERO } from './fractional.js';

/**
 * Quadrature mixer and first decimation stage: multiplies the input by e^(−j·2π·toneHz·n/sampleRate)
 * and sums `samplesPerFrame` products into one complex frame (a boxcar, i.e. first-order CIC,
 * decimator). The oscillator is split in two: a table of e^(−jωn) for the n inside one frame, and
 * a phasor that advances once per frame, so each input sample costs two multiply-adds with no
 * dependency between samples. Everything after the mixer runs at the frame rate.
 */
/** Slots of Mixer.st. */
const P_RE = 0;
const P_IM = 1;
const STEP_RE = 2;
const STEP_IM = 3;
const ACC_RE = 4;
const ACC_IM = 5;
const IMG_RE = 6;
const IMG_IM = 7;

export class Mixer {
  readonly samplesPerFrame: number;
  private readonly tabRe: Float64Array;
  private readonly tabIm: Float64Array;
  /**
   * Running state, in one Float64Array:
   * [P_RE, P_IM] e^(−jω·n0) at the start of the current frame; [STEP_RE, STEP_IM] e^(−jω·samplesPerFrame),
   * the phasor's step per frame; [ACC_RE, ACC_IM] the current frame's sums so far; [IMG_RE, IMG_IM]
   * D = (1/n)·Σ e^(−j·2ω·m) over one frame, the boxcar's gain at the image (twice the tone).
   */
  private readonly st = new Float64Array(8);
  /** Samples summed into the current frame so far. */
  private count = 0;
  private toneHzValue = FRACTIONAL_ZERO;

  /**
   * @param sampleRate - Input sample rate [Hz].
   * @param toneHz - Mixing frequency [Hz], 0…sampleRate/2.
   * @param samplesPerFrame - Decimation factor (samples summed per frame), ≥ 1.
   * @example new Mixer(8000, 700, 20).process(sineAt700Hz, re, im) // frames of |z| = amplitude / 2
   */
  constructor(
    readonly sampleRate: number,
    toneHz: number,
    samplesPerFrame: number,
  ) {
    this.samplesPerFrame = Math.max(1, Math.round(samplesPerFrame));
    this.tabRe = new Float64Array(this.samplesPerFrame);
    this.tabIm = new Float64Array(this.samplesPerFrame);
    primeProcessRange();
    this.st[P_RE] = 1; // the phasor starts at e^0
    this.setTone(toneHz);
  }

  /** Current mixing frequency [Hz]. */
  get toneHz(): number {
    return this.toneHzValue;
  }

  /** Retunes the oscillator [Hz]; the phase stays continuous at the next frame boundary. */
  setTone(toneHz: number): void {
    this.toneHzValue = toneHz;
    const w = (2 * Math.PI * toneHz) / this.sampleRate;
    const n = this.samplesPerFrame;
    // By rotation (a complex multiply per entry, exact cos/sin every 32 entries): retuning is
    // frequent while the tone tracker follows a drift, and trigonometry per entry would cost
    // as much as mixing the samples.
    const cr = Math.cos(w);
    const ci = -Math.sin(w);
    let re = 1;
    let im = 0;
    for (let i = 0; i < n; i++) {
      if ((i & 31) === 0) {
        re = Math.cos(w * i);
        im = -Math.sin(w * i);
      }
      this.tabRe[i] = re;
      this.tabIm[i] = im;
      const nr = re * cr - im * ci;
      im = re * ci + im * cr;
      re = nr;
    }
    this.st[STEP_RE] = Math.cos(w * n);
    this.st[STEP_IM] = -Math.sin(w * n);
    // Geometric sum in closed form: (1 − e^(−j2ωn)) / (n·(1 − e^(−j2ω))), or 1 where 2ω is a multiple of 2π.
    const den = Math.sin(w);
    if (Math.abs(den) < 1e-12) {
      this.st[IMG_RE] = 1;
      this.st[IMG_IM] = 0;
    } else {
      const mag = Math.sin(w * n) / (n * den);
      this.st[IMG_RE] = mag * Math.cos(w * (n - 1));
      this.st[IMG_IM] = -mag * Math.sin(w * (n - 1));
    }
  }

  /**
   * Mixes a chunk; writes complete frames (sum / samplesPerFrame) to `outRe`/`outIm` from index 0
   * and returns how many were written. The arrays must hold ⌈chunk.length / samplesPerFrame⌉ + 1.
   * With `gainRe`/`gainIm`, also writes each frame's image gain G: a real carrier at the mixing
   * tone, a·cos(ωn + θ), gives the frame z = c + G·conj(c) with c = (a/2)·e^(jθ) (analytic: the
   * e^(−j(ωn+θ)) half lands at −2ω, where the boxcar does not null it), so
   * c = (z − G·conj(z)) / (1 − |G|²).
   */
  process(chunk: Float32Array, outRe: Float64Array, outIm: Float64Array, gainRe?: Float64Array, gainIm?: Float64Array): number {
    return this.processRange(chunk, 0, chunk.length, outRe, outIm, gainRe, gainIm);
  }

  /** As process, for chunk[from…to) (no subarray view to allocate per call). */
  processRange(chunk: Float32Array, from: number, to: number, outRe: Float64Array, outIm: Float64Array, gainRe?: Float64Array, gainIm?: Float64Array): number {
    const st = this.st;
    const n = this.samplesPerFrame;
    const tabRe = this.tabRe;
    const tabIm = this.tabIm;
    let re = st[ACC_RE]!;
    let im = st[ACC_IM]!;
    let count = this.count;
    let frames = 0;
    let i = from;
    const len = to;
    while (i < len) {
      const stop = Math.min(len, i + (n - count));
      // Four independent partial sums, so that the additions of neighbouring samples overlap
      // instead of each waiting for the one before (about twice as fast at 48 kHz).
      let re1 = 0, im1 = 0, re2 = 0, im2 = 0, re3 = 0, im3 = 0;
      for (; i + 3 < stop; i += 4, count += 4) {
        const x0 = chunk[i]!;
        const x1 = chunk[i + 1]!;
        const x2 = chunk[i + 2]!;
        const x3 = chunk[i + 3]!;
        re += x0 * tabRe[count]!;
        im += x0 * tabIm[count]!;
        re1 += x1 * tabRe[count + 1]!;
        im1 += x1 * tabIm[count + 1]!;
        re2 += x2 * tabRe[count + 2]!;
        im2 += x2 * tabIm[count + 2]!;
        re3 += x3 * tabRe[count + 3]!;
        im3 += x3 * tabIm[count + 3]!;
      }
      for (; i < stop; i++, count++) {
        const x = chunk[i]!;
        re += x * tabRe[count]!;
        im += x * tabIm[count]!;
      }
      re += re1 + re2 + re3;
      im += im1 + im2 + im3;
      if (count === n) {
        const pr = st[P_RE]!;
        const pi = st[P_IM]!;
        outRe[frames] = (re * pr - im * pi) / n;
        outIm[frames] = (re * pi + im * pr) / n;
        if (gainRe && gainIm) {
          // G = D·p², p = e^(−jω·n0) the phasor at the frame's first sample.
          const p2r = pr * pr - pi * pi;
          const p2i = 2 * pr * pi;
          gainRe[frames] = st[IMG_RE]! * p2r - st[IMG_IM]! * p2i;
          gainIm[frames] = st[IMG_RE]! * p2i + st[IMG_IM]! * p2r;
        }
        frames++;
        re = 0;
        im = 0;
        count = 0;
        let nr = pr * st[STEP_RE]! - pi * st[STEP_IM]!;
        let ni = pr * st[STEP_IM]! + pi * st[STEP_RE]!;
        const g = 1.5 - 0.5 * (nr * nr + ni * ni); // keep the phasor on the unit circle
        nr *= g;
        ni *= g;
        st[P_RE] = nr;
        st[P_IM] = ni;
      }
    }
    st[ACC_RE] = re;
    st[ACC_IM] = im;
    this.count = count;
    return frames;
  }
}

let primed = false;
/**
 * Runs processRange once over a few odd-length ranges (with and without image gains) on a small
 * mixer, so that every path of its loop has run before the engine optimises it. Otherwise a rarely
 * taken path (the last few samples of a block, the start in mid-frame) reached only after
 * optimisation sends the optimised loop back to slow code again and again, hundreds of times per
 * recording, boxing every intermediate number on the heap meanwhile.
 */
function primeProcessRange(): void {
  if (primed) return;
  primed = true;
  const m = new Mixer(8000, 700, 6);
  const x = new Float32Array(23).fill(0.5);
  const re = new Float64Array(8);
  const im = new Float64Array(8);
  for (let k = 0; k < 3; k++) {
    m.processRange(x, 1, 23, re, im, re, im);
    m.processRange(x, 0, 7, re, im);
    m.processRange(x, 2, 3, re, im, re, im);
  }
}
