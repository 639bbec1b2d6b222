import { describe, expect, it } from 'vitest';
import { planKeying } from '../../src/core/timing/plan.js';
import { farnsworthGaps, unitMs, modulationRateBaud } from '../../src/core/timing/speed.js';
import { quantizeToTicks, toUnitBits } from '../../src/core/timing/ticks.js';

describe('PARIS word timing', () => {
  // PARIS standard word = 50 units, unit = 1200 / wpm ms (common practice; used by QEX, April 1990).
  it.each([[5, 240], [12, 100], [20, 60], [25, 48], [40, 30], [100, 12]])('gives a unit of 1200/wpm at %d wpm (%d ms)', (wpm, ms) => {
    expect(unitMs(wpm)).toBeCloseTo(ms, 12);
  });

  it('sends one PARIS word in 50 units, 22 of them key-down', () => {
    for (const wpm of [5, 13, 20, 37]) {
      const plan = planKeying('PARIS PARIS', { wpm });
      const u = 1200 / wpm;
      // The second word starts exactly 50 units after the first (word gap of 7 included).
      expect(plan.characters[5]!.startMs).toBeCloseTo(50 * u, 9);
      // 60 s / (50 units) per word → wpm words per minute.
      expect(60_000 / plan.characters[5]!.startMs).toBeCloseTo(wpm, 9);
      const firstWordKeyDown = plan.marks.filter(([a]) => a < 50 * u).reduce((s, [a, b]) => s + (b - a), 0);
      expect(firstWordKeyDown).toBeCloseTo(22 * u, 9);
    }
  });

  // ITU-R M.1677-1 §2: dash = 3 dots, element gap 1 dot, letter gap 3 dots, word gap 7 dots.
  it('uses the M.1677-1 spacing inside letters, between letters and between words', () => {
    const plan = planKeying('AN E', { wpm: 20 });
    expect(plan.marks).toEqual([
      [0, 60], [120, 300], // A: dot, gap 1, dash 3
      [480, 660], [720, 780], // N after a letter gap of 3: dash, gap 1, dot
      [1200, 1260], // E after a word gap of 7
    ]);
    expect(plan.totalMs).toBe(1260);
  });

  it('sends a prosign as one run without letter gaps', () => {
    const plan = planKeying('<AR>', { wpm: 20 });
    // .-.-. = 2·3 + 4·2 − 1 = 13 units (M.1677-1 §2 spacing).
    expect(plan.totalMs).toBe(13 * 60);
    expect(plan.marks).toHaveLength(5);
  });

  it('rejects speeds outside 1–100 wpm', () => {
    expect(() => planKeying('E', { wpm: 0 })).toThrow('wpm must be from 1 to 100 wpm (got 0)');
    expect(() => planKeying('E', { wpm: 101 })).toThrow('wpm must be from 1 to 100');
  });
});

describe('Farnsworth spacing (J. Bloom, QEX, April 1990)', () => {
  // Worked by hand from ta = (60c − 37.2s)/(s·c) s, tc = 3ta/19, tw = 7ta/19:
  // c = 20, s = 10: ta = (1200 − 372)/200 = 4.14 s, tc = 12.42/19 = 0.653684 s, tw = 28.98/19 = 1.525263 s.
  // c = 18, s = 5: ta = (1080 − 186)/90 = 9.93333 s, tc = 1.568421 s, tw = 3.659649 s.
  it.each([
    [20, 10, 4140, 653.684, 1525.263],
    [18, 5, 9933.333, 1568.421, 3659.649],
  ])('c = %d, s = %d wpm gives ta %f ms, tc %f ms, tw %f ms', (c, s, ta, tc, tw) => {
    const g = farnsworthGaps(c, s);
    expect(g.addedDelayMs).toBeCloseTo(ta, 2);
    expect(g.letterGapMs).toBeCloseTo(tc, 2);
    expect(g.wordGapMs).toBeCloseTo(tw, 2);
  });

  it('keeps the character speed and brings PARIS to the overall speed', () => {
    const plan = planKeying('PARIS PARIS', { wpm: 20, farnsworthWpm: 10 });
    expect(plan.marks[0]).toEqual([0, 60]); // P starts with a 60 ms dot at 20 wpm
    // One PARIS word (start to start) lasts 60 s / 10 wpm = 6 s.
    expect(plan.characters[5]!.startMs).toBeCloseTo(6000, 6);
    expect(plan.gapsMs.letter).toBeCloseTo(653.684, 2);
    expect(plan.gapsMs.word).toBeCloseTo(1525.263, 2);
  });

  it('rejects an overall speed at or above the character speed', () => {
    expect(() => planKeying('E', { wpm: 20, farnsworthWpm: 25 })).toThrow('Farnsworth speed must be below the character speed 20 wpm (got 25)');
  });
});

