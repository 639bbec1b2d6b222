import { describe, expect, it } from 'vitest';
import { alignTimelines } from '../../src/core/measure/align.js';
import { planElementsFromJson } from '../../src/core/measure/timing-plan.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { planToJson } from '../../src/io/export.js';
import type { Interval } from '../../src/core/timeline.js';
import { keyedMarks, M1677 } from '../../testkit/keyed-marks.js';

const MESSAGE = 'Q7ZKT TEST DE Q3ABC';
const WPM = 20;
const UNIT = 1200 / WPM; // PARIS: unit = 1200 / wpm ms (common practice)
const DAH_MS = 3 * UNIT; // ITU-R M.1677-1 §2: a dash is three dots

const shift = (marks: readonly Interval[], ms: number): Interval[] => marks.map(([a, b]) => [a + ms, b + ms]);

describe('alignTimelines', () => {
  const plan = planKeying(MESSAGE, { wpm: WPM });

  it('finds zero error when a plan is compared with itself', () => {
    const a = alignTimelines(plan, plan);
    expect(a.offsetMs).toBe(0);
    expect(a.matchedCount).toBe(plan.elements.length);
    expect(a.missing).toEqual([]);
    expect(a.extra).toEqual([]);
    expect(a.maxErrorMs).toBe(0);
    expect(a.elements.every((e) => e.startErrorMs === 0 && e.lengthErrorMs === 0 && e.status === 'ok')).toBe(true);
    expect(a.pass).toBe(true);
  });

  it('finds zero error for the plan read back from its JSON', () => {
    const fromJson = planElementsFromJson(JSON.parse(JSON.stringify(planToJson(plan))), 'plan.json');
    expect(fromJson.elements.map((e) => e.kind)).toEqual(plan.elements.map((e) => e.kind));
    const a = alignTimelines(plan, fromJson);
    expect(a.maxErrorMs).toBe(0);
    expect(a.pass).toBe(true);
    expect(a.elements[0]!.char).toBe('Q');
  });

  it('estimates and removes an arbitrary start time', () => {
    const a = alignTimelines({ marks: shift(plan.marks, 83_456.25) }, plan);
    expect(a.offsetMs).toBeCloseTo(83_456.25, 9);
    expect(a.maxErrorMs).toBeCloseTo(0, 6);
    expect(a.pass).toBe(true);
  });

  const dahIndex = plan.elements.findIndex((e, i) => i > 8 && e.kind === 'dah');

  it('reports one dash 20 % long as exactly 0.6 units long, nothing else', () => {
    const marks = plan.marks.map(([a, b]): Interval => [a, b]);
    marks[dahIndex]![1] += 0.2 * DAH_MS;
    const a = alignTimelines({ marks }, plan);
    const e = a.elements[dahIndex]!;
    expect(e.lengthErrorMs).toBeCloseTo(0.2 * DAH_MS, 9);
    expect(e.lengthErrorPct).toBeCloseTo(60, 9); // 20 % of 3 units
    expect(e.startErrorMs).toBeCloseTo(0, 9);
    expect(e.status).toBe('long');
    expect(a.worstElement).toBe(dahIndex);
    expect(a.maxErrorMs).toBeCloseTo(0.2 * DAH_MS, 9);
    expect(a.elements.filter((x) => x.status !== 'ok').length).toBe(1);
    expect(a.pass).toBe(false);
  });

  it('reports a dropped element as missing and keeps every other pairing', () => {
    for (const dropped of [0, 17, plan.elements.length - 1]) {
      const marks = plan.marks.filter((_, i) => i !== dropped);
      const a = alignTimelines({ marks: shift(marks, 1234.5) }, plan);
      expect(a.missing).toEqual([dropped]);
      expect(a.extra).toEqual([]);
      expect(a.offsetMs).toBeCloseTo(1234.5, 9);
      expect(a.maxErrorMs).toBeCloseTo(0, 6);
      expect(a.pass).toBe(false);
    }
  });

  it('reports 15 ms of keying compensation as every mark 15 ms long, starts on time', () => {
    // Compensation lengthens each mark and shortens the following gap by the same time.
    const observed = plan.marks.map(([a, b]): Interval => [a, b + 15]);
    const a = alignTimelines({ marks: observed }, plan);
    expect(a.offsetMs).toBe(0);
    for (const e of a.elements) {
      expect(e.lengthErrorMs).toBeCloseTo(15, 9);
      expect(e.startErrorMs).toBeCloseTo(0, 9);
      expect(e.lengthErrorPct).toBeCloseTo(25, 9); // 15 ms of a 60 ms unit
    }
    expect(a.maxErrorMs).toBeCloseTo(15, 9);
  });

  it('reports all three injected errors together, after an arbitrary offset', () => {
    const dropped = 30;
    const observed = plan.marks
      .map(([a, b], i): Interval => [a, b + 15 + (i === dahIndex ? 0.2 * DAH_MS : 0)])
      .filter((_, i) => i !== dropped);
    const a = alignTimelines({ marks: shift(observed, 5000) }, plan, { tolerancePct: 10 });
    expect(a.offsetMs).toBeCloseTo(5000, 9);
    expect(a.missing).toEqual([dropped]);
    expect(a.extra).toEqual([]);
    a.elements.forEach((e, i) => {
      if (i === dropped) expect(e.status).toBe('missing');
      else expect(e.lengthErrorMs).toBeCloseTo(15 + (i === dahIndex ? 0.2 * DAH_MS : 0), 9);
    });
    expect(a.maxErrorMs).toBeCloseTo(15 + 0.2 * DAH_MS, 9);
    expect(a.pass).toBe(false);
  });

  it('reports an extra mark and where it came', () => {
    const k = plan.elements.findIndex((e, i) => i > 5 && plan.marks[i + 1]![0] - e.endMs >= 3 * UNIT);
    const gapStart = plan.marks[k]![1];
    const marks = [...plan.marks, [gapStart + UNIT, gapStart + 1.5 * UNIT] as Interval].sort((x, y) => x[0] - y[0]);
    const a = alignTimelines({ marks }, plan);
    expect(a.extra.length).toBe(1);
    expect(a.extra[0]!.afterElement).toBe(k);
    expect(a.extra[0]!.startMs).toBeCloseTo(gapStart + UNIT, 9);
    expect(a.missing).toEqual([]);
    expect(a.maxErrorMs).toBe(0);
    expect(a.pass).toBe(false);
  });

  it('passes or fails on the tolerance in % of a unit', () => {
    const late = plan.marks.map(([a, b], i): Interval => (i === 5 ? [a + 5, b + 5] : [a, b])); // 5 ms = 8.3 % of 60 ms
    expect(alignTimelines({ marks: late }, plan, { tolerancePct: 10 }).pass).toBe(true);
    const strict = alignTimelines({ marks: late }, plan, { tolerancePct: 5 });
    expect(strict.pass).toBe(false);
    expect(strict.elements[5]!.status).toBe('late');
    expect(strict.elements[5]!.startErrorPct).toBeCloseTo((100 * 5) / UNIT, 9);
  });

  it('aligns a long beacon log with scattered drops in bounded time', () => {
    const beacon = planKeying('VVV Q7ZKT/B Q7ZKT/B', { wpm: 22, repeat: 40 });
    const dropped = new Set([3, 400, 401, 1500, beacon.marks.length - 2]);
    const marks = beacon.marks.filter((_, i) => !dropped.has(i));
    const a = alignTimelines({ marks: shift(marks, 777) }, beacon);
    expect(a.missing).toEqual([...dropped].sort((x, y) => x - y));
    expect(a.offsetMs).toBeCloseTo(777, 9);
    expect(a.maxErrorMs).toBeCloseTo(0, 6);
  });

  describe('against a hand-sent message', () => {
    // Sent at 18 wpm against a 20 wpm plan, weight 60 %, dash/dot ratio 3.5, word gaps of 5.5 units
    // (hand-sent word gaps are often 5–6 units, Gilbert 1969), 6 % of a unit of edge jitter:
    // edge times drift far apart, so only an alignment that follows the sender pairs them.
    const text = 'Q7ZKT DE Q3ABC PSE K';
    const u = 1200 / 18;
    const hand = { ditMs: 1.2 * u, dahMs: 4.2 * u, elementGapMs: 0.8 * u, letterGapMs: 2.8 * u, wordGapMs: 5.3 * u, edgeJitterMs: 0.06 * u, seed: 5 };
    const meant = planKeying(text, { wpm: 20 });

    it('pairs every element and reports the longer dashes', () => {
      const a = alignTimelines({ marks: keyedMarks(text, hand) }, meant);
      expect(a.missing).toEqual([]);
      expect(a.extra).toEqual([]);
      const dahs = a.elements.filter((e) => e.kind === 'dah').map((e) => e.lengthErrorMs!);
      const expected = hand.dahMs - 3 * (1200 / 20); // sent dash − planned dash (3 units at 20 wpm)
      const mean = dahs.reduce((x, y) => x + y, 0) / dahs.length;
      expect(Math.abs(mean - expected)).toBeLessThan(0.06 * u);
      expect(a.pass).toBe(false);
    });

    it('finds the one element left out', () => {
      const marks = keyedMarks(text, hand);
      // Leave out the dash of the 'K' at the end: the last element.
      const dropped = marks.length - 1;
      expect(M1677.K!.at(-1)).toBe('-');
      const a = alignTimelines({ marks: marks.filter((_, i) => i !== dropped) }, meant);
      expect(a.extra).toEqual([]);
      expect(a.missing).toEqual([dropped]);
      // Leave out the second dot of the 'S' in PSE: which of its three dots is ambiguous, the character is not.
      const sIndex = meant.characters.findIndex((c, i) => c.text === 'S' && i > 8);
      const sFirst = meant.elements.findIndex((e) => e.charIndex === sIndex);
      const b = alignTimelines({ marks: marks.filter((_, i) => i !== sFirst + 1) }, meant);
      expect(b.extra).toEqual([]);
      expect(b.missing.length).toBe(1);
      expect(meant.elements[b.missing[0]!]!.charIndex).toBe(sIndex);
    });
  });
});

