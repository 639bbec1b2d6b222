/**
 * Noise floor of a recording from its key-up stretches, so that bandwidth figures describe the
 * transmitter rather than the recording's noise.
 */
import type FFT from 'fft.js';
import { fftOfSize } from '../signal/fft.js';
import { addSegment, hannWindow, nearestPowerOfTwo } from './spectrum.js';

export interface NoiseDensity {
  /** Segment length used [samples]. */
  segmentLength: number;
  /** One-sided noise power density [mean-square units per Hz] per bin 0…segmentLength/2. */
  density: Float64Array;
  /** Number of key-up segments averaged (0: no estimate). */
  segments: number;
}

/**
 * Averages the power density of the key-up stretches (Hann, 75 % overlap, only segments wholly
 * inside a stretch), smoothed over 5 bins. White noise of variance σ² gives 2σ²/sampleRate [analytic].
 * @param quiet - Key-up stretches as [first, end) sample indices, already clear of the edges.
 * @param segmentLength - FFT length [samples], a power of two; by default about 20 ms.
 * @example noiseDensityFromGaps(noise, 48000, [[0, noise.length]]).density[100] //=> ≈ 2σ²/48000
 */
export function noiseDensityFromGaps(
  samples: Float32Array,
  sampleRate: number,
  quiet: ReadonlyArray<readonly [number, number]>,
  segmentLength = nearestPowerOfTwo(sampleRate * 0.02, 64, 1 << 14),
): NoiseDensity {
  const L = segmentLength;
  const hop = L / 4;
  const w = hannWindow(L);
  let sumW2 = 0;
  for (const x of w) sumW2 += x * x;
  const fft = fftOfSize(L);
  const frame = new Float64Array(L);
  const out = fft.createComplexArray();
  const acc = new Float64Array(L / 2 + 1);
  let segments = 0;
  for (const [a, b] of quiet) {
    for (let s = Math.max(0, a); s + L <= Math.min(b, samples.length); s += hop) {
      addSegment(samples, s, w, fft, frame, out, acc);
      segments++;
    }
  }
  const density = new Float64Array(L / 2 + 1);
  if (segments === 0) return { segmentLength: L, density, segments };
  const raw = new Float64Array(L / 2 + 1);
  for (let k = 0; k <= L / 2; k++) raw[k] = (2 * acc[k]!) / (segments * sumW2 * sampleRate);
  for (let k = 0; k <= L / 2; k++) {
    let s = 0;
    let n = 0;
    for (let j = Math.max(1, k - 2); j <= Math.min(L / 2 - 1, k + 2); j++) {
      s += raw[j]!;
      n++;
    }
    density[k] = n > 0 ? s / n : raw[k]!;
  }
  return { segmentLength: L, density, segments };
}

/**
 * Noise density at `hz` [mean-square units per Hz] (linear interpolation between bins).
 * @example densityAt(noiseDensityFromGaps(noise, 48000, [[0, noise.length]]), 48000, 700) //=> ≈ 2σ²/48000
 */
export function densityAt(noise: NoiseDensity, sampleRate: number, hz: number): number {
  const x = (hz * noise.segmentLength) / sampleRate;
  const i = Math.floor(x);
  if (i < 0) return noise.density[0]!;
  if (i + 1 >= noise.density.length) return noise.density[noise.density.length - 1]!;
  return noise.density[i]! + (noise.density[i + 1]! - noise.density[i]!) * (x - i);
}
