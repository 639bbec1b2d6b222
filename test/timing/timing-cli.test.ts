import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { planKeying } from '../../src/core/timing/plan.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { captureFromMarks } from '../../src/io/capture.js';
import { encodeWav } from '../../src/io/wav-write.js';
import { runCli } from '../../testkit/cli.js';
import { keyedMarks, standardLengths } from '../../testkit/keyed-marks.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-timing-'));
const MESSAGE = 'Q7ZKT TEST DE Q3ABC';
const WPM = 22;
const UNIT = 1200 / WPM; // PARIS: unit = 1200 / wpm ms (common practice)

/** A capture of the message keyed from ITU-R M.1677-1 patterns and spacing, mark lengths plus `extraMs`. */
function writeCapture(name: string, extraMs = 0): string {
  const marks = keyedMarks(MESSAGE, standardLengths(UNIT)).map(([a, b]): [number, number] => [a + 1000, b + 1000 + extraMs]);
  const path = join(dir, name);
  writeFileSync(path, captureFromMarks(marks, { timeUnit: 's', leadMs: 1000 }));
  return path;
}

describe('keyform timing', () => {
  const clean = writeCapture('clean.csv');
  const compensated = writeCapture('compensated.csv', 15);

  it('prints a readable report of a logic capture', async () => {
    const run = await runCli(['timing', clean]);
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
    expect(run.stdout).toContain(`Read as:        ${MESSAGE}`);
    expect(run.stdout).toContain(`Speed:          ${WPM.toFixed(1)} wpm (unit ${UNIT.toFixed(1)} ms)`);
    expect(run.stdout).toContain('Weighting:      50.0 %   dash/dot ratio 3.00');
    expect(run.stdout).toMatch(/^\s+1\.00\s+█+ \d+\s+░+ \d+$/m); // histogram row at 1 unit
  });

  it('gives every required field with --json', async () => {
    const run = await runCli(['timing', clean, '--expect', MESSAGE, '--wpm', String(WPM), '--json']);
    expect(run.code).toBe(0);
    const j = JSON.parse(run.stdout);
    for (const key of ['wpm', 'effectiveWpm', 'unitMs', 'weightPct', 'dahDitRatio', 'gapUnits', 'jitterPct', 'driftWpm', 'histogram', 'alignment']) {
      expect(j).toHaveProperty(key);
    }
    for (const key of ['offsetMs', 'elements', 'missing', 'extra', 'maxErrorMs', 'pass']) expect(j.alignment).toHaveProperty(key);
    expect(j.wpm).toBeCloseTo(WPM, 3);
    expect(j.gapUnits.letter.median).toBeCloseTo(3, 3); // ITU-R M.1677-1 §2
    expect(j.alignment.offsetMs).toBeCloseTo(1000, 3);
    expect(j.alignment.pass).toBe(true);
    expect(j.source.kind).toBe('capture');
  });

  it('fails (exit 1) and names the error against a plan JSON written by encode', async () => {
    const planPath = join(dir, 'plan.json');
    const enc = await runCli(['encode', MESSAGE, '--wpm', String(WPM), '--out', planPath, '--force']);
    expect(enc.code).toBe(0);
    const run = await runCli(['timing', compensated, '--expect-plan', planPath, '--json']);
    expect(run.code).toBe(1);
    const j = JSON.parse(run.stdout);
    expect(j.alignment.pass).toBe(false);
    expect(j.alignment.maxErrorMs).toBeCloseTo(15, 2); // the plan JSON rounds times to 1 µs
    expect(j.alignment.elements.every((e: { lengthErrorMs: number }) => Math.abs(e.lengthErrorMs - 15) < 1e-3)).toBe(true);
    const plain = await runCli(['timing', compensated, '--expect-plan', planPath]);
    expect(plain.code).toBe(1);
    expect(plain.stdout).toContain('Verdict:        FAIL');
    expect(plain.stdout).toMatch(/Largest error:\s+15\.0 ms \(28 % of a unit\)/); // 15 / 54.5 ms
  });

  it('passes with a tolerance wide enough for the error', async () => {
    const run = await runCli(['timing', compensated, '--expect', MESSAGE, '--wpm', String(WPM), '--tolerance', '30']);
    expect(run.code).toBe(0);
    expect(run.stdout).toContain('Verdict:        PASS');
  });

  it('exits 2 with one line naming the row of a malformed capture', async () => {
    const path = join(dir, 'bad.csv');
    writeFileSync(path, 'time_ms,state\n0,0\n100,1\n90,0\n');
    const run = await runCli(['timing', path]);
    expect(run.code).toBe(2);
    expect(run.stderr).toBe(`keyform: ${path}: row 4: time 90 goes back (the previous row is later); rows must be in time order\n`);
    expect(run.stdout).toBe('');
  });

  it('measures a WAV recording through the receiver', async () => {
    const plan = planKeying(MESSAGE, { wpm: 20 });
    const tone = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 650, levelDb: -6, edge: 'raised-cosine', riseMs: 4, padMs: 300 });
    const path = join(dir, 'q7.wav');
    writeFileSync(path, encodeWav({ sampleRate: 8000, channels: [tone.samples], encoding: 's16' }));
    const run = await runCli(['timing', path, '--expect', MESSAGE, '--wpm', '20', '--json', '--tolerance', '30']);
    const j = JSON.parse(run.stdout);
    expect(j.source.kind).toBe('wav');
    expect(j.text).toBe(MESSAGE);
    expect(Math.abs(j.unitMs / 60 - 1)).toBeLessThan(0.02); // 20 wpm → 60 ms (PARIS)
    expect(j.alignment.missing).toEqual([]);
    expect(j.alignment.extra).toEqual([]);
    // The synthesized audio starts padMs (plus half a ramp) before the first mark.
    expect(Math.abs(j.alignment.offsetMs - -tone.startMs)).toBeLessThan(0.1 * 60);
    expect(run.code).toBe(0);
  });

  it('reads the intended message from a file and a JSON timeline as input', async () => {
    const msgPath = join(dir, 'message.txt');
    writeFileSync(msgPath, `${MESSAGE}\n`);
    const timeline = join(dir, 'observed.json');
    writeFileSync(timeline, JSON.stringify({ marks: keyedMarks(MESSAGE, standardLengths(UNIT)) }));
    const run = await runCli(['timing', timeline, '--expect-file', msgPath, '--wpm', String(WPM), '--json']);
    expect(run.code).toBe(0);
    const j = JSON.parse(run.stdout);
    expect(j.source.kind).toBe('json');
    expect(j.alignment.pass).toBe(true);
    expect(j.alignment.maxErrorMs).toBeCloseTo(0, 6);
  });

  it('answers JSON inputs that are not a timeline with one line and exit 2 (null, a list, cut short)', async () => {
    for (const [name, text, why] of [
      ['null.json', 'null', 'a JSON input needs a "marks" list of [startMs, endMs]'],
      ['list.json', '[1, 2]', 'a JSON input needs a "marks" list of [startMs, endMs]'],
      ['cut.json', '{"marks":', 'not valid JSON (Unexpected end of JSON input)'],
    ] as const) {
      const path = join(dir, name);
      writeFileSync(path, text);
      const run = await runCli(['timing', path]);
      expect(run.code).toBe(2);
      expect(run.stderr).toBe(`keyform: ${path}: ${why}\n`);
      expect(run.stdout).toBe('');
    }
  });

  it('refuses two intended messages and a broken plan with exit code 2', async () => {
    const twice = await runCli(['timing', clean, '--expect', MESSAGE, '--expect-file', clean]);
    expect(twice.code).toBe(2);
    expect(twice.stderr).toMatch(/^keyform: give the intended message once/);
    const broken = join(dir, 'broken.json');
    writeFileSync(broken, JSON.stringify({ unitMs: 60, marks: [[0, 60], [120, 300]], characters: [{ text: 'E', pattern: '.' }] }));
    const run = await runCli(['timing', clean, '--expect-plan', broken]);
    expect(run.code).toBe(2);
    expect(run.stderr).toBe(`keyform: ${broken}: the characters' patterns cover 1 of the 2 marks\n`);
  });

  it('writes no colour codes when NO_COLOR is set', async () => {
    const run = await runCli(['timing', compensated, '--expect', MESSAGE, '--wpm', String(WPM)]);
    expect(run.stdout).not.toContain('\u001b[');
  });

  it('warns when the measured speed is far from the planned one', async () => {
    const run = await runCli(['timing', clean, '--expect', MESSAGE]); // planned at the default 20 wpm
    expect(run.stderr).toContain(`keyform: measured ${WPM.toFixed(1)} wpm, but the intended message is planned at 20 wpm (set --wpm?)`);
  });
});

