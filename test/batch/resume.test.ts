/**
 * `keyform batch … --out REPORT --resume`: an interrupted run goes on where it stopped. The rows of
 * the earlier report are kept byte for byte, only the files it lacks are analysed, files that ended in
 * an error are tried again, and a run killed before it could move its report into place is resumed
 * from the .partial it left.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { BatchRow } from '../../src/cli/batch-row.js';
import { csvHeader, formatRow, readEarlierReport } from '../../src/cli/commands/batch.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { encodeWav } from '../../src/io/wav-write.js';
import { runCli } from '../../testkit/cli.js';

const root = mkdtempSync(join(tmpdir(), 'keyform-resume-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

async function run(args: string[]): Promise<{ code: number; out: string; err: string }> {
  const r = await runCli(args);
  return { code: r.code, out: r.stdout, err: r.stderr };
}

function recording(path: string, text: string): void {
  const plan = planKeying(text, { wpm: 22 });
  const tone = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 650, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 300 });
  writeFileSync(path, encodeWav({ sampleRate: 8000, channels: [tone.samples] }));
}

const lines = (path: string): string[] => readFileSync(path, 'utf8').split('\n').filter((l) => l !== '');

describe('keyform batch --resume', () => {
  const folder = join(root, 'captures');
  mkdirSync(folder);
  const names = ['a-q7zkt.wav', 'b-q3abc.wav', 'c-q9xyz.wav'];
  names.forEach((n, i) => recording(join(folder, n), ['Q7ZKT TEST', 'Q3ABC DE Q7ZKT', 'Q9XYZ K'][i]!));
  writeFileSync(join(folder, 'd-broken.wav'), 'not audio');

  it('keeps the earlier rows as they were, analyses only the rest, and tries errors again', async () => {
    const report = join(root, 'report.jsonl');
    // The "interrupted" run: two of the files.
    expect((await run(['batch', join(folder, names[0]!), join(folder, names[1]!), '--out', report, '--no-shape'])).code).toBe(0);
    const first = lines(report);
    expect(first).toHaveLength(2);

    const again = await run(['batch', folder, '--out', report, '--resume', '--no-shape', '--json']);
    expect(again.err).toContain(`resuming ${report}: 2 rows kept; 2 of 4 files to analyse`);
    expect(again.code).toBe(1); // the broken file is an error row
    const newRows = (JSON.parse(again.out) as { rows: BatchRow[] }).rows;
    expect(newRows.map((r) => r.file)).toEqual([join(folder, 'c-q9xyz.wav'), join(folder, 'd-broken.wav')]);
    expect(newRows[0]!.text).toBe('Q9XYZ K');
    const second = lines(report);
    expect(second.slice(0, 2)).toEqual(first); // byte for byte
    expect(second).toHaveLength(4);

    // The broken file is fixed: --resume tries it again, the rest stays.
    recording(join(folder, 'd-broken.wav'), 'TEST');
    const third = await run(['batch', folder, '--out', report, '--resume', '--no-shape']);
    expect(third.err).toContain('3 rows kept, 1 error to try again; 1 of 4 files to analyse');
    expect(third.code).toBe(0);
    const rows = lines(report).map((l) => JSON.parse(l) as BatchRow);
    expect(rows.map((r) => r.file)).toEqual([...names, 'd-broken.wav'].map((n) => join(folder, n)));
    expect(rows.every((r) => r.verdict !== 'error')).toBe(true);

    // Nothing left: the report is untouched.
    const before = readFileSync(report, 'utf8');
    const done = await run(['batch', folder, '--out', report, '--resume']);
    expect(done.code).toBe(0);
    expect(done.err).toContain('0 of 4 files to analyse');
    expect(readFileSync(report, 'utf8')).toBe(before);
  });

  it('resumes from the .partial a killed run left, and keeps quoted CSV text verbatim', async () => {
    const report = join(root, 'report.csv');
    const kept: BatchRow = {
      file: join(folder, names[0]!), durationS: 3.5, text: 'Q7ZKT "TEST", K\nsecond line', wpm: 22, toneHz: 650, snrDb: 40, riseMs: null,
      occupiedBandwidthHz: null, jitterPct: 1.2, verdict: 'ok', error: null, warnings: ['one, with a comma'],
    };
    writeFileSync(`${report}.partial`, csvHeader() + formatRow(kept, 'csv'));
    const r = await run(['batch', folder, '--out', report, '--resume', '--no-shape']);
    expect(r.err).toContain(`resuming ${report}.partial: 1 row kept; 3 of 4 files to analyse`);
    expect(existsSync(`${report}.partial`)).toBe(false);
    const text = readFileSync(report, 'utf8');
    expect(text.startsWith(csvHeader() + formatRow(kept, 'csv'))).toBe(true);
    expect(readEarlierReport(report, report).files).toEqual(new Set([...names, 'd-broken.wav'].map((n) => join(folder, n))));
  });

  it('refuses what it cannot go on with: no --out, --force with it, a file that is not a report', async () => {
    expect((await run(['batch', folder, '--resume'])).err).toBe('keyform: --resume needs --out REPORT: the report to go on with\n');
    expect((await run(['batch', folder, '--out', join(root, 'x.csv'), '--resume', '--force'])).err).toBe('keyform: give --resume or --force, not both\n');
    const notOurs = join(root, 'other.csv');
    writeFileSync(notOurs, 'time_s,state\n0,1\n');
    const r = await run(['batch', folder, '--out', notOurs, '--resume']);
    expect(r.code).toBe(2);
    expect(r.err).toBe(`keyform: ${notOurs}: not a keyform batch report to resume (its first line is not the report header); give another --out, or --force to start afresh\n`);
    expect(readFileSync(notOurs, 'utf8')).toBe('time_s,state\n0,1\n');
  });
});