describe('modulation rate', () => {
  // B = 1/unit = wpm/1.2 baud for PARIS timing [analytic; ../shared/REFERENCES.md].
  it('is wpm / 1.2 baud', () => {
    expect(modulationRateBaud(unitMs(20))).toBeCloseTo(20 / 1.2, 12);
    expect(modulationRateBaud(unitMs(24))).toBeCloseTo(20, 12);
  });
});

describe('weighting, compensation, PTT and repeats', () => {
  it('lengthens marks by (weight/50 − 1)·unit and keeps the speed', () => {
    const plan = planKeying('PARIS PARIS', { wpm: 20, weightPct: 60 });
    expect(plan.ditMs).toBeCloseTo(72, 9);
    expect(plan.dahMs).toBeCloseTo(192, 9);
    expect(plan.gapsMs.element).toBeCloseTo(48, 9);
    expect(plan.characters[5]!.startMs).toBeCloseTo(3000, 9);
    // Weight = dot / (dot + element gap).
    expect((100 * plan.ditMs) / (plan.ditMs + plan.gapsMs.element)).toBeCloseTo(60, 9);
  });

  it('adds compensation to every mark and takes it from the next gap', () => {
    const base = planKeying('Q7ZKT', { wpm: 20 });
    const comp = planKeying('Q7ZKT', { wpm: 20, compensationMs: 15 });
    comp.marks.forEach(([a, b], i) => {
      expect(a).toBeCloseTo(base.marks[i]![0], 9);
      expect(b).toBeCloseTo(base.marks[i]![1] + 15, 9);
    });
  });

  it('refuses a weight that leaves no gap', () => {
    expect(() => planKeying('E', { wpm: 20, weightPct: 50, compensationMs: 60 })).toThrow(/leaves no gap between elements/);
  });

  it('adds PTT lead and tail around each transmission', () => {
    const plan = planKeying('E', { wpm: 20, pttLeadMs: 50, pttTailMs: 200 });
    expect(plan.ptt).toEqual([[-50, 260]]);
  });

  it('repeats a beacon every period and refuses a message longer than the period', () => {
    const plan = planKeying('Q7ZKT/B', { wpm: 20, repeat: 3, everyS: 10 });
    const starts = plan.characters.filter((c, i) => i % 7 === 0).map((c) => c.startMs);
    expect(starts).toEqual([0, 10_000, 20_000]);
    expect(plan.characterCount).toBe(21);
    expect(() => planKeying('Q7ZKT/B', { wpm: 20, repeat: 2, everyS: 3 })).toThrow(/longer than the repeat period of 3 s/);
  });
});

describe('tick quantisation', () => {
  it('keeps the drift at every edge below half a tick (error diffusion)', () => {
    const plan = planKeying('Q7ZKT TEST 73', { wpm: 13, farnsworthWpm: 7 });
    for (const tickHz of [1000, 32768, 300]) {
      const q = quantizeToTicks(plan.marks, tickHz);
      let t = 0;
      const edges = plan.marks.flat();
      expect(q.steps).toHaveLength(edges.length - 1);
      q.steps.forEach((s, i) => {
        t += s;
        expect(Math.abs(t - ((edges[i + 1]! - edges[0]!) * tickHz) / 1000)).toBeLessThan(1);
      });
      expect(q.maxDriftTicks).toBeLessThanOrEqual(0.5);
      expect(q.maxStepErrorTicks).toBeLessThan(1);
    }
  });

  it('writes PARIS as 43 unit bits with 22 ones', () => {
    const plan = planKeying('PARIS', { wpm: 20 });
    const { bits, exact } = toUnitBits(plan.marks, plan.unitMs);
    expect(exact).toBe(true);
    expect(bits).toBe('1011101110100010111000101110100010100010101');
    expect(bits.length).toBe(43); // 50 units less the final word gap of 7
    expect(bits.split('').filter((b) => b === '1')).toHaveLength(22);
  });
});
