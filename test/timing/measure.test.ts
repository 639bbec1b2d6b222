import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.js';
import { measureTiming } from '../../src/core/measure/timing.js';
import { keyedMarks, standardLengths, symbolCounts } from '../../testkit/keyed-marks.js';

const MESSAGE = 'Q7ZKT TEST DE Q3ABC';

describe('measureTiming at standard timing', () => {
  // PARIS standard word of 50 units: unit = 1200 / wpm ms (common practice; used by QEX 1990).
  it.each([5, 13, 20, 35, 60])('recovers %d wpm: unit 1200/wpm, weight 50 %%, dash/dot 3, gaps 1/3/7 (ITU-R M.1677-1 §2)', (wpm) => {
    const unit = 1200 / wpm;
    const r = measureTiming({ marks: keyedMarks(MESSAGE, standardLengths(unit)) });
    expect(r.unitMs).toBeCloseTo(unit, 9);
    expect(r.wpm).toBeCloseTo(wpm, 9);
    expect(r.effectiveWpm).toBeCloseTo(wpm, 9);
    expect(r.weightPct).toBeCloseTo(50, 9);
    expect(r.dahDitRatio).toBeCloseTo(3, 9);
    expect(r.gapUnits.element!.median).toBeCloseTo(1, 9);
    expect(r.gapUnits.letter!.median).toBeCloseTo(3, 9);
    expect(r.gapUnits.word!.median).toBeCloseTo(7, 9);
    expect(r.gapUnits.word!.count).toBe(3);
    expect(r.jitterPct).toBeCloseTo(0, 6);
    expect(r.driftWpm).toBeCloseTo(0, 6);
    expect(r.text).toBe(MESSAGE);
  });

  it('counts dots and dashes into the histogram bins of 1 and 3 units', () => {
    const r = measureTiming({ marks: keyedMarks(MESSAGE, standardLengths(60)) }, { histogramBinUnits: 0.5, histogramMaxUnits: 8 });
    const { dits, dahs } = symbolCounts(MESSAGE);
    const h = r.histogram;
    expect(h.marks[2]).toBe(dits); // bin centred on 1 unit
    expect(h.marks[6]).toBe(dahs); // bin centred on 3 units
    expect(h.marks.reduce((a, b) => a + b, 0) + h.marksOver).toBe(dits + dahs);
    expect(h.gaps[14]).toBe(3); // three word gaps of 7 units
    expect(h.gaps.reduce((a, b) => a + b, 0) + h.gapsOver).toBe(dits + dahs - 1);
  });
});

describe('measureTiming of a hand-sent message', () => {
  // Weight = dot share of dot + following element gap (the planner's definition; 50 % standard).
  // Weight 60 % at unit u: dot 1.2u, element gap 0.8u; dash/dot ratio 3.5: dash 4.2u.
  const u = 75;
  const lengths = {
    ditMs: 1.2 * u,
    dahMs: 3.5 * 1.2 * u,
    elementGapMs: 0.8 * u,
    letterGapMs: 2.8 * u,
    wordGapMs: 5.5 * u, // hand-sent word gaps are often 5–6 units (Gilbert 1969)
  };
  const text = 'Q7ZKT DE Q3ABC Q3ABC DE Q7ZKT PSE K';

  it('measures dash/dot ratio 3.5 and weight 60 % within 3 % without jitter', () => {
    const r = measureTiming({ marks: keyedMarks(text, lengths) });
    expect(Math.abs(r.dahDitRatio! / 3.5 - 1)).toBeLessThan(0.03);
    expect(Math.abs(r.weightPct! / 60 - 1)).toBeLessThan(0.03);
    expect(r.unitMs).toBeCloseTo(u, 9);
    expect(r.text).toBe(text);
  });

  it('measures them within 3 % with 6 % of a unit of seeded edge jitter', () => {
    for (const seed of [1, 2, 3]) {
      const r = measureTiming({ marks: keyedMarks(text, { ...lengths, edgeJitterMs: 0.06 * u, seed }) });
      expect(Math.abs(r.dahDitRatio! / 3.5 - 1)).toBeLessThan(0.03);
      expect(Math.abs(r.weightPct! / 60 - 1)).toBeLessThan(0.03);
      expect(r.gapUnits.word!.count).toBe(text.split(' ').length - 1);
      expect(r.text).toBe(text);
    }
  });
});

