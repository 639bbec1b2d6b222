/**
 * Wide complex envelope of a keyed tone for the shape analysis: the analytic signal (negative
 * frequencies removed) band-limited to the tone ± a few kHz, mixed down to 0 Hz. Its magnitude is
 * the keying envelope and its phase step the instantaneous frequency offset.
 *
 * The band filter is zero-phase and defined in the frequency domain (flat passband, raised-cosine
 * tapers); it is applied block by block (overlap-save), so memory is bounded by the block size plus
 * the output arrays. Deliberately much wider than a receiver's filter: a narrow filter lengthens
 * the edges it is asked to measure.
 */
import type FFT from 'fft.js';
import { fftOfSize } from '../signal/fft.js';
import { checkRange, InputError } from '../errors.js';

export interface BasebandOptions {
  /** Tone (carrier) frequency [Hz], above 0 and below sampleRate/2. */
  toneHz: number;
  /** Half-width of the pass band around the tone [Hz], 100…20000; default 4000. */
  halfBandHz?: number;
  /** Called with the fraction done (0…1). */
  onProgress?: (fraction: number) => void;
  /** Caller-owned arrays to write into (at least as long as the input; the result uses their first part), so a caller analysing stretch after stretch reuses one pair. */
  output?: { re: Float32Array; im: Float32Array };
}

export interface Baseband {
  /** In-phase part, one value per input sample. */
  re: Float32Array;
  /** Quadrature part. */
  im: Float32Array;
  /** Pass band actually used [Hz, absolute frequencies]: tone ± the half band, narrowed to stay clear of 0 Hz and sampleRate/2. */
  passBandHz: [lowHz: number, highHz: number];
  /** Width of the raised-cosine taper outside the pass band [Hz]. */
  taperHz: number;
  /** Smallest one-sided distance from the tone to a pass-band edge [Hz]. */
  narrowestSideHz: number;
}

function nextPow2(x: number): number {
  let p = 1;
  while (p < x) p *= 2;
  return p;
}

/**
 * Complex baseband of `samples` around `toneHz` (analytic signal mixed down), zero-phase.
 * @param samples - Real signal.
 * @param sampleRate - Sample rate [Hz], 1000…384000.
 * @returns re/im arrays the length of `samples`; |re + j·im| is the envelope in the input's units.
 * @example complexBaseband(sine700, 48000, { toneHz: 700 }).re[24000] //=> ≈ amplitude of the sine
 */
export function complexBaseband(samples: Float32Array, sampleRate: number, options: BasebandOptions): Baseband {
  checkRange('sample rate', sampleRate, 1000, 384_000, 'Hz');
  const toneHz = options.toneHz;
  if (!(toneHz > 0 && toneHz < sampleRate / 2)) {
    throw new InputError(`tone must be above 0 and below sampleRate/2 = ${sampleRate / 2} Hz (got ${toneHz})`);
  }
  const halfBandHz = checkRange('envelope half band', options.halfBandHz ?? 4000, 100, 20_000, 'Hz');
  const nyq = sampleRate / 2;
  const taperHz = Math.max(10, Math.min(200, 0.25 * toneHz, 0.25 * (nyq - toneHz)));
  // Symmetric about the tone: a symmetric band keeps an amplitude-modulated tone's baseband real,
  // so edges do not show up as false phase (chirp) excursions.
  const sideHz = Math.max(1, Math.min(halfBandHz, toneHz - taperHz, nyq - toneHz - taperHz));
  const lowHz = toneHz - sideHz;
  const highHz = toneHz + sideHz;
  const N0 = samples.length;
  const out = options.output;
  const re = out && out.re.length >= N0 && out.im.length >= N0 ? out.re.subarray(0, N0) : new Float32Array(N0);
  const im = out && out.re.length >= N0 && out.im.length >= N0 ? out.im.subarray(0, N0) : new Float32Array(N0);
  const result: Baseband = { re, im, passBandHz: [lowHz, highHz], taperHz, narrowestSideHz: Math.min(toneHz - lowHz, highHz - toneHz) };
  if (N0 === 0) return result;

  // The impulse response of a raised-cosine taper of width Δ has decayed far below 1e-4 after ~4/Δ s.
  const guard = nextPow2(Math.ceil((4 * sampleRate) / taperHz));
  const N = Math.max(1 << 15, 4 * guard);
  const step = N - 2 * guard;
  const gain = bandGain(N, sampleRate, lowHz, highHz, taperHz);
  const fft = fftOfSize(N);
  const frame = new Float64Array(N);
  const spec = fft.createComplexArray();
  const time = fft.createComplexArray();
  const w0 = (2 * Math.PI * toneHz) / sampleRate;
  const blocks = Math.ceil(N0 / step);
  let done = 0;
  for (let s = 0; s < N0; s += step) {
    filterBlock(samples, s, Math.min(N0, s + step), s - guard, { fft, frame, spec, time, gain, w0, re, im });
    done++;
    options.onProgress?.(done / blocks);
  }
  return result;
}

