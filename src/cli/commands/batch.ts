import { closeSync, existsSync, fsyncSync, linkSync, openSync, readdirSync, readFileSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { basename, dirname, extname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { setFlagsFromString } from 'node:v8';
import type { Command } from 'commander';
import { parse } from 'csv-parse/sync';
import { InputError } from '../../core/errors.js';
import { cannotWrite } from '../../io/files.js';
import { formatJson } from '../../io/json.js';
import { BATCH_COLUMNS, errorLine, errorRow, type BatchRow } from '../batch-row.js';
import type { BatchTask } from '../batch-worker.js';
import type { CommandContext } from '../io.js';
import { numberIn } from '../options.js';
import { createProgress, formatElapsed } from '../progress.js';

export interface BatchCliOptions {
  jobs?: number;
  out?: string;
  force?: boolean;
  json?: boolean;
  tone?: number;
  channel?: number;
  shapeSeconds: number;
  shape: boolean;
  timeout?: number;
  recursive?: boolean;
  resume?: boolean;
}

export type ReportFormat = 'csv' | 'jsonl';

/** Audio files a folder contributes (by extension, any case). */
const AUDIO_EXTENSIONS = new Set(['.wav', '.wave']);

/**
 * Expands FOLDER|FILES… into a file list: a folder gives its .wav files, sorted by path, and with
 * `recursive` those of its subfolders too (symbolic links to folders are not followed, so a link
 * loop cannot trap it); a file is taken as it is (a bad one becomes a row with its error). A folder
 * without WAVs is an error.
 * @example collectInputs(['captures'], { recursive: true }) //=> ['captures/2026-11-30/a.wav', 'captures/b.wav', …]
 */
export function collectInputs(args: readonly string[], options: { recursive?: boolean } = {}): string[] {
  const files: string[] = [];
  for (const arg of args) {
    let isDir = false;
    try {
      isDir = statSync(arg).isDirectory();
    } catch {
      isDir = false;
    }
    if (!isDir) {
      files.push(arg);
      continue;
    }
    const inside = audioFilesIn(arg, options.recursive ?? false).sort();
    if (inside.length === 0) throw new InputError(`${arg}: no .wav files in this folder${options.recursive ? ' or below it' : ' (--recursive looks in its subfolders too)'}`);
    files.push(...inside);
  }
  return files;
}

/** The audio files in `folder` (and below it when `recursive`), unsorted. */
function audioFilesIn(folder: string, recursive: boolean): string[] {
  let entries;
  try {
    entries = readdirSync(folder, { withFileTypes: true });
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    throw new InputError(`${folder}: cannot list this folder (${code === 'EACCES' ? 'permission denied' : (code ?? 'error')})`);
  }
  const out: string[] = [];
  for (const e of entries) {
    const path = join(folder, e.name);
    if (e.isDirectory()) {
      if (recursive) out.push(...audioFilesIn(path, true));
    } else if (AUDIO_EXTENSIONS.has(extname(e.name).toLowerCase()) && (e.isFile() || isFileLink(path))) {
      out.push(path);
    }
  }
  return out;
}

/** A symbolic link (or other entry) that leads to a file. */
function isFileLink(path: string): boolean {
  try {
    return statSync(path).isFile();
  } catch {
    return false;
  }
}

/** Audio per worker when --jobs is not given [bytes]: a worker costs about a second of compiling before it runs at full speed. */
export const BYTES_PER_DEFAULT_WORKER = 24 * 1024 * 1024;

/**
 * Workers to start when --jobs is not given: one per CPU, but no more than files, and no more than
 * one per BYTES_PER_DEFAULT_WORKER of input, since each worker thread first compiles keyform's code
 * for itself (measured: about 1 s of CPU), which a small folder would not win back.
 * @example defaultJobs([1e6, 1e6], 2) //=> 1 (two one-minute files: one worker is faster)
 */
export function defaultJobs(fileBytes: readonly number[], cpus: number): number {
  const total = fileBytes.reduce((a, b) => a + b, 0);
  return Math.max(1, Math.min(cpus, fileBytes.length, Math.floor(total / BYTES_PER_DEFAULT_WORKER)));
}

function fileSize(path: string): number {
  try {
    return statSync(path).size;
  } catch {
    return 0; // reported as an error row later
  }
}

function csvField(value: unknown): string {
  if (value === null || value === undefined) return '';
  const s = Array.isArray(value) ? value.join(' | ') : String(value);
  return /[",\n\r]|^\s|\s$/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The CSV header line of a batch report (RFC 4180 quoting). */
export function csvHeader(): string {
  return `${BATCH_COLUMNS.join(',')}\n`;
}

/** One row as a report line: CSV (the columns of BATCH_COLUMNS; warnings joined by ` | `) or JSON Lines (the whole row). */
export function formatRow(row: BatchRow, format: ReportFormat): string {
  if (format === 'jsonl') return `${JSON.stringify(row)}\n`;
  return `${BATCH_COLUMNS.map((c) => csvField(row[c])).join(',')}\n`;
}

/** Report format from the file name: `.csv` or `.jsonl`. */
export function reportFormat(path: string): ReportFormat {
  const ext = extname(path).toLowerCase();
  if (ext === '.csv') return 'csv';
  if (ext === '.jsonl' || ext === '.ndjson') return 'jsonl';
  throw new InputError(`--out ${path}: the report must end in .csv or .jsonl`);
}

/** Where a report is written while the batch runs (see ReportWriter). */
function partialPathOf(reportPath: string): string {
  return join(dirname(reportPath), `${basename(reportPath)}.partial`);
}

/** The rows of an earlier report that `--resume` keeps, as the report's own lines. */
export interface EarlierReport {
  /** Where they were read from (the report, or its .partial when the run was killed before it ended). */
  path: string;
  /** The files they cover. */
  files: Set<string>;
  /** Their lines, newline included, to be copied as they are. */
  lines: string[];
  /** Rows left out because they are errors: those files are tried again. */
  retried: number;
}

/**
 * Reads an earlier batch report (CSV or JSON Lines, by the name of `reportPath`) for `--resume`:
 * every row but the errors is kept. A report that is not keyform's is a one-line error.
 */
export function readEarlierReport(path: string, reportPath: string): EarlierReport {
  const text = readFileSync(path, 'utf8');
  const kept: EarlierReport = { path, files: new Set(), lines: [], retried: 0 };
  const notOurs = (why: string): InputError => new InputError(`${path}: not a keyform batch report to resume (${why}); give another --out, or --force to start afresh`);
  const take = (file: unknown, verdict: unknown, line: string): void => {
    if (typeof file !== 'string' || typeof verdict !== 'string') throw notOurs('a row without file and verdict');
    if (verdict === 'error') {
      kept.retried++;
      return;
    }
    kept.files.add(file);
    kept.lines.push(line.endsWith('\n') ? line : `${line}\n`);
  };
  if (reportFormat(reportPath) === 'jsonl') {
    for (const line of text.split('\n')) {
      if (line.trim() === '') continue;
      let row: Partial<BatchRow>;
      try {
        row = JSON.parse(line) as Partial<BatchRow>;
      } catch {
        throw notOurs('a line that is not JSON');
      }
      take(row?.file, row?.verdict, line);
    }
    return kept;
  }
  if (text.trim() === '') return kept;
  if (!text.startsWith(csvHeader())) throw notOurs('its first line is not the report header');
  let records: { record: Record<string, string>; raw: string }[];
  try {
    records = parse(text, { columns: true, raw: true, relax_column_count: true }) as typeof records;
  } catch (err) {
    throw notOurs((err as Error).message.split('\n')[0]!);
  }
  for (const { record, raw } of records) take(record.file, record.verdict, raw);
  return kept;
}

/**
 * A report written row by row as files complete, then put in place in one step:
 * rows are appended (and flushed) to `OUT.partial`, which is renamed to OUT at the end, also after
 * Ctrl-C. A reader never sees a half-written OUT; if the process is killed outright, the rows done
 * so far are in `OUT.partial`. An existing OUT is never replaced without `force`, also when it
 * appeared while the batch ran (no-clobber link instead of rename).
 */
export class ReportWriter {
  readonly path: string;
  readonly partialPath: string;
  readonly format: ReportFormat;
  rows = 0;
  private fd: number | null;
  private readonly force: boolean;

  /** @param kept - Lines of an earlier report to start with (`--resume`); the report then replaces it. */
  constructor(path: string, force: boolean, kept: readonly string[] | null = null) {
    this.path = path;
    this.format = reportFormat(path);
    this.force = force || kept !== null;
    if (!this.force && existsSync(path)) throw new InputError(`${path}: already exists (use --force to replace it, or --resume to go on with it)`);
    this.partialPath = partialPathOf(path);
    try {
      this.fd = openSync(this.partialPath, 'w');
    } catch (err) {
      throw cannotWrite(path, err);
    }
    if (this.format === 'csv') this.write(csvHeader());
    for (const line of kept ?? []) this.write(line);
    this.rows = kept?.length ?? 0;
  }

  private write(text: string): void {
    if (this.fd === null) return;
    writeSync(this.fd, text);
  }

  append(row: BatchRow): void {
    this.write(formatRow(row, this.format));
    this.rows++;
  }

  /** Flushes and moves the report into place. */
  commit(): void {
    if (this.fd === null) return;
    fsyncSync(this.fd);
    closeSync(this.fd);
    this.fd = null;
    if (this.force) {
      renameSync(this.partialPath, this.path);
      return;
    }
    try {
      linkSync(this.partialPath, this.path);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EEXIST') {
        throw new InputError(`${this.path}: appeared while the batch ran; the report is in ${this.partialPath} (use --force to replace)`);
      }
      // File systems without hard links: plain rename.
      renameSync(this.partialPath, this.path);
      return;
    }
    unlinkSync(this.partialPath);
  }
}

/** Totals over a batch. */
export interface BatchSummary {
  files: number;
  done: number;
  ok: number;
  noSignal: number;
  maskFail: number;
  /** Rows whose shape was too noisy to judge. */
  notJudged: number;
  errors: number;
  /** Audio analysed [s]. */
  audioS: number;
  /** Wall time [s]. */
  wallS: number;
  /** Audio seconds per wall second. */
  realTimeFactor: number | null;
  jobs: number;
  interrupted: boolean;
  out: string | null;
}

export function summarize(rows: readonly BatchRow[], files: number, jobs: number, wallS: number, interrupted: boolean, out: string | null): BatchSummary {
  const audioS = rows.reduce((s, r) => s + (r.durationS ?? 0), 0);
  return {
    files,
    done: rows.length,
    ok: rows.filter((r) => r.verdict === 'ok').length,
    noSignal: rows.filter((r) => r.verdict === 'no signal').length,
    maskFail: rows.filter((r) => r.verdict === 'mask fail').length,
    notJudged: rows.filter((r) => r.verdict === 'not judged').length,
    errors: rows.filter((r) => r.verdict === 'error').length,
    audioS: Math.round(audioS * 1000) / 1000,
    wallS: Math.round(wallS * 1000) / 1000,
    realTimeFactor: wallS > 0 && audioS > 0 ? Math.round(audioS / wallS) : null,
    jobs,
    interrupted,
    out,
  };
}

function fmt(x: number | null, digits: number, width: number): string {
  return (x === null ? '–' : x.toFixed(digits)).padStart(width);
}

/** One human-readable line per file, for stdout while the batch runs; `maxWidth` cuts long text (a terminal). */
export function formatRowLine(row: BatchRow, nameWidth: number, maxWidth = Infinity): string {
  const name = row.file.length > nameWidth ? `…${row.file.slice(row.file.length - nameWidth + 1)}` : row.file.padEnd(nameWidth);
  const notes = row.warnings.length > 0 ? `  (${row.warnings.length} warning${row.warnings.length > 1 ? 's' : ''})` : '';
  const tail = row.verdict === 'error' ? row.error ?? '' : `${row.text}${notes}`;
  const line = `${name} ${fmt(row.durationS, 1, 7)} ${fmt(row.wpm, 1, 5)} ${fmt(row.toneHz, 0, 5)} ${fmt(row.snrDb, 1, 5)} ${fmt(row.riseMs, 2, 6)} ${fmt(row.occupiedBandwidthHz, 0, 6)}  ${row.verdict.padEnd(9)} ${tail}`;
  return line.length > maxWidth ? `${line.slice(0, Math.max(0, maxWidth - 1))}…` : line;
}

export function headerLine(nameWidth: number): string {
  return `${'file'.padEnd(nameWidth)} ${'dur s'.padStart(7)} ${'wpm'.padStart(5)} ${'tone'.padStart(5)} ${'snr'.padStart(5)} ${'riseMs'.padStart(6)} ${'obwHz'.padStart(6)}  ${'verdict'.padEnd(9)} text / error`;
}

/** The compiled worker next to this file (dist/cli/batch-worker.js); from sources, the built one in dist/. */
export function workerPath(): string {
  const here = new URL('../batch-worker.js', import.meta.url);
  if (existsSync(fileURLToPath(here))) return fileURLToPath(here);
  const built = new URL('../../../dist/cli/batch-worker.js', import.meta.url);
  if (existsSync(fileURLToPath(built))) return fileURLToPath(built);
  throw new Error('batch needs the compiled worker dist/cli/batch-worker.js: run npm run build');
}

export function registerBatch(program: Command, ctx: CommandContext): void {
  program
    .command('batch')
    .argument('<inputs...>', 'WAV files and/or folders (a folder gives its .wav files; with -r those of its subfolders too)')
    .summary('decode, time and shape-check every recording in a folder, in parallel')
    .description(
      'Analyse many recordings in parallel worker threads: decoded text, speed, tone, SNR, rise time, ' +
        'occupied bandwidth and a verdict per file. A file that cannot be read is a row with its error. ' +
        'Rows appear as files complete; with --out they are written to OUT.partial and moved to OUT at the end ' +
        '(also after Ctrl-C, which stops the batch and keeps the rows done so far).',
    )
    .option('-r, --recursive', 'also take the .wav files in the folders\' subfolders (sorted by path)')
    .option(
      '-j, --jobs <n>',
      `worker threads (1–64; default: CPU count, here ${availableParallelism()}, but one per ${BYTES_PER_DEFAULT_WORKER / 1024 / 1024} MiB of audio at most)`,
      numberIn('--jobs', 1, 64, { integer: true }),
    )
    .option('-o, --out <file>', 'write the report to FILE: .csv (one row per file) or .jsonl (one JSON object per line, with warnings)')
    .option('--force', 'replace --out if it exists')
    .option('--resume', 'go on with an existing --out report: keep its rows and analyse only the files it lacks (files that ended in an error are tried again)')
    .option('--json', 'print all rows and the summary as one JSON document on stdout')
    .option('--tone <hz>', 'carrier tone of every recording (Hz, 100–20000; default: found per file)', numberIn('--tone', 100, 20_000))
    .option('--channel <n>', 'channel to use, 1 = first (default: the one with the strongest keyed tone)', numberIn('--channel', 1, 256, { integer: true }))
    .option('--shape-seconds <s>', 'audio the shape analysis looks at, from the start of each file (s, 1–3600)', numberIn('--shape-seconds', 1, 3600), 60)
    .option('--no-shape', 'skip the keying-shape analysis (rise time and bandwidth stay empty)')
    .option('--timeout <s>', 'give up on a file after this long (s, 0.01–86400; default: no limit); it becomes an error row', numberIn('--timeout', 0.01, 86_400))
    .addHelpText(
      'after',
      `
Verdicts: ok, no signal (nothing keyed found), mask fail (keyed spectrum outside the shape mask),
not judged (too noisy to measure the shape), error.
Exit code: 0 all files read, 1 some file gave an error, 2 bad usage, 130 interrupted.

Examples:
  keyform batch recordings/
  keyform batch captures/ --jobs 2 --out report.csv
  keyform batch -r lab-2026-11/ --out november.jsonl
  keyform batch -r lab-2026-11/ --out november.jsonl --resume     (after Ctrl-C: go on)
  keyform batch q7zkt-*.wav --out report.jsonl --force --no-shape
`,
    )
    .action(async (inputs: string[], o: BatchCliOptions) => {
      await runBatch(inputs, o, ctx);
    });
}

/**
 * When the workers take every core, V8's background compiler threads have no idle core to run on:
 * they only take turns with the workers, and a worker keeps running its slow unoptimised code while
 * its compile job waits in the queue. Compiling on the worker thread itself (set before the pool
 * makes the workers' engines; it does not change the main thread's, which is already made) was
 * faster in 14 of 15 alternating rounds of a 6 × 1 h batch with 2 workers on 2 cores (by 0.16–1.34 s
 * of 5–9 s; once 0.11 s slower), measured with the built CLI. With fewer workers than cores the
 * default stays: the compiler then runs on an idle core for free.
 */
export function compileOnWorkerThreadsWhenBusy(jobs: number): void {
  if (jobs >= availableParallelism()) setFlagsFromString('--no-concurrent-recompilation');
}

/**
 * The order in which `jobs` workers take the files: with several, the largest first, so that the
 * last file to finish is a short one and no worker waits long for another at the end; one worker
 * keeps the given order.
 * @example workOrder(['a.wav', 'b.wav'], [10, 20], 2) //=> ['b.wav', 'a.wav']
 */
export function workOrder(files: readonly string[], sizes: readonly number[], jobs: number): string[] {
  return jobs > 1 ? files.map((f, i) => ({ f, size: sizes[i]! })).sort((a, b) => b.size - a.size).map((x) => x.f) : [...files];
}

async function runBatch(inputs: string[], o: BatchCliOptions, ctx: CommandContext): Promise<void> {
  const { io } = ctx;
  const all = collectInputs(inputs, { recursive: o.recursive });
  let earlier: EarlierReport | null = null;
  if (o.resume) {
    if (!o.out) throw new InputError('--resume needs --out REPORT: the report to go on with');
    if (o.force) throw new InputError('give --resume or --force, not both');
    reportFormat(o.out);
    const partial = partialPathOf(o.out);
    // The report, or what a run killed before it could finish left in its .partial.
    const from = existsSync(o.out) ? o.out : existsSync(partial) ? partial : null;
    if (from) earlier = readEarlierReport(from, o.out);
  }
  const files = earlier ? all.filter((f) => !earlier.files.has(f)) : all;
  if (earlier) {
    ctx.warn(
      `resuming ${earlier.path}: ${earlier.lines.length} row${earlier.lines.length === 1 ? '' : 's'} kept` +
        `${earlier.retried ? `, ${earlier.retried} error${earlier.retried === 1 ? '' : 's'} to try again` : ''}; ${files.length} of ${all.length} files to analyse`,
    );
    if (files.length === 0) return;
  }
  const sizes = files.map(fileSize);
  const jobs = Math.min(o.jobs ?? defaultJobs(sizes, availableParallelism()), files.length);
  const queue = workOrder(files, sizes, jobs);
  const filename = workerPath();
  compileOnWorkerThreadsWhenBusy(jobs);
  const writer = o.out ? new ReportWriter(o.out, Boolean(o.force), earlier ? earlier.lines : null) : null;
  const { Piscina } = await import('piscina');
  const pool = new Piscina<BatchTask, BatchRow>({ filename, minThreads: jobs, maxThreads: jobs, idleTimeout: 1000 });
  const abort = new AbortController();
  let interrupted = false;
  const onSigint = (): void => {
    interrupted = true;
    abort.abort('interrupted');
    io.stderr.write('\nkeyform: interrupted: stopping (rows done so far are kept; Ctrl-C again to quit at once)\n');
  };
  process.once('SIGINT', onSigint);

  const started = performance.now();
  const progress = createProgress(io, { label: 'batch', showAfterMs: 0, intervalMs: 200 });
  const rows: BatchRow[] = [];
  const nameWidth = Math.min(40, Math.max(12, ...files.map((f) => f.length)));
  const lines = !o.json;
  if (lines) io.stdout.write(`${headerLine(nameWidth)}\n`);
  const options: BatchTask['options'] = {
    toneHz: o.tone,
    channel: o.channel === undefined ? undefined : o.channel - 1,
    shapeSeconds: o.shapeSeconds,
    skipShape: !o.shape,
  };

  const redraw = (): void => {
    const audioS = rows.reduce((s, r) => s + (r.durationS ?? 0), 0);
    const errors = rows.filter((r) => r.verdict === 'error').length;
    progress.update(rows.length / files.length, `${rows.length}/${files.length} files${errors ? `, ${errors} errors` : ''}, ${Math.round(audioS)} s of audio`);
  };
  const record = (row: BatchRow): void => {
    rows.push(row);
    writer?.append(row);
    progress.done();
    // On a terminal, long text is cut to the width (the report file and --json keep all of it).
    if (lines) io.stdout.write(`${formatRowLine(row, nameWidth, io.stdout.isTTY ? (io.stdout.columns ?? 120) : Infinity)}\n`);
    redraw();
  };
  // Keep the elapsed time moving while long files are analysed (TTY only; the timer does not hold the process).
  const ticker = io.stderr.isTTY ? setInterval(redraw, 1000) : null;
  ticker?.unref();

  try {
    // At most `jobs` files in flight: a file's time limit starts when it starts, and Ctrl-C has no queue to drain.
    let next = 0;
    const lane = async (): Promise<void> => {
      while (next < queue.length && !interrupted) {
        const path = queue[next++]!;
        const limit = o.timeout ? AbortSignal.timeout(o.timeout * 1000) : null;
        const signal = limit ? AbortSignal.any([abort.signal, limit]) : abort.signal;
        try {
          record(await pool.run({ path, options }, { signal }));
        } catch (err) {
          if (interrupted) return; // aborted: not a row
          record(errorRow(path, limit?.aborted ? `${path}: gave up after ${o.timeout} s (--timeout)` : errorLine(err)));
        }
      }
    };
    await Promise.all(Array.from({ length: jobs }, lane));
  } finally {
    if (ticker) clearInterval(ticker);
    process.removeListener('SIGINT', onSigint);
    progress.done();
    await pool.destroy();
  }
  writer?.commit();

  const wallS = (performance.now() - started) / 1000;
  const summary = summarize(rows, files.length, jobs, wallS, interrupted, o.out ?? null);
  if (o.json) {
    const order = new Map(files.map((f, i) => [f, i]));
    const sorted = [...rows].sort((a, b) => order.get(a.file)! - order.get(b.file)!);
    io.stdout.write(formatJson({ rows: sorted, summary }));
  }
  const parts = [`${summary.ok} ok`];
  if (summary.noSignal) parts.push(`${summary.noSignal} no signal`);
  if (summary.maskFail) parts.push(`${summary.maskFail} mask fail`);
  if (summary.notJudged) parts.push(`${summary.notJudged} not judged`);
  if (summary.errors) parts.push(`${summary.errors} error${summary.errors > 1 ? 's' : ''}`);
  ctx.warn(
    `batch: ${summary.done} of ${summary.files} files (${parts.join(', ')}); ${summary.audioS.toFixed(1)} s of audio in ${formatElapsed(wallS * 1000)}` +
      `${summary.realTimeFactor ? ` (${summary.realTimeFactor}× real time)` : ''} on ${jobs} worker${jobs > 1 ? 's' : ''}` +
      `${writer ? `; report: ${writer.path} (${writer.rows} rows)` : ''}${interrupted ? '; interrupted' : ''}`,
  );
  if (interrupted) ctx.setExitCode(130);
  else if (summary.errors > 0) ctx.setExitCode(1);
}
