import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BATCH_COLUMNS, type BatchRow } from '../../src/cli/batch-row.js';
import { collectInputs, formatRow, csvHeader } from '../../src/cli/commands/batch.js';
import { main } from '../../src/cli/main.js';
import type { CliIo } from '../../src/cli/io.js';
import { analyzeRecording } from '../../src/cli/analyze-recording.js';
import { synthesizeDriftingTone } from '../../src/core/signal/impair.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { encodeWav } from '../../src/io/wav-write.js';

const root = mkdtempSync(join(tmpdir(), 'keyform-batch-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const BIN = join(import.meta.dirname, '../../dist/cli/bin.js');

function fakeIo(): CliIo & { out: () => string; err: () => string } {
  let out = '';
  let err = '';
  return {
    stdout: { write: (s: string | Uint8Array) => ((out += String(s)), true), isTTY: false },
    stderr: { write: (s: string | Uint8Array) => ((err += String(s)), true), isTTY: false },
    stdin: process.stdin,
    env: { NO_COLOR: '1' },
    out: () => out,
    err: () => err,
  };
}

async function run(args: string[]): Promise<{ code: number; out: string; err: string }> {
  const io = fakeIo();
  const code = await main(args, io);
  return { code, out: io.out(), err: io.err() };
}

/** A clean recording of `text` made by keyform's own synthesizer (8 kHz, 16-bit). */
function recording(path: string, text: string, wpm: number): void {
  const plan = planKeying(text, { wpm });
  const tone = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 650, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 300 });
  writeFileSync(path, encodeWav({ sampleRate: 8000, channels: [tone.samples] }));
}

const folder = join(root, 'captures');
const messages: Record<string, string> = { 'q7zkt-a.wav': 'Q7ZKT TEST', 'q3abc-b.wav': 'Q3ABC DE Q7ZKT K' };

beforeAll(() => {
  mkdirSync(folder);
  for (const [name, text] of Object.entries(messages)) recording(join(folder, name), text, 22);
  writeFileSync(join(folder, 'broken.wav'), 'this is a log file, not audio\n');
  writeFileSync(join(folder, 'readme.txt'), 'not picked up: not a .wav');
  // Batch runs its workers from the compiled files in dist/ (npm test builds first; build here if it did not).
  const worker = join(import.meta.dirname, '../../dist/cli/batch-worker.js');
  if (!existsSync(worker)) {
    const tsc = join(import.meta.dirname, '../../node_modules/typescript/bin/tsc');
    spawnSync(process.execPath, [tsc, '-p', join(import.meta.dirname, '../../tsconfig.json')], { stdio: 'ignore' });
  }
  expect(existsSync(worker)).toBe(true);
}, 180_000);

