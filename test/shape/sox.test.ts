import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { measureShape } from '../../src/core/measure/shape.js';
import { readWavFile } from '../../src/io/wav-read.js';

/**
 * Tone bursts made by Debian's sox (an independent generator), shaped by its `fade` effect.
 * `fade TYPE IN STOP OUT`: the fade-in ramps from the first sample over IN seconds; the fade-out ramps
 * over OUT seconds ending at STOP (man sox). The gain curves, for x = 0…1 through the fade (from
 * memory of sox's fade effect, confirmed by these measurements):
 *   q quarter sine  sin(πx/2)           10–90 % = (asin 0.9 − asin 0.1)·2/π · T = 0.6491·T
 *   h half sine     (1 − cos πx)/2      10–90 % = (acos(−0.8) − acos 0.8)/π · T = 0.5903·T
 *   t linear        x                   10–90 % = 0.8·T
 *   l logarithmic   10^(−5(1 − x))      10–90 % = (log10 0.9 − log10 0.1)/5 · T = 0.19085·T
 *   p inv. parabola 1 − (1 − x)²        10–90 % = (√0.9 − √0.1) · T = 0.6325·T
 */
const EXPECTED: Record<string, (T: number) => number> = {
  q: (T) => ((Math.asin(0.9) - Math.asin(0.1)) * 2 * T) / Math.PI,
  h: (T) => ((Math.acos(-0.8) - Math.acos(0.8)) * T) / Math.PI,
  t: (T) => 0.8 * T,
  l: (T) => ((Math.log10(0.9) - Math.log10(0.1)) / 5) * T,
  p: (T) => (Math.sqrt(0.9) - Math.sqrt(0.1)) * T,
};

const dir = mkdtempSync(join(tmpdir(), 'keyform-sox-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function soxBurst(type: string, fadeMs: number, toneHz: number): string {
  const out = join(dir, `burst-${type}-${fadeMs}.wav`);
  const s = (ms: number): string => (ms / 1000).toFixed(4);
  // -D: no dither, so the file is the same on every run; vol 0.5 keeps 16-bit samples from clipping.
  execFileSync('sox', ['-D', '-n', '-r', '48000', '-b', '16', out, 'synth', '0.3', 'sine', String(toneHz), 'vol', '0.5', 'fade', type, s(fadeMs), '0.3', s(fadeMs), 'pad', '0.2', '0.2']);
  return out;
}

describe('rise and fall of sox fade shapes', () => {
  for (const type of Object.keys(EXPECTED)) {
    for (const fadeMs of [8, 20]) {
      it(`fade ${type} over ${fadeMs} ms: rise and fall within 5 % of ${EXPECTED[type]!(fadeMs).toFixed(3)} ms`, async () => {
        const audio = await readWavFile(soxBurst(type, fadeMs, 2000));
        const r = measureShape(audio.channels[0]!, audio.sampleRate, { findShortestRise: false });
        const expected = EXPECTED[type]!(fadeMs);
        expect(Math.abs(r.toneHz - 2000)).toBeLessThan(1);
        expect(r.marks.measured).toBe(1);
        expect(Math.abs(r.riseMs.median! / expected - 1)).toBeLessThan(0.05);
        expect(Math.abs(r.fallMs.median! / expected - 1)).toBeLessThan(0.05);
      });
    }
  }
});
