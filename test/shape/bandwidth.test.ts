import { describe, expect, it } from 'vitest';
import { bandwidthCode, emissionDesignator, necessaryBandwidthHz, occupiedBandwidth, xDbBandwidth } from '../../src/core/measure/bandwidth.js';
import { measureShape, predictShape, sweepRise } from '../../src/core/measure/shape.js';
import { welchSpectrum } from '../../src/core/measure/spectrum.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { modulationRateBaud } from '../../src/core/timing/speed.js';

describe('necessary bandwidth and designator (ITU-R SM.1138)', () => {
  it("reproduces the Recommendation's worked example: B = 20 baud, K = 5 → 100 Hz, 100HA1AAN", () => {
    // ITU-R SM.1138 (A1A telegraphy): 25 words per minute, B = 20, K = 5 → Bn = 100 Hz, designator 100HA1AAN.
    const B = 0.8 * 25; // the Recommendation's traditional conversion B ≈ 0.8 × wpm
    expect(B).toBe(20);
    expect(necessaryBandwidthHz(B, 5)).toBe(100);
    expect(emissionDesignator(necessaryBandwidthHz(B, 5))).toBe('100HA1AAN');
  });

  it('uses K = 3 for a non-fading circuit', () => {
    // ITU-R SM.1138: K = 3 for non-fading circuits.
    expect(necessaryBandwidthHz(20, 3)).toBe(60);
  });

  it('writes bandwidths with three figures and the unit letter for the decimal point', () => {
    // Radio Regulations Appendix 1 (examples 400H and 2K40 in REFERENCES.md; 25H3, H100 and 12K5 from memory).
    expect(bandwidthCode(400)).toBe('400H');
    expect(bandwidthCode(2400)).toBe('2K40');
    expect(bandwidthCode(25.3)).toBe('25H3');
    expect(bandwidthCode(0.1)).toBe('H100');
    expect(bandwidthCode(12_500)).toBe('12K5');
    expect(bandwidthCode(83.333)).toBe('83H3');
    expect(bandwidthCode(999.7)).toBe('1K00');
  });

  it('takes B from the PARIS unit: 20 wpm → 60 ms → 16.67 baud', () => {
    // PARIS: unit = 1200 / wpm ms, B = 1 / unit = wpm / 1.2 (REFERENCES.md, Speed).
    const r = predictShape({ wpm: 20, riseMs: 5, edge: 'raised-cosine', findShortestRise: false });
    expect(r.speed.unitMs).toBe(60);
    expect(r.speed.modulationRateBaud).toBeCloseTo(20 / 1.2, 3);
    expect(r.necessaryBandwidthHz).toBeCloseTo((5 * 20) / 1.2, 2);
    expect(r.designator).toBe('83H3A1AAN');
  });

  it('keeps the character speed\'s unit under Farnsworth spacing (c = 18, s = 5 → 15 baud)', () => {
    // Bloom, QEX April 1990: characters keep unit = 1200/c ms; only the gaps stretch. So B = c / 1.2.
    const r = predictShape({ wpm: 18, farnsworthWpm: 5, riseMs: 5, edge: 'raised-cosine', text: 'PARIS', findShortestRise: false });
    expect(r.speed.modulationRateBaud).toBeCloseTo(15, 3);
    expect(r.necessaryBandwidthHz).toBeCloseTo(75, 2);
    // The same figure measured from a recording with Farnsworth spacing (unit from the marks and element gaps).
    const plan = planKeying('Q7ZKT PARIS', { wpm: 18, farnsworthWpm: 5 });
    const tone = synthesizeTone({ marks: plan.marks, sampleRate: 16_000, toneHz: 800, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 200 });
    const m = measureShape(tone.samples, 16_000, { findShortestRise: false });
    expect(Math.abs(m.speed.modulationRateBaud! / modulationRateBaud(1200 / 18) - 1)).toBeLessThan(0.02);
  });
});

