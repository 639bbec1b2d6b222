import { describe, expect, it } from 'vitest';
import { checkMask, DEFAULT_MASK, maskLimitDbc, parseMaskCsv } from '../../src/core/measure/mask.js';
import { predictShape } from '../../src/core/measure/shape.js';

describe('spectral mask', () => {
  it('reads a mask from CSV with a header and comments', () => {
    const m = parseMaskCsv('# my station\noffset_hz,max_dbc\n200,-30\n600,-50\n\n1500,-60 # far out\n', 'mine.csv');
    expect(m.points).toEqual([
      { offsetHz: 200, maxDbc: -30 },
      { offsetHz: 600, maxDbc: -50 },
      { offsetHz: 1500, maxDbc: -60 },
    ]);
  });

  it('names the bad line of a broken mask file', () => {
    expect(() => parseMaskCsv('200,-30\n100,-40\n', 'm.csv')).toThrow(/point 2: offsets must increase/);
    expect(() => parseMaskCsv('200,-30\n300,abc\n', 'm.csv')).toThrow(/line 2/);
    expect(() => parseMaskCsv('200,10\n', 'm.csv')).toThrow(/-200 to 0 dBc/);
  });

  it('interpolates the limit between points and holds it after the last', () => {
    expect(maskLimitDbc(DEFAULT_MASK, 100)).toBeNull();
    expect(maskLimitDbc(DEFAULT_MASK, 250)).toBeCloseTo(-42.5, 9);
    expect(maskLimitDbc(DEFAULT_MASK, -400)).toBeCloseTo(-55, 9);
    expect(maskLimitDbc(DEFAULT_MASK, 5000)).toBe(-70);
  });

  it('lists each exceeded stretch with its worst excess', () => {
    const mask = { name: 't', points: [{ offsetHz: 100, maxDbc: -20 }, { offsetHz: 200, maxDbc: -40 }] };
    const offsets = [-250, -150, 0, 150, 250];
    const dbc = [-35, -10, 0, -35, -50];
    const v = checkMask(offsets, dbc, mask);
    expect(v.pass).toBe(false);
    // At −150 Hz the limit is −30 dBc and the level −10: 20 dB over; at −250 Hz the limit is −40 and the level −35: 5 dB over.
    expect(v.violations).toEqual([
      { pointOffsetHz: 100, offsetHz: -150, limitDbc: -30, measuredDbc: -10, excessDb: 20 },
      { pointOffsetHz: 200, offsetHz: -250, limitDbc: -40, measuredDbc: -35, excessDb: 5 },
    ]);
  });

  it('does not judge levels within 3 dB of the noise floor', () => {
    const mask = { name: 't', points: [{ offsetHz: 100, maxDbc: -60 }] };
    const v = checkMask([-200, 0, 200], [-50, 0, -50], mask, [-51, -51, -51]);
    expect(v.pass).toBe(true);
    expect(v.noiseLimitedPointsHz).toEqual([100]);
    // Nothing inside the mask could be told from the noise: no bin judged, so no verdict can rest on it.
    expect(v.judgedBins).toBe(0);
  });

  it('counts a bin under a noise floor that is itself under the limit as judged (clean)', () => {
    const mask = { name: 't', points: [{ offsetHz: 100, maxDbc: -30 }] };
    // −60 dBc noise floor, limit −30 dBc: the level at ±200 Hz is at most the floor + 3 dB, far under the limit.
    const v = checkMask([-200, 0, 200], [-61, 0, -61], mask, [-60, -60, -60]);
    expect(v.pass).toBe(true);
    expect(v.judgedBins).toBe(2);
    expect(v.noiseLimitedPointsHz).toEqual([]);
  });

  it('fails hard keying and passes 5 ms raised-cosine edges at 20 wpm, naming the shortest rise that passes', () => {
    const hard = predictShape({ wpm: 20, riseMs: 0, edge: 'hard' });
    expect(hard.mask.pass).toBe(false);
    expect(hard.mask.violations.length).toBeGreaterThan(0);
    const soft = predictShape({ wpm: 20, riseMs: 5, edge: 'raised-cosine' });
    expect(soft.mask.pass).toBe(true);
    expect(soft.mask.shortestRiseMs).not.toBeNull();
    expect(soft.mask.shortestRiseMs!).toBeLessThanOrEqual(5);
    // The shortest rise found by the sweep does meet the mask, and half a millisecond less does not.
    const edge = predictShape({ wpm: 20, riseMs: soft.mask.shortestRiseMs!, edge: 'raised-cosine', findShortestRise: false });
    expect(edge.mask.pass).toBe(true);
    const under = predictShape({ wpm: 20, riseMs: soft.mask.shortestRiseMs! - 0.5, edge: 'raised-cosine', findShortestRise: false });
    expect(under.mask.pass).toBe(false);
  });
});
