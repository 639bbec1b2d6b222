import { describe, expect, it } from 'vitest';
import { lnI0, lnI0Fast } from '../../src/core/receive/index.js';

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
});
