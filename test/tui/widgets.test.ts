import { describe, expect, it } from 'vitest';
import { planKeying } from '../../src/core/timing/plan.js';
import { envelopeChart, formatHz, histogramColumns, progressBar, spectrumPlot } from '../../src/tui/widgets/charts.js';
import { keyingStrip, labelRow } from '../../src/tui/widgets/strip.js';
import { comparisonLines, histogramLines, markedTextLines } from '../../src/tui/read/read-view.js';
import { shapeSummary, sweepLines } from '../../src/tui/shape/shape-view.js';

describe('timeline strip', () => {
  it('draws A (.-) at two columns per unit as dot, gap, dash', () => {
    // ITU-R M.1677-1: A = dot dash; element gap 1 unit, dash 3 units. At 20 wpm a unit is 60 ms (PARIS).
    const plan = planKeying('A', { wpm: 20 });
    expect(keyingStrip(plan.marks, 0, 30, 12)).toBe('██··██████··');
    expect(labelRow(plan.characters, 0, 30, 12)).toBe('A           ');
  });

  it('marks a column an edge crosses as partly down', () => {
    expect(keyingStrip([[15, 45]], 0, 30, 2)).toBe('▌▌');
  });
});

describe('charts', () => {
  it('fills a progress bar in proportion', () => {
    expect(progressBar(0.5, 18)).toBe('[█████·····]  50 %');
    expect(progressBar(2, 18)).toBe('[██████████] 100 %');
  });

  it('draws the threshold where the envelope is below it', () => {
    const lines = envelopeChart([0, 1, 0, 1], [0.5, 0.5, 0.5, 0.5], 4, 2);
    expect(lines).toEqual(['─█─█', ' █ █']);
  });

  it('scales histogram columns to the largest count', () => {
    expect(histogramColumns([[0, 2, 4]], 1)).toEqual([[' ▄█']]);
  });

  it('marks the necessary bandwidth and the carrier on the spectrum axis', () => {
    const offsets = [-100, -50, 0, 50, 100];
    const dbc = [-60, -30, 0, -30, -60];
    const lines = spectrumPlot(offsets, dbc, { width: 10, rows: 3, spanHz: 100, floorDb: -60, necessaryHz: 100 });
    // 20 Hz per column over ±100 Hz: the ±50 Hz band covers columns 2…7, the carrier is column 5.
    expect(lines[lines.length - 2]!.trim()).toBe('──═══┼══──');
    // Only the carrier (0 dBc) fills the top row; the columns between bins are interpolated in dB
    // (−20, −10 | −15 dBc beside it), drawn as ▁ below and ▄ above the row's midpoint (−15 dBc).
    expect(lines[0]!.slice(5)).toBe('   ▁▄█▁   ');
  });
});

describe('frequencies', () => {
  it('keeps three figures below 100 Hz, like an emission designator (ITU-R SM.1138: 91H7)', () => {
    expect(formatHz(91.67)).toBe('91.7 Hz');
    expect(formatHz(75)).toBe('75 Hz');
    expect(formatHz(522.4)).toBe('522 Hz');
    expect(formatHz(7002.7)).toBe('7.0 kHz');
  });
});

describe('read-back views', () => {
  it('puts ? under a doubtful character', () => {
    const chars = [
      { text: 'Q', startMs: 0, endMs: 1, pattern: '--.-', confidence: 0.95 },
      { text: '7', startMs: 2, endMs: 3, pattern: '--...', confidence: 0.3 },
      { text: 'E', startMs: 4, endMs: 5, pattern: '.', confidence: 0.9 },
    ];
    expect(markedTextLines('Q7 E', chars, 40)).toEqual([{ text: 'Q7 E', marks: ' ?  ' }]);
  });

  it('wraps long text at the pane width', () => {
    const rows = markedTextLines('AAAA BBBB', [], 5);
    expect(rows.map((r) => r.text)).toEqual(['AAAA ', 'BBBB']);
  });

  it('draws the timing histogram with a units ruler', () => {
    const lines = histogramLines({ histogram: { binUnits: 1, maxUnits: 10, marks: [0, 4, 0, 2], gaps: [0, 3, 0, 1, 0, 0, 0, 1], marksOver: 0, gapsOver: 0 } }, 40, 1);
    expect(lines[0]).toBe('marks   █ ▄    ');
    // One scale for both: 3 of 4 is six eighths (▆), 1 of 4 two eighths (▂).
    expect(lines[1]).toBe('gaps    ▆ ▂   ▂');
    expect(lines[2]).toBe('units  0 2 4 6 '); // one column per unit here: every other label fits
  });

  it('summarises an alignment with its verdict', () => {
    const c = comparisonLines({ pass: false, tolerancePct: 10, missing: [3], extra: [], maxErrorMs: 12, maxErrorPct: 20, offsetMs: 600, elements: [{ index: 0, char: 'Q', kind: 'dah', status: 'long', startErrorMs: 0, startErrorPct: 0, lengthErrorMs: 12, lengthErrorPct: 20 }] });
    expect(c.verdict).toBe('FAIL at ±10 % of a unit: worst 12.0 ms (20 %)');
    expect(c.lines[0]).toBe('1 missing · 0 extra · offset 600.0 ms removed');
    expect(c.lines[2]).toContain('+12.0 ms +20 %');
  });
});

describe('shape views', () => {
  it('states the verdict with a word and a symbol-ready flag', () => {
    const report = {
      riseMs: { median: 2.95, p10: 2.9, p90: 3.0 }, fallMs: { median: 2.95, p10: 2.9, p90: 3.0 }, chirpHz: { median: 0, worst: 1 },
      occupiedBandwidthHz: 150, bandwidthAtDbcHz: { '20': 50, '40': 160, '60': 400 }, necessaryBandwidthHz: 100, designator: '100HA1AAN',
      mask: { pass: false, violations: [{ offsetHz: 1000, excessDb: 3 }], shortestRiseMs: 4 },
    };
    const s = shapeSummary(report);
    expect(s.verdict.pass).toBe(false);
    expect(s.verdict.text).toBe('FAIL: 1 point over the mask, worst +3.0 dB at ±1.0 kHz; 4.0 ms rise meets it');
    // ITU-R SM.1138 worked example: 100 Hz necessary bandwidth, designator 100HA1AAN.
    expect(s.lines[4]).toBe('Necessary (ITU-R SM.1138) 100 Hz, 100HA1AAN · occupied/necessary ×1.5');
    for (const line of s.lines) expect(line.length).toBeLessThanOrEqual(78);
  });

  it('tabulates a rise-time sweep', () => {
    const lines = sweepLines({ rows: [{ riseMs: 1, occupiedBandwidthHz: 300, at40DbcHz: 900, pass: false }], shortestRiseMs: 4 });
    expect(lines[0]).toBe('shortest rise time that meets the mask: 4.0 ms');
    expect(lines[2]).toContain('✗ fail');
  });
});
