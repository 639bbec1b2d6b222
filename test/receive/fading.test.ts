/**
 * Fading: marks that a fade takes below the slicing threshold are still far above the noise; they
 * must neither raise the noise level nor vanish from the decoded text.
 */
import { describe, expect, it } from 'vitest';
import { decodeSamples } from '../../src/core/receive/index.js';
import { editDistance } from '../../src/core/receive/edit-distance.js';
import { applyFading } from '../../src/core/signal/impair.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';

const RATE = 8000;
const AMP = 10 ** (-6 / 20);

describe('fading', () => {
  it('reads through an 18 dB fade lasting 12 s', () => {
    const plan = planKeying('Q7ZKT DE Q3ABC TEST RST 599 NAME Q3ABC QTH WIND RAIN COLD', { wpm: 20 });
    const x = synthesizeTone({ marks: plan.marks, sampleRate: RATE, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }).samples;
    const depth = 10 ** (-18 / 20);
    for (let i = 0; i < x.length; i++) {
      const t = i / RATE;
      if (t <= 12 || t >= 24) continue;
      const u = Math.min(1, (t - 12) / 0.3, (24 - t) / 0.3); // 0.3 s raised-cosine slopes
      x[i] = x[i]! * (1 + (depth - 1) * (0.5 - 0.5 * Math.cos(Math.PI * u)));
    }
    addNoise(x, noiseSigmaForSnr(AMP, RATE, 30), 4);
    expect(decodeSamples(x, RATE).text).toBe(plan.text);
  });

  it('fast Rayleigh fading (0.5 Hz) at +20 dB: at most 10 % character errors over three paths', () => {
    const plan = planKeying('Q7ZKT DE Q3ABC TEST RST 599', { wpm: 20 });
    let errors = 0;
    for (const seed of [81, 82, 83]) {
      const x = synthesizeTone({ marks: plan.marks, sampleRate: RATE, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }).samples;
      applyFading(x, RATE, { kind: 'rayleigh', dopplerHz: 0.5, seed });
      addNoise(x, noiseSigmaForSnr(AMP, RATE, 20), 4);
      errors += editDistance(decodeSamples(x, RATE).text, plan.text);
    }
    expect(errors / (3 * plan.text.length)).toBeLessThanOrEqual(0.1);
  });
});

describe('edit distance', () => {
  it('counts insertions, deletions and substitutions (Levenshtein, worked by hand)', () => {
    expect(editDistance('Q7ZKT DE', 'Q7ZKT IE')).toBe(1); // one substitution
    expect(editDistance('Q7ZKT', 'Q7 ZKT')).toBe(1); // one insertion
    expect(editDistance('', 'TEST')).toBe(4);
    expect(editDistance('KITTEN', 'SITTING')).toBe(3); // K→S, E→I, +G
  });
});