describe('keyform batch', () => {
  it('gives one row per .wav file; the broken file is a row with its one-line error and the others decode', async () => {
    const { code, out, err } = await run(['batch', folder, '--jobs', '2', '--json']);
    const report = JSON.parse(out) as { rows: BatchRow[]; summary: { files: number; errors: number; done: number } };
    expect(report.rows.map((r) => r.file)).toEqual(['broken.wav', 'q3abc-b.wav', 'q7zkt-a.wav'].map((f) => join(folder, f)));
    const broken = report.rows[0]!;
    expect(broken.verdict).toBe('error');
    expect(broken.error).toBe(`${join(folder, 'broken.wav')}: not a WAV file (no RIFF/WAVE header)`);
    for (const row of report.rows.slice(1)) {
      expect(row.error).toBeNull();
      // The text that was keyed (our own plan) comes back.
      expect(row.text.trim()).toBe(messages[row.file.split('/').pop()!]);
      // 22 WPM as planned (PARIS), within 5 %.
      expect(Math.abs(row.wpm! - 22) / 22).toBeLessThan(0.05);
      expect(Math.abs(row.toneHz! - 650)).toBeLessThan(10);
    }
    expect(report.summary).toMatchObject({ files: 3, done: 3, errors: 1 });
    expect(code).toBe(1); // some file gave an error
    expect(err).toMatch(/batch: 3 of 3 files \(2 ok, 1 error\)/);
  });

  it('writes a CSV report (read back with csv-parse) and never replaces it without --force', async () => {
    const out = join(root, 'report.csv');
    const first = await run(['batch', folder, '--out', out]);
    expect(first.code).toBe(1);
    const text = readFileSync(out, 'utf8');
    const records = parse(text, { columns: true }) as Record<string, string>[];
    expect(Object.keys(records[0]!)).toEqual([...BATCH_COLUMNS]);
    expect(records.length).toBe(3);
    expect(records.find((r) => r.file.endsWith('broken.wav'))!.verdict).toBe('error');
    expect(existsSync(`${out}.partial`)).toBe(false);

    const again = await run(['batch', folder, '--out', out]);
    expect(again.code).toBe(2);
    expect(again.err).toBe(`keyform: ${out}: already exists (use --force to replace it, or --resume to go on with it)\n`);
    expect(readFileSync(out, 'utf8')).toBe(text);

    writeFileSync(out, 'old');
    const forced = await run(['batch', join(folder, 'q7zkt-a.wav'), '--out', out, '--force']);
    expect(forced.code).toBe(0);
    expect((parse(readFileSync(out, 'utf8'), { columns: true }) as unknown[]).length).toBe(1);
  });

  it("gives a file the same row whatever a worker analysed before it (nothing of one file's leaks into the next)", async () => {
    // A worker thread keeps its engine, and some objects of the file before, from one file to the
    // next; a row must still be a function of its file alone. A different kind of file in between:
    // 48 kHz, a drifting tone at 12 dB SNR, then a broken file.
    const other = join(root, 'drifting-48k.wav');
    const plan = planKeying('Q3ABC DE Q7ZKT RST 579', { wpm: 25 });
    const x = synthesizeDriftingTone({ marks: plan.marks, sampleRate: 48000, toneHz: 820, levelDb: -6, edge: 'raised-cosine', riseMs: 3, padMs: 300 }, (t) => 2 * t).samples;
    addNoise(x, noiseSigmaForSnr(10 ** (-6 / 20), 48000, 12), 3);
    writeFileSync(other, encodeWav({ sampleRate: 48000, channels: [x] }));
    const a = join(folder, 'q7zkt-a.wav');
    const order = [a, other, join(folder, 'broken.wav'), other, a];
    const rows: BatchRow[] = [];
    for (const file of order) rows.push(await analyzeRecording(file, {}));
    expect(rows[0]!.text.trim()).toBe('Q7ZKT TEST');
    expect(rows[1]!.text.trim()).toBe(plan.text);
    expect(rows[2]!.verdict).toBe('error');
    expect(rows[4]).toEqual(rows[0]);
    expect(rows[3]).toEqual(rows[1]);
  });

  it('writes JSON Lines, one object per file', async () => {
    const out = join(root, 'report.jsonl');
    await run(['batch', folder, '--out', out, '--no-shape']);
    const rows = readFileSync(out, 'utf8').trim().split('\n').map((l) => JSON.parse(l) as BatchRow);
    expect(rows.length).toBe(3);
    expect(rows.every((r) => r.riseMs === null && r.occupiedBandwidthHz === null)).toBe(true);
  });

  it('makes a missing file given by name a row, and a folder without recordings a usage error', async () => {
    const missing = join(root, 'nowhere.wav');
    const r = await run(['batch', missing, '--json']);
    const report = JSON.parse(r.out) as { rows: BatchRow[] };
    expect(report.rows[0]!.error).toBe(`${missing}: no such file`);
    const empty = join(root, 'empty-folder');
    mkdirSync(empty);
    const e = await run(['batch', empty]);
    expect(e.code).toBe(2);
    expect(e.err).toBe(`keyform: ${empty}: no .wav files in this folder (--recursive looks in its subfolders too)\n`);
    const bad = await run(['batch', folder, '--out', join(root, 'report.txt')]);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/must end in \.csv or \.jsonl/);
  });

  it('takes the recordings of subfolders with --recursive, sorted by path; never follows a folder link', async () => {
    const lab = join(root, 'lab');
    for (const d of ['2026-11-30', '2026-12-01/late', 'empty']) mkdirSync(join(lab, d), { recursive: true });
    for (const f of ['b.wav', '2026-11-30/a.WAV', '2026-12-01/late/c.wav', '2026-12-01/notes.txt']) writeFileSync(join(lab, f), 'x');
    symlinkSync(lab, join(lab, '2026-12-01', 'loop')); // a link back up: must not be walked
    expect(collectInputs([lab])).toEqual([join(lab, 'b.wav')]);
    expect(collectInputs([lab], { recursive: true })).toEqual(
      ['2026-11-30/a.WAV', '2026-12-01/late/c.wav', 'b.wav'].map((f) => join(lab, f)),
    );
    const only = join(lab, 'empty');
    expect(() => collectInputs([only], { recursive: true })).toThrow(`${only}: no .wav files in this folder or below it`);
    // Through the command: the same files become rows (here all unreadable, one line each).
    const r = await run(['batch', '-r', lab, '--json', '--no-shape']);
    expect((JSON.parse(r.out) as { rows: BatchRow[] }).rows.map((x) => x.file)).toEqual(collectInputs([lab], { recursive: true }));
  });

  it('quotes CSV fields so that a standard parser reads back text with commas, quotes and spaces', () => {
    const row: BatchRow = {
      file: 'a,b.wav', durationS: 1.5, text: ' Q7ZKT "TEST", K', wpm: 20, toneHz: 700, snrDb: null, riseMs: 4.9,
      occupiedBandwidthHz: 150, jitterPct: null, verdict: 'ok', error: null, warnings: ['x'],
    };
    const [back] = parse(csvHeader() + formatRow(row, 'csv'), { columns: true }) as Record<string, string>[];
    expect(back!.file).toBe('a,b.wav');
    expect(back!.text).toBe(' Q7ZKT "TEST", K');
    expect(back!.snrDb).toBe('');
    expect(Number(back!.durationS)).toBe(1.5);
  });

  it('gives up on a file after --timeout: an error row, and the next file still runs', async () => {
    // 10 ms is less than a worker needs to start: every file times out, each on a fresh worker.
    const { code, out } = await run(['batch', folder, '--jobs', '1', '--timeout', '0.01', '--json']);
    const report = JSON.parse(out) as { rows: BatchRow[] };
    expect(report.rows.length).toBe(3);
    for (const row of report.rows) expect(row.error).toBe(`${row.file}: gave up after 0.01 s (--timeout)`);
    expect(code).toBe(1);
  });

  it('Ctrl-C stops the batch, keeps the rows already written, and exits 130', async () => {
    const many = join(root, 'many');
    mkdirSync(many);
    for (let i = 0; i < 12; i++) recording(join(many, `q7zkt-${String(i).padStart(2, '0')}.wav`), 'Q7ZKT BEACON TEST '.repeat(6), 25);
    const out = join(root, 'interrupted.csv');
    const child = spawn(process.execPath, [BIN, 'batch', many, '--jobs', '1', '--out', out], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    let sent = false;
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    const code = await new Promise<number | null>((resolve) => {
      child.stdout.on('data', (d: Buffer) => {
        stdout += d.toString();
        // Header line plus the first row: interrupt.
        if (!sent && stdout.split('\n').length >= 3) {
          sent = true;
          child.kill('SIGINT');
        }
      });
      child.on('close', resolve);
    });
    expect(sent).toBe(true);
    expect(code).toBe(130);
    expect(stderr).toMatch(/interrupted/);
    const rows = parse(readFileSync(out, 'utf8'), { columns: true }) as Record<string, string>[];
    expect(rows.length).toBeGreaterThanOrEqual(1);
    expect(rows.length).toBeLessThan(12);
    expect(existsSync(`${out}.partial`)).toBe(false);
  });
});
