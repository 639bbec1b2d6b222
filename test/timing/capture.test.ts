import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.js';
import { measureTiming } from '../../src/core/measure/timing.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { planToCsv } from '../../src/io/export.js';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { captureFromMarks, parseCapture, readCaptureFile, timeUnitFromHeader } from '../../src/io/capture.js';
import { keyedMarks, standardLengths } from '../../testkit/keyed-marks.js';

describe('logic-capture CSV', () => {
  const plan = planKeying('Q7ZKT TEST DE Q3ABC', { wpm: 25, weightPct: 55 });

  it.each(['s', 'ms'] as const)('round-trips a plan through a capture in %s', (timeUnit) => {
    const csv = captureFromMarks(plan.marks, { timeUnit, leadMs: 250 });
    expect(csv.split('\n')[0]).toBe(`time_${timeUnit},state`);
    const cap = parseCapture(csv);
    expect(cap.timeUnit).toBe(timeUnit);
    expect(cap.marks.length).toBe(plan.marks.length);
    cap.marks.forEach(([a, b], i) => {
      expect(a).toBeCloseTo(plan.marks[i]![0], 6);
      expect(b).toBeCloseTo(plan.marks[i]![1], 6);
    });
    const direct = measureTiming(plan);
    const viaCapture = measureTiming(cap);
    expect(viaCapture.text).toBe(plan.text);
    expect(viaCapture.unitMs).toBeCloseTo(direct.unitMs, 6);
    expect(viaCapture.weightPct).toBeCloseTo(55, 4);
  });

  it('reads a logic-analyser export with several channels, active low, in seconds', () => {
    const marks = keyedMarks('K', standardLengths(60)); // -.- (ITU-R M.1677-1)
    const rows = ['Time [s], Channel 0, Channel 1', '0.000000000, 1, 0'];
    for (const [a, b] of marks) rows.push(`${(a + 100) / 1000}, 0, 1`, `${(b + 100) / 1000}, 1, 1`);
    const cap = parseCapture(rows.join('\n'), { activeLow: true, column: 'channel 0' });
    expect(cap.stateColumn).toBe('Channel 0');
    expect(cap.marks.length).toBe(3);
    expect(cap.marks[0]![0]).toBeCloseTo(100, 9);
    expect(cap.marks[0]![1] - cap.marks[0]![0]).toBeCloseTo(180, 9);
    expect(measureTiming(cap).text).toBe('K');
  });

  it('names the time unit from the header', () => {
    expect(timeUnitFromHeader('time_s')).toBe('s');
    expect(timeUnitFromHeader('Time [s]')).toBe('s');
    expect(timeUnitFromHeader('time')).toBe('s');
    expect(timeUnitFromHeader('time_ms')).toBe('ms');
    expect(timeUnitFromHeader('Time (ms)')).toBe('ms');
    expect(timeUnitFromHeader('t_us')).toBe('us');
    expect(timeUnitFromHeader('state')).toBeNull();
  });

  it('reads microseconds and repeated samples of the same state', () => {
    const cap = parseCapture('t_us,level\n0,0\n1000,1\n2000,1\n61000,0\n62000,0\n');
    expect(cap.marks).toEqual([[1, 61]]);
  });

  it('reads the interval CSV written by encode', () => {
    const cap = parseCapture(planToCsv(plan));
    expect(cap.marks.length).toBe(plan.marks.length);
    cap.marks.forEach(([a, b], i) => {
      expect(a).toBeCloseTo(plan.marks[i]![0], 2);
      expect(b).toBeCloseTo(plan.marks[i]![1], 2);
    });
  });

  it('rejects malformed captures with one line naming the row', () => {
    const bad = (text: string): string => {
      try {
        parseCapture(text, { name: 'keyer.csv' });
      } catch (err) {
        expect(err).toBeInstanceOf(InputError);
        expect((err as Error).message).not.toContain('\n');
        return (err as Error).message;
      }
      throw new Error('no error');
    };
    expect(bad('time_ms,state\n0,0\n10,1\n5,0\n')).toBe('keyer.csv: row 4: time 5 goes back (the previous row is later); rows must be in time order');
    expect(bad('time_ms,state\n0,0\n10,maybe\n')).toMatch(/^keyer\.csv: row 3: unknown state 'maybe'/);
    expect(bad('time_ms,state\n0,0\n10,0\n')).toMatch(/^keyer\.csv: no complete key-down in 2 rows/);
    expect(bad('0,0\n10,1\n')).toMatch(/^keyer\.csv: row 1: the first row must name the columns/);
    expect(bad('time_ms,state\nabc,1\n')).toMatch(/^keyer\.csv: row 2: time 'abc' is not a number/);
    expect(bad('')).toBe('keyer.csv: empty capture');
    // A value with a line break in it (a quoted field) is shown on one line, escaped; long ones cut.
    expect(bad('time_ms,state\n0,"1\n#"\n')).toBe("keyer.csv: row 2: unknown state '1\\n#' (expected 1/0, high/low, on/off or down/up)");
    expect(bad(`time_ms,state\n0,${'x'.repeat(100)}\n`)).toBe(`keyer.csv: row 2: unknown state '${'x'.repeat(39)}…' (expected 1/0, high/low, on/off or down/up)`);
  });

  it('reads line endings mixed within a file (CRLF header, LF rows, a lone CR)', () => {
    // Found by the capture fuzz: with the ending guessed from the first line, the rows were one record.
    const cap = parseCapture('time_ms,state\r\n0,1\n60,0\r120,1\r\n300,0\n', { name: 'k.csv' });
    expect(cap.marks).toEqual([[0, 60], [120, 300]]);
  });

  it('warns when the capture ends with the key down', () => {
    const cap = parseCapture('time_ms,state\n0,1\n60,0\n120,1\n', { name: 'k.csv' });
    expect(cap.marks).toEqual([[0, 60]]);
    expect(cap.warnings.some((w) => w.includes('ends with the key down'))).toBe(true);
  });

  it('streams a capture file to the same marks as the in-memory reader', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'keyform-capture-'));
    const path = join(dir, 'keyer.csv');
    // One row per 0.5 ms sample, as some analysers export: mostly repeated states.
    const rows = ['time_ms,state'];
    let k = 0;
    for (let t = 0; t <= plan.totalMs + 10; t += 0.5) {
      while (k < plan.marks.length && t >= plan.marks[k]![1]) k++;
      rows.push(`${t},${k < plan.marks.length && t >= plan.marks[k]![0] ? 1 : 0}`);
    }
    writeFileSync(path, rows.join('\n') + '\n');
    const streamed = await readCaptureFile(path);
    expect(streamed).toEqual(parseCapture(rows.join('\n'), { name: path }));
    expect(streamed.marks.length).toBe(plan.marks.length);
    streamed.marks.forEach(([a, b], i) => {
      // Edges land on the next 0.5 ms sample at or after the planned edge.
      expect(a - plan.marks[i]![0]).toBeGreaterThanOrEqual(0);
      expect(a - plan.marks[i]![0]).toBeLessThan(0.5);
      expect(b - plan.marks[i]![1]).toBeGreaterThanOrEqual(0);
      expect(b - plan.marks[i]![1]).toBeLessThan(0.5);
    });
    await expect(readCaptureFile(join(dir, 'nothing.csv'))).rejects.toThrow(`${join(dir, 'nothing.csv')}: no such file`);
  });
});