describe('occupied bandwidth (ITU-R SM.328: 0.5 % of the power outside each edge)', () => {
  it('gives 99 % of the width of a flat band', () => {
    const n = 201;
    const offsetHz = Float64Array.from({ length: n }, (_, i) => (i - 100) * 10);
    const power = new Float64Array(n).fill(1);
    // Flat from −1005 to +1005 Hz: leaving 0.5 % of 2010 Hz out on each side [analytic].
    expect(occupiedBandwidth({ offsetHz, power, binHz: 10 })!.widthHz).toBeCloseTo(0.99 * 2010, 6);
  });

  it('matches the Fourier series of a hard-keyed dot train', () => {
    // Dot train with unit u (square-wave keying, 50 % duty): carrier line power ∝ 1/4 and lines at odd
    // multiples n of 1/(2u) with power ∝ 1/(π n)² on each side [analytic: Fourier series]. Within the
    // analysed span, walk in from the outermost line until 0.5 % of the in-span total is left out per side.
    const fs = 16_000;
    const unitSamples = 1024; // 64 ms: B = 15.625 Hz, lines every B/2 = 7.8125 Hz
    const B = fs / unitSamples;
    const toneHz = 4000;
    const spanHz = 3500;
    const nMax = Math.floor(spanHz / (B / 2)) | 1;
    let total = 0.25;
    for (let n = 1; n <= nMax; n += 2) total += 2 / (Math.PI * n) ** 2;
    let outside = 0;
    let n = nMax;
    while (outside + 1 / (Math.PI * n) ** 2 <= 0.005 * total) {
      outside += 1 / (Math.PI * n) ** 2;
      n -= 2;
    }
    const expectedHz = 2 * n * (B / 2); // the band edge falls on line n on each side
    const x = new Float32Array(240 * 1024);
    for (let i = 0; i < x.length; i++) x[i] = (Math.floor(i / unitSamples) % 2 === 0 ? 1 : 0) * Math.sin((2 * Math.PI * toneHz * i) / fs);
    const s = welchSpectrum(x, fs, { segmentLength: 16_384 });
    const k0 = Math.round((toneHz - spanHz) / s.binHz);
    const k1 = Math.round((toneHz + spanHz) / s.binHz);
    const offsetHz = Float64Array.from({ length: k1 - k0 + 1 }, (_, j) => (k0 + j) * s.binHz - toneHz);
    const power = s.binPower.slice(k0, k1 + 1);
    const obw = occupiedBandwidth({ offsetHz, power, binHz: s.binHz })!;
    // Within one line spacing of the Fourier-series figure (each edge lands inside the line's main lobe).
    expect(Math.abs(obw.widthHz - expectedHz)).toBeLessThan(B);
  });

  it('falls monotonically as the rise time grows', () => {
    const sweep = sweepRise({ wpm: 20, edge: 'raised-cosine', risesMs: [1, 2, 3, 5, 8, 12] });
    const obw = sweep.rows.map((r) => r.occupiedBandwidthHz!);
    for (let i = 1; i < obw.length; i++) expect(obw[i]!).toBeLessThan(obw[i - 1]!);
    const at40 = sweep.rows.map((r) => r.at40DbcHz!);
    for (let i = 1; i < at40.length; i++) expect(at40[i]!).toBeLessThan(at40[i - 1]!);
  });
});

describe('x-dB bandwidth', () => {
  it('interpolates the band edges in dB between bins', () => {
    const offsetHz = [-300, -200, -100, 0, 100, 200, 300];
    const dbc = [-80, -50, -30, 0, -30, -50, -80];
    const r = xDbBandwidth(offsetHz, dbc, 40);
    expect(r.lowerHz).toBeCloseTo(-150, 9);
    expect(r.upperHz).toBeCloseTo(150, 9);
    expect(r.widthHz).toBeCloseTo(300, 9);
  });

  it('says so when the level is not reached inside the span', () => {
    const r = xDbBandwidth([-100, 0, 100], [-30, 0, -30], 40);
    expect(r.widthHz).toBeNull();
    expect(r.basis).toBe('beyond the span');
  });
});
