import { describe, expect, it } from 'vitest';
import { measureShape, predictShape } from '../../src/core/measure/shape.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { shapeSvg } from '../../src/io/svg.js';

describe('shape plot (SVG)', () => {
  const report = predictShape({ wpm: 20, riseMs: 5, edge: 'raised-cosine', findShortestRise: false });
  const svg = shapeSvg(report);

  it('is one well-formed SVG document without scripts', () => {
    expect(svg.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
    expect(svg).not.toMatch(/<script/i);
    // Every opened group is closed.
    expect((svg.match(/<g /g) ?? []).length).toBe((svg.match(/<\/g>/g) ?? []).length);
  });

  it('draws every edge trace, the spectrum and the mask on both sides', () => {
    const polylines = (svg.match(/<polyline /g) ?? []).length;
    expect(polylines).toBe(1 + 2 + report.edges.rising.length + report.edges.falling.length);
    expect(report.edges.rising.length).toBe(report.marks.measured);
  });

  it('marks the necessary bandwidth symmetrically about the carrier, and the 10 % and 90 % levels', () => {
    const purple = [...svg.matchAll(/<line x1="([\d.]+)"[^>]*stroke="#8e44ad"/g)].map((m) => Number(m[1]));
    expect(purple).toHaveLength(2);
    const left = 70;
    const right = 900 - 20;
    const centre = (left + right) / 2;
    expect(Math.abs(centre - purple[0]! - (purple[1]! - centre))).toBeLessThan(0.2);
    expect(svg).toContain('>10 %<');
    expect(svg).toContain('>90 %<');
    expect(svg).toContain(`necessary bandwidth ${Math.round(report.necessaryBandwidthHz! * 10) / 10} Hz (SM.1138)`);
  });

  it('says "mask: not judged" for a recording too noisy to judge, and draws no edges', () => {
    const plan = planKeying('Q7ZKT', { wpm: 20 });
    const x = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 700, levelDb: -6, edge: 'hard', riseMs: 0, padMs: 300 }).samples;
    // 0 dB in keyform's convention (carrier over noise in 2500 Hz, src/core/signal/noise.ts).
    addNoise(x, noiseSigmaForSnr(10 ** (-6 / 20), 8000, 0), 1);
    const noisy = measureShape(x, 8000, { toneHz: 700, findShortestRise: false });
    const plot = shapeSvg(noisy);
    expect(noisy.mask.pass).toBeNull();
    expect(plot).toContain('mask: not judged');
    expect(plot).not.toMatch(/mask: (pass|FAIL)/);
    expect(noisy.edges.rising).toHaveLength(0);
  });
});
