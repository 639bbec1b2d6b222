/**
 * Averaged power spectrum (Welch's method) and tone finding for the keying-shape analysis.
 *
 * Window: periodic Hann, 75 % overlap. With that overlap the squared Hann windows of the four
 * segments covering any sample add up to exactly 1.5, so after zero-padding the record by
 * (segment − hop) at both ends every sample carries the same weight and the bin powers add up to
 * the record's mean power exactly (Parseval) [analytic].
 */
import type FFT from 'fft.js';
import { fftOfSize } from '../signal/fft.js';
import { checkRange, InputError } from '../errors.js';

/** Equivalent noise bandwidth of the Hann window, in bins [analytic: Σw² · L / (Σw)² = 1.5]. */
export const HANN_ENBW_BINS = 1.5;

export interface PowerSpectrum {
  sampleRate: number;
  /** Segment (FFT) length [samples], a power of two. */
  segmentLength: number;
  /** Bin spacing [Hz] = sampleRate / segmentLength. */
  binHz: number;
  /** Resolution (equivalent noise) bandwidth [Hz] = 1.5 · binHz for the Hann window. */
  rbwHz: number;
  /** Power in each one-sided bin 0…segmentLength/2 (mean-square units); the sum is the mean power. */
  binPower: Float64Array;
  /** Number of segments averaged. */
  segments: number;
}

/**
 * Hann window, periodic form: w[n] = sin²(π·n/L).
 * @param length - Window length [samples], ≥ 1.
 * @example hannWindow(4) //=> [0, 0.5, 1, 0.5]
 */
export function hannWindow(length: number): Float64Array {
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    const s = Math.sin((Math.PI * n) / length);
    w[n] = s * s;
  }
  return w;
}

/**
 * Power of two nearest (on a log scale) to `x`, within [minLength, maxLength].
 * @example nearestPowerOfTwo(7200) //=> 8192
 */
export function nearestPowerOfTwo(x: number, minLength = 64, maxLength = 1 << 20): number {
  const p = 2 ** Math.round(Math.log2(Math.max(1, x)));
  return Math.min(maxLength, Math.max(minLength, p));
}

/**
 * Segment length giving a resolution bandwidth near `rbwHz` with the Hann window.
 * @example segmentLengthForRbw(48000, 10) //=> 8192 (RBW 8.79 Hz)
 */
export function segmentLengthForRbw(sampleRate: number, rbwHz: number): number {
  return nearestPowerOfTwo((HANN_ENBW_BINS * sampleRate) / rbwHz);
}

export interface WelchOptions {
  /** FFT segment length [samples], a power of two, 64…1048576. */
  segmentLength: number;
  /** Called with the fraction done (0…1). */
  onProgress?: (fraction: number) => void;
}

/**
 * Averaged one-sided power spectrum of a real signal (Welch, Hann, 75 % overlap, zero-padded ends).
 * @param samples - The signal (any scale).
 * @param sampleRate - Sample rate [Hz], 1000…384000.
 * @returns Bin powers whose sum equals the mean of samples² (Parseval).
 * @example welchSpectrum(new Float32Array(4096).fill(1), 8000, { segmentLength: 256 }).binPower[0] //=> 1
 */
export function welchSpectrum(samples: Float32Array, sampleRate: number, options: WelchOptions): PowerSpectrum {
  checkRange('sample rate', sampleRate, 1000, 384_000, 'Hz');
  const L = options.segmentLength;
  if (!Number.isInteger(L) || L < 64 || L > 1 << 20 || (L & (L - 1)) !== 0) {
    throw new InputError(`segment length must be a power of two from 64 to 1048576 (got ${L})`);
  }
  const N = samples.length;
  if (N === 0) throw new InputError('no samples to analyse');
  const hop = L / 4;
  const w = hannWindow(L);
  const fft = fftOfSize(L);
  const frame = new Float64Array(L);
  const out = fft.createComplexArray();
  const acc = new Float64Array(L / 2 + 1);
  let segments = 0;
  const first = -(L - hop);
  const total = Math.ceil((N - first) / hop);
  for (let s = first; s < N; s += hop) {
    addSegment(samples, s, w, fft, frame, out, acc);
    segments++;
    if (options.onProgress && segments % 64 === 0) options.onProgress(Math.min(1, segments / total));
  }
  // Σ_seg Σ_k |X_k|² = L · Σ_seg Σ_n (w·x)² = 1.5 · L · Σ x²  →  mean power = that / (1.5 · L · N).
  const c = 1 / (1.5 * L * N);
  const binPower = new Float64Array(L / 2 + 1);
  for (let k = 0; k <= L / 2; k++) binPower[k] = acc[k]! * c * (k === 0 || k === L / 2 ? 1 : 2);
  options.onProgress?.(1);
  const binHz = sampleRate / L;
  return { sampleRate, segmentLength: L, binHz, rbwHz: HANN_ENBW_BINS * binHz, binPower, segments };
}

/**
 * Adds |FFT(window · samples[s…s+L))|² (zero outside the signal) to acc (L = window length, acc of
 * L/2 + 1 bins). The per-segment work in a function of its own: called many times, it is compiled
 * once and kept, where a loop inside welchSpectrum (called once per recording) would be compiled
 * again for every recording.
 * @example addSegment(x, 0, hannWindow(1024), new FFT(1024), new Float64Array(1024), fft.createComplexArray(), acc)
 */
export function addSegment(samples: Float32Array, s: number, w: Float64Array, fft: FFT, frame: Float64Array, out: number[], acc: Float64Array): void {
  const L = w.length;
  const N = samples.length;
  for (let n = 0; n < L; n++) {
    const i = s + n;
    frame[n] = i >= 0 && i < N ? samples[i]! * w[n]! : 0;
  }
  fft.realTransform(out, frame);
  for (let k = 0; k <= L / 2; k++) {
    const re = out[2 * k]!;
    const im = out[2 * k + 1]!;
    acc[k] = acc[k]! + re * re + im * im;
  }
}

/**
 * Frequency of the strongest spectral peak between `minHz` and `maxHz`, refined by fitting a
 * parabola to the log power of the peak bin and its neighbours.
 * @returns Tone frequency [Hz], or null when the band holds no power.
 * @example findTonePeak(welchSpectrum(tone700, 48000, { segmentLength: 8192 }), 100, 4000) //=> ≈ 700
 */
export function findTonePeak(spectrum: PowerSpectrum, minHz: number, maxHz: number): number | null {
  const { binPower, binHz } = spectrum;
  const k0 = Math.max(1, Math.ceil(minHz / binHz));
  const k1 = Math.min(binPower.length - 2, Math.floor(maxHz / binHz));
  let best = -1;
  let bestP = 0;
  for (let k = k0; k <= k1; k++) {
    if (binPower[k]! > bestP) {
      bestP = binPower[k]!;
      best = k;
    }
  }
  if (best < 0 || bestP <= 0) return null;
  const a = Math.log(binPower[best - 1]! + 1e-300);
  const b = Math.log(bestP);
  const c = Math.log(binPower[best + 1]! + 1e-300);
  const den = a - 2 * b + c;
  const delta = den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / den)) : 0;
  return (best + delta) * binHz;
}

/**
 * Total power of a spectrum (sum of bin powers; the mean square of the signal).
 * @example totalPower(welchSpectrum(sineOfAmplitude1, 8000, { segmentLength: 1024 })) //=> ≈ 0.5
 */
export function totalPower(spectrum: PowerSpectrum): number {
  let s = 0;
  for (const p of spectrum.binPower) s += p;
  return s;
}
