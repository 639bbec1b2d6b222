import { describe, expect, it } from 'vitest';
import { findTonePeak, totalPower, welchSpectrum } from '../../src/core/measure/spectrum.js';
import { addNoise } from '../../src/core/signal/noise.js';

/** A hard-keyed dot train made here (not by keyform's synthesizer): on for `unitSamples`, off as long. */
function dotTrain(sampleRate: number, toneHz: number, unitSamples: number, lengthSamples: number, amplitude = 0.5): Float32Array {
  const x = new Float32Array(lengthSamples);
  for (let n = 0; n < lengthSamples; n++) {
    const on = Math.floor(n / unitSamples) % 2 === 0 ? 1 : 0;
    x[n] = amplitude * on * Math.sin((2 * Math.PI * toneHz * n) / sampleRate);
  }
  return x;
}

const dbAt = (s: ReturnType<typeof welchSpectrum>, hz: number): number => 10 * Math.log10(s.binPower[Math.round(hz / s.binHz)]!);

describe('averaged spectrum (Welch, Hann, 75 % overlap)', () => {
  it('keeps Parseval: the bin powers add up to the time-domain mean power within 1 %', () => {
    // Parseval's theorem [analytic]: Σ|X_k|² = L·Σ|x_n|²; with 75 % overlap the Hann² weights sum to 1.5 everywhere.
    const fs = 8000;
    const x = dotTrain(fs, 700, 480, 40_000);
    addNoise(x, 0.01, 7);
    let timePower = 0;
    for (const v of x) timePower += v * v;
    timePower /= x.length;
    const s = welchSpectrum(x, fs, { segmentLength: 1024 });
    expect(Math.abs(totalPower(s) / timePower - 1)).toBeLessThan(0.01);
  });

  it('gives a sine of amplitude A the power A²/2', () => {
    const fs = 8000;
    const A = 0.3;
    const x = new Float32Array(32_000).map((_, n) => A * Math.sin((2 * Math.PI * 1234.5 * n) / fs));
    const s = welchSpectrum(x, fs, { segmentLength: 2048 });
    // Mean power of a sine [analytic]: A²/2.
    expect(totalPower(s)).toBeCloseTo((A * A) / 2, 4);
  });

  it('puts the nulls of a hard-keyed dot train at multiples of the keying rate (Fourier transform of a rectangular pulse)', () => {
    // A dot train with unit u is a square wave of period 2u times the carrier: its lines sit at odd
    // multiples of 1/(2u) from the carrier with power ∝ sinc²(f·u), which is zero at every multiple of
    // the keying rate B = 1/u [analytic: Fourier series of a 50 % duty rectangular pulse train].
    const fs = 8000;
    const L = 8192; // bin = 0.9765625 Hz
    const binHz = fs / L;
    const unitSamples = 512; // 64 ms, B = 15.625 Hz = 16 bins; lines every 8 bins
    const toneHz = 717 * binHz;
    const s = welchSpectrum(dotTrain(fs, toneHz, unitSamples, 160 * 1024), fs, { segmentLength: L });
    const B = fs / unitSamples;
    const carrier = dbAt(s, toneHz);
    for (const m of [1, 2, 3, 4]) {
      for (const side of [-1, 1]) {
        const nullDb = dbAt(s, toneHz + side * m * B);
        const lineDb = dbAt(s, toneHz + side * (m - 0.5) * B);
        expect(lineDb - nullDb).toBeGreaterThan(30);
      }
    }
    // Line powers: c0 = 1/2, |c_n|² = 1/(π n)² for odd n → first line −10·log10(4/π²) = −3.92 dB below the
    // carrier line, the third harmonic line a further 9.54 dB down (1/9) [analytic].
    expect(dbAt(s, toneHz + B / 2) - carrier).toBeCloseTo(10 * Math.log10(4 / Math.PI ** 2), 1);
    expect(dbAt(s, toneHz + (3 * B) / 2) - dbAt(s, toneHz + B / 2)).toBeCloseTo(10 * Math.log10(1 / 9), 1);
  });

  it('finds a tone between bins to a small fraction of a bin', () => {
    const fs = 48_000;
    const x = new Float32Array(96_000).map((_, n) => 0.5 * Math.sin((2 * Math.PI * 703.7 * n) / fs));
    const s = welchSpectrum(x, fs, { segmentLength: 8192 });
    expect(Math.abs(findTonePeak(s, 100, 5000)! - 703.7)).toBeLessThan(0.2 * s.binHz);
  });

  it('refuses a segment length that is not a power of two', () => {
    expect(() => welchSpectrum(new Float32Array(100), 8000, { segmentLength: 1000 })).toThrow(/power of two/);
  });
});