/**
 * Gain per FFT bin of complexBaseband's filter: 2 in lowHz…highHz (analytic signal: positive
 * frequencies doubled, negative ones removed), raised-cosine tapers of `taperHz` outside, 0 elsewhere.
 */
function bandGain(N: number, sampleRate: number, lowHz: number, highHz: number, taperHz: number): Float64Array {
  const gain = new Float64Array(N);
  for (let k = 1; k < N / 2; k++) {
    const f = (k * sampleRate) / N;
    let g = 0;
    if (f >= lowHz && f <= highHz) g = 1;
    else if (f < lowHz && f > lowHz - taperHz) g = 0.5 * (1 + Math.cos((Math.PI * (lowHz - f)) / taperHz));
    else if (f > highHz && f < highHz + taperHz) g = 0.5 * (1 + Math.cos((Math.PI * (f - highHz)) / taperHz));
    gain[k] = 2 * g;
  }
  return gain;
}

/**
 * One block of complexBaseband: FFT of samples[start…start+N) (zero outside), the band-pass gain,
 * inverse FFT, and the samples s…end mixed down into re/im. A function of its own, called once
 * per block, so that its compiled code is kept from one recording to the next.
 */
function filterBlock(
  samples: Float32Array,
  s: number,
  end: number,
  start: number,
  w: { fft: FFT; frame: Float64Array; spec: number[]; time: number[]; gain: Float64Array; w0: number; re: Float32Array; im: Float32Array },
): void {
  const { fft, frame, spec, time, gain, w0, re, im } = w;
  // Each loop in a function of its own (no code after a long loop that the compiler has not seen
  // run when it optimises the loop mid-way: that would send it back to slow code at every block).
  copyPadded(samples, start, frame);
  fft.realTransform(spec, frame);
  fft.completeSpectrum(spec);
  applyGain(spec, gain);
  fft.inverseTransform(time, spec);
  mixDown(time, s, end, start, w0, re, im);
}

/** frame[n] = samples[start + n], 0 outside the samples. */
function copyPadded(samples: Float32Array, start: number, frame: Float64Array): void {
  const N = frame.length;
  const N0 = samples.length;
  for (let n = 0; n < N; n++) {
    const i = start + n;
    frame[n] = i >= 0 && i < N0 ? samples[i]! : 0;
  }
}

/** Multiplies each complex bin k of spec by the real gain[k]. */
function applyGain(spec: number[], gain: Float64Array): void {
  for (let k = 0; k < gain.length; k++) {
    const g = gain[k]!;
    spec[2 * k] = spec[2 * k]! * g;
    spec[2 * k + 1] = spec[2 * k + 1]! * g;
  }
}

/** re/im[i] = time(i − start) · e^(−jω0·i) for i in s…end − 1. */
function mixDown(time: number[], s: number, end: number, start: number, w0: number, re: Float32Array, im: Float32Array): void {
  // e^{jω0 i} by rotation, one complex multiply per sample, with exact cos/sin every 256 samples
  // (the rotation's rounding, about 1e-16 per step, stays far below float32 in between).
  const stepC = Math.cos(w0);
  const stepS = Math.sin(w0);
  let c = 1;
  let sn = 0;
  for (let i = s; i < end; i++) {
    if (((i - s) & 255) === 0) {
      c = Math.cos(w0 * i);
      sn = Math.sin(w0 * i);
    }
    const m = i - start;
    const zr = time[2 * m]!;
    const zi = time[2 * m + 1]!;
    // z · e^{−jω0 i}
    re[i] = zr * c + zi * sn;
    im[i] = zi * c - zr * sn;
    const nc = c * stepC - sn * stepS;
    sn = sn * stepC + c * stepS;
    c = nc;
  }
}

/**
 * Magnitude |re + j·im| per sample: the keying envelope in the input's units.
 * @param out - Optional caller-owned array (at least as long as the baseband); its first part is returned.
 * @example magnitude(complexBaseband(sine700, 48000, { toneHz: 700 }))[24000] //=> ≈ the sine's amplitude
 */
export function magnitude(bb: Baseband, out?: Float32Array): Float32Array {
  const env = out && out.length >= bb.re.length ? out.subarray(0, bb.re.length) : new Float32Array(bb.re.length);
  for (let i = 0; i < env.length; i++) {
    const re = bb.re[i]!;
    const im = bb.im[i]!;
    env[i] = Math.sqrt(re * re + im * im); // float32 inputs: no overflow in double, and no allocation as in Math.hypot
  }
  return env;
}