describe('measureTiming of Farnsworth spacing', () => {
  // J. Bloom, QEX April 1990: ta = (60c − 37.2s)/(s·c) s; letter gap tc = 3ta/19, word gap tw = 7ta/19.
  const c = 20;
  const s = 10;
  const taMs = ((60 * c - 37.2 * s) / (s * c)) * 1000;
  const tc = (3 * taMs) / 19;
  const tw = (7 * taMs) / 19;
  const unit = 1200 / c;

  it('classifies the stretched letter and word gaps and gives the overall speed', () => {
    const words = 8;
    const text = Array.from({ length: words }, () => 'PARIS').join(' ');
    const marks = keyedMarks(text, { ...standardLengths(unit), letterGapMs: tc, wordGapMs: tw });
    const r = measureTiming({ marks });
    expect(r.wpm).toBeCloseTo(c, 9);
    expect(r.gapUnits.letter!.median).toBeCloseTo(tc / unit, 9);
    expect(r.gapUnits.word!.median).toBeCloseTo(tw / unit, 9);
    // A PARIS word with its word gap lasts 60/s seconds at overall speed s (Bloom); the recording
    // ends without the last word gap: 50·words − 7 standard units in words·60000/s − tw ms.
    expect(r.effectiveWpm).toBeCloseTo((1200 * (50 * words - 7)) / ((words * 60_000) / s - tw), 9);
  });
});

describe('measureTiming of Farnsworth spacing in one word', () => {
  // Bloom (QEX 1990) at c = 20, s = 8: the letter gaps alone look like word gaps at 20 wpm.
  const taMs = ((60 * 20 - 37.2 * 8) / (8 * 20)) * 1000;
  const tc = (3 * taMs) / 19;
  const tw = (7 * taMs) / 19;
  const marks = keyedMarks('Q7ZKT', { ...standardLengths(60), letterGapMs: tc, wordGapMs: tw });

  it('keeps letter gaps as letter gaps given the plan\'s letter/word boundary', () => {
    const r = measureTiming({ marks }, { unitMsHint: 60, wordSplitUnits: Math.sqrt(tc * tw) / 60 });
    expect(r.gapUnits.letter!.count).toBe(4);
    expect(r.gapUnits.letter!.median).toBeCloseTo(tc / 60, 9);
    expect(r.gapUnits.word).toBeNull();
    expect(r.text).toBe('Q7ZKT');
  });

  it('reads them as word gaps without it (5-unit cut-off)', () => {
    expect(measureTiming({ marks }).text).toBe('Q 7 Z K T');
  });
});

describe('measureTiming jitter and drift', () => {
  const text = 'Q7ZKT DE Q3ABC TEST TEST TEST PSE K Q3ABC DE Q7ZKT TEST K';

  it('reports seeded Gaussian edge jitter of 8 % of a unit as about 8 %', () => {
    const unit = 60;
    const values = [11, 12, 13].map(
      (seed) => measureTiming({ marks: keyedMarks(text, { ...standardLengths(unit), edgeJitterMs: 0.08 * unit, seed }) }).jitterPct!,
    );
    const avg = values.reduce((a, b) => a + b, 0) / values.length;
    // The estimator is the RMS residual per degree of freedom; expect the true σ within 10 %.
    expect(avg).toBeGreaterThan(8 * 0.9);
    expect(avg).toBeLessThan(8 * 1.1);
  });

  it('reports a speed that rises 1 wpm per word as drift of (words − 1) wpm', () => {
    const words = ['Q7ZKT', 'DE', 'Q3ABC', 'TEST', 'TEST', 'PSE', 'K'];
    const marks: Array<[number, number]> = [];
    let t = 0;
    words.forEach((w, k) => {
      const unit = 1200 / (18 + k);
      const m = keyedMarks(w, { ...standardLengths(unit), startMs: t });
      marks.push(...m);
      t = m[m.length - 1]![1] + 7 * unit;
    });
    const r = measureTiming({ marks });
    expect(r.wordWpm.length).toBe(words.length);
    expect(r.driftWpm).toBeCloseTo(words.length - 1, 1);
    expect(r.jitterPct).toBeCloseTo(0, 6); // each word is exact at its own speed: drift is not jitter
    expect(r.wordWpm[0]).toBeCloseTo(18, 0);
    expect(r.wordWpm[words.length - 1]).toBeCloseTo(18 + words.length - 1, 0);
  });
});

describe('measureTiming input checks', () => {
  it('rejects no marks, overlapping and reversed marks with an InputError', () => {
    expect(() => measureTiming({ marks: [] })).toThrow(InputError);
    expect(() => measureTiming({ marks: [[0, 60], [50, 100]] })).toThrow(/mark 2: starts at 50 ms/);
    expect(() => measureTiming({ marks: [[60, 0]] })).toThrow(/mark 1: ends at 0 ms/);
  });

  it('reads equal marks as dashes when the unit hint says so', () => {
    const marks = keyedMarks('TTT T', standardLengths(60));
    expect(measureTiming({ marks }, { unitMsHint: 60 }).text).toBe('TTT T');
  });
});
