import { describe, expect, it } from 'vitest';
import { lnI0, lnI0Fast } from '../../src/core/receive/index.js';
import { lnI0FastInto } from '../../src/core/receive/lni0.js';

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

  it('lnI0FastInto gives, number for number, what lnI0Fast gives (both branches, signs, a sub-range)', () => {
    const x = Float64Array.from([-70, -1.5, 0, 0.01, 3.75, 63.99, 64, 64.01, 250, 1e4]);
    const out = new Float64Array(x.length).fill(Number.NaN);
    lnI0FastInto(x, out, 1, x.length - 1);
    expect(Number.isNaN(out[0]!) && Number.isNaN(out[x.length - 1]!)).toBe(true); // outside [from, to): untouched
    for (let k = 1; k < x.length - 1; k++) expect(out[k]).toBe(lnI0Fast(x[k]!));
    // Beyond the table, within 2e-5 of lnI0 (A&S 9.7.1 asymptotic expansion, from memory).
    expect(Math.abs(out[8]! - lnI0(250))).toBeLessThan(2e-5);
  });
});
