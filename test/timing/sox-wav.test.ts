import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../testkit/cli.js';
import { M1677 } from '../../testkit/keyed-marks.js';

/**
 * WAV recordings made by Debian's `sox` (an independent generator): a 600 Hz tone for each mark and
 * silence for each gap, concatenated in the order the ITU-R M.1677-1 patterns give.
 */
const dir = mkdtempSync(join(tmpdir(), 'keyform-timing-sox-'));

interface Lengths {
  ditMs: number;
  dahMs: number;
  elementGapMs: number;
  letterGapMs: number;
  wordGapMs: number;
}

function segment(kind: 'tone' | 'gap', ms: number): string {
  const path = join(dir, `${kind}-${ms.toFixed(3)}.wav`);
  if (!existsSync(path)) {
    const s = (ms / 1000).toFixed(6);
    const effect = kind === 'tone' ? ['synth', s, 'sine', '600', 'vol', '0.5'] : ['trim', '0', s];
    execFileSync('sox', ['-n', '-r', '8000', '-b', '16', '-c', '1', path, ...effect]);
  }
  return path;
}

function soxRecording(name: string, text: string, l: Lengths): string {
  const parts: string[] = [segment('gap', 300)];
  text.split(' ').forEach((word, w) => {
    if (w > 0) parts.push(segment('gap', l.wordGapMs));
    Array.from(word).forEach((ch, c) => {
      if (c > 0) parts.push(segment('gap', l.letterGapMs));
      Array.from(M1677[ch]!).forEach((sym, e) => {
        if (e > 0) parts.push(segment('gap', l.elementGapMs));
        parts.push(segment('tone', sym === '-' ? l.dahMs : l.ditMs));
      });
    });
  });
  parts.push(segment('gap', 300));
  const out = join(dir, name);
  execFileSync('sox', [...parts, out]);
  return out;
}

describe('keyform timing on recordings made by sox', () => {
  const text = 'Q7ZKT DE Q3ABC';

  it('measures standard timing at 20 wpm: unit 60 ms, dash/dot 3, gaps 1/3/7', async () => {
    // PARIS: unit = 1200 / 20 = 60 ms (common practice); spacing per ITU-R M.1677-1 §2.
    const path = soxRecording('standard.wav', text, { ditMs: 60, dahMs: 180, elementGapMs: 60, letterGapMs: 180, wordGapMs: 420 });
    const run = await runCli(['timing', path, '--expect', text, '--wpm', '20', '--json', '--tolerance', '25']);
    const j = JSON.parse(run.stdout);
    expect(j.text).toBe(text);
    expect(Math.abs(j.unitMs / 60 - 1)).toBeLessThan(0.03);
    expect(Math.abs(j.dahDitRatio / 3 - 1)).toBeLessThan(0.05);
    expect(Math.abs(j.gapUnits.letter.median - 3)).toBeLessThan(0.2);
    expect(Math.abs(j.gapUnits.word.median - 7)).toBeLessThan(0.3);
    expect(j.alignment.missing).toEqual([]);
    expect(j.alignment.extra).toEqual([]);
    expect(j.alignment.pass).toBe(true);
    expect(run.code).toBe(0);
  });

  it('measures a dash/dot ratio of 3.5 and a weight of 60 % to the receiver\'s edge resolution', async () => {
    // Weight 60 % (dot share of dot + element gap) at unit 60 ms: dot 72 ms, element gap 48 ms;
    // dash = 3.5 dots = 252 ms; letter and word gaps shortened by the same 12 ms.
    const path = soxRecording('weighted.wav', text, { ditMs: 72, dahMs: 252, elementGapMs: 48, letterGapMs: 168, wordGapMs: 408 });
    const run = await runCli(['timing', path, '--json']);
    expect(run.code).toBe(0);
    const j = JSON.parse(run.stdout);
    expect(j.text).toBe(text);
    // Through audio the edges come from the receiver, which places them on a grid of about a tenth
    // of a unit (±3 ms here, ±4 % of a 72 ms dot per edge); the 3 % check of the measurement itself
    // is in measure.test.ts on exact marks.
    expect(Math.abs(j.dahDitRatio / 3.5 - 1)).toBeLessThan(0.1);
    expect(Math.abs(j.weightPct - 60)).toBeLessThan(5);
    expect(Math.abs(j.unitMs / 60 - 1)).toBeLessThan(0.06);
  });
});
