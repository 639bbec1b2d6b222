import { describe, expect, it } from 'vitest';
import { lnI0, lnI0Fast } from '../../src/core/receive/index.js';
import { buildCodeTrie } from '../../src/core/receive/trie.js';
import { SequenceDecoder } from '../../src/core/receive/viterbi.js';

describe('lnI0Fast (table and asymptotic expansion for the sequence decoder)', () => {
  it('stays within 2e-5 of lnI0 from 0 to 400, across the table edge at 64', () => {
    // Linear interpolation error ≤ h²/8 · max|(ln I0)''| = (1/64)²/8 · 1/2 ≈ 1.5e-5 [analytic].
    let worst = 0;
    for (let x = 0; x <= 400; x += 0.00731) worst = Math.max(worst, Math.abs(lnI0Fast(x) - lnI0(x)));
    for (const x of [63.99, 64, 64.01, 100, 399]) worst = Math.max(worst, Math.abs(lnI0Fast(x) - lnI0(x)));
    expect(worst).toBeLessThan(2e-5);
  });

  it('is even and 0 at 0', () => {
    expect(lnI0Fast(0)).toBe(0);
    expect(lnI0Fast(-3.3)).toBe(lnI0Fast(3.3));
  });

  it('the decoder\'s WebAssembly step scores marks with the same numbers, to the last bit (table and expansion)', () => {
    // Marks over one slot are scored at the tracked level, ln I0(x) − q; marks over 4 to 8 slots
    // (one block: dit + element gap = 8 slots, a dot or more = 4) as the best of that and a tone
    // 6 or 12 dB weaker with prior costs −4 and −8 (see viterbi.ts). The observations sweep x
    // across the table's end at 64 and far beyond it, where ln comes from the asymptotic expansion.
    const d = new SequenceDecoder(buildCodeTrie(), { dit: 4, dah: 12, elementGap: 4, letterGap: 12, wordGap: 28 }, 256);
    const re = [0];
    const im = [0];
    const qs = [0];
    const sum = (a: number[], t: number, v: number): number => (a[t] = a[t - 1]! + v);
    let checked = 0;
    for (let t = 1; t <= 200; t++) {
      const [yRe, yIm, q] = [0.37 * t * Math.cos(t), 0.29 * t * Math.sin(3 * t), 0.011 * t * t];
      d.step(yRe, yIm, q);
      sum(re, t, yRe);
      sum(im, t, yIm);
      sum(qs, t, q);
      const x = (a: number): number => 2 * Math.sqrt((re[t]! - re[a]!) ** 2 + (im[t]! - im[a]!) ** 2);
      expect(d.markLlr(t - 1, t)).toBe(lnI0Fast(x(t - 1)) - (qs[t]! - qs[t - 1]!));
      if (t > 5) {
        const xs = x(t - 5);
        const qq = qs[t]! - qs[t - 5]!;
        expect(d.markLlr(t - 5, t)).toBe(Math.max(lnI0Fast(xs) - qq, lnI0Fast(xs / 2) - qq / 4 - 4, lnI0Fast(xs / 4) - qq / 16 - 8));
      }
      checked += x(t - 1) >= 64 ? 1 : 0;
    }
    expect(checked).toBeGreaterThan(50); // many past the table's end
  });
});
