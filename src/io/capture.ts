/**
 * Logic captures of a keying line as CSV: a header naming a time column (its unit in the name:
 * `time_s`, `Time [s]`, `time_ms`, `t (us)`; a bare `time` means seconds) and a state column, then
 * one row per edge or sample. Also reads the interval CSV written by `keyform encode --format csv`
 * (`state,startMs,durationMs`), so a plan can stand in for a capture.
 */
import { createReadStream } from 'node:fs';
import { open } from 'node:fs/promises';
import { parse as parseStream } from 'csv-parse';
import { parse } from 'csv-parse/sync';
import { InputError } from '../core/errors.js';
import type { Interval } from '../core/timeline.js';

export type CaptureTimeUnit = 's' | 'ms' | 'us';

export interface CaptureReadOptions {
  /** Name used in error messages (the file name). */
  name?: string;
  /** The line is active low: state 0/low means key down. `down`/`up` values are unaffected. */
  activeLow?: boolean;
  /** Name of the state column (case-insensitive); default: `state`, `key`, `level` or `value`, else the second column. */
  column?: string;
}

export interface Capture {
  /** Key-down intervals [ms] on the capture's own time base. */
  marks: Interval[];
  timeUnit: CaptureTimeUnit;
  /** Data rows read. */
  rows: number;
  stateColumn: string;
  warnings: string[];
}

const MS_PER: Record<CaptureTimeUnit, number> = { s: 1000, ms: 1, us: 0.001 };
const DOWN_WORDS = new Set(['1', 'high', 'h', 'on', 'true', 'closed', 'mark']);
const UP_WORDS = new Set(['0', 'low', 'l', 'off', 'false', 'open', 'space']);

/** Time unit from a column name, or null when the name is not a time column. */
export function timeUnitFromHeader(name: string): CaptureTimeUnit | null {
  const n = name.trim().toLowerCase();
  if (!/^(time|t\b|t[_ ([]|timestamp|seconds|secs?\b|ms\b|milliseconds|us\b|µs|microseconds)/.test(n)) return null;
  if (/(^|[^a-z])(ms|msec|millis(econds?)?)([^a-z]|$)|milliseconds/.test(n)) return 'ms';
  if (/(^|[^a-z])(us|µs|usec|micros(econds?)?)([^a-z]|$)|microseconds/.test(n)) return 'us';
  return 's';
}

/**
 * csv-parse settings shared by the string and the streaming reader (one record per line). Lines may
 * end in LF, CRLF or CR, mixed within a file (an export edited on another system): left to guess from
 * the first line, the parser would take a file whose first line ends in CRLF and the rest in LF as one
 * long record.
 */
const CSV_OPTIONS = { trim: true, relax_column_count: true, bom: true, record_delimiter: ['\r\n', '\n', '\r'] };

/**
 * A value from the file as a message shows it: on one line (line breaks and other control characters
 * written as escapes) and at most 40 characters.
 * @example shown('1\n#') //=> '1\\n#'
 */
export function shown(value: string): string {
  const escaped = value.replace(/[\u0000-\u001f\u007f]/g, (c) => (c === '\n' ? '\\n' : c === '\r' ? '\\r' : c === '\t' ? '\\t' : `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`));
  return escaped.length > 40 ? `${escaped.slice(0, 39)}…` : escaped;
}

/**
 * Turns capture rows into key-down intervals one row at a time, so a file can be streamed with
 * memory that grows only with the marks. Blank lines and lines starting with `#` are skipped.
 * Rows are numbered by line (captures have no quoted line breaks).
 */
class CaptureRows {
  private readonly name: string;
  private mode: 'header' | 'edges' | 'intervals' = 'header';
  private timeCol = 0;
  private stateCol = 1;
  private timeUnit: CaptureTimeUnit = 'ms';
  private stateName = 'state';
  private readonly marks: Interval[] = [];
  private readonly warnings: string[] = [];
  private rows = 0;
  private prev = -Infinity;
  private down: boolean | null = null;
  private downSince = 0;
  private firstDownAtStart = false;

  constructor(private readonly options: CaptureReadOptions) {
    this.name = options.name ?? 'capture';
  }

  /** Takes the record on 1-based line `line`. */
  push(record: string[], line: number): void {
    if (record.length === 0 || (record.length === 1 && record[0] === '') || record[0]!.startsWith('#')) return;
    if (this.mode === 'header') this.header(record, line);
    else if (this.mode === 'intervals') this.interval(record, `${this.name}: row ${line}`);
    else this.edge(record, `${this.name}: row ${line}`);
  }

  private header(record: string[], line: number): void {
    const header = record.map((h) => h.trim());
    if (header.join(',').toLowerCase() === 'state,startms,durationms') {
      this.mode = 'intervals';
      return;
    }
    this.timeCol = header.findIndex((h) => timeUnitFromHeader(h) !== null);
    if (this.timeCol < 0) {
      throw new InputError(`${this.name}: row ${line}: the first row must name the columns, with the time unit (e.g. time_s,state or time_ms,state)`);
    }
    this.timeUnit = timeUnitFromHeader(header[this.timeCol]!)!;
    const column = this.options.column;
    if (column !== undefined) {
      this.stateCol = header.findIndex((h) => h.toLowerCase() === column.toLowerCase());
      if (this.stateCol < 0) throw new InputError(`${this.name}: no column '${shown(column)}' (columns: ${header.map(shown).join(', ')})`);
    } else {
      this.stateCol = header.findIndex((h) => /^(state|key|level|value)$/i.test(h));
      if (this.stateCol < 0) this.stateCol = header.findIndex((_, i) => i !== this.timeCol);
      if (this.stateCol < 0) throw new InputError(`${this.name}: needs a state column next to the time column`);
    }
    this.stateName = header[this.stateCol]!;
    this.mode = 'edges';
  }

  private edge(record: string[], where: string): void {
    this.rows++;
    const timeText = record[this.timeCol] ?? '';
    const t = Number(timeText) * MS_PER[this.timeUnit];
    if (timeText === '' || !Number.isFinite(t)) throw new InputError(`${where}: time '${shown(timeText)}' is not a number`);
    if (t < this.prev) throw new InputError(`${where}: time ${shown(timeText)} goes back (the previous row is later); rows must be in time order`);
    this.prev = t;
    const raw = (record[this.stateCol] ?? '').toLowerCase();
    let isDown: boolean;
    if (raw === 'down') isDown = true;
    else if (raw === 'up') isDown = false;
    else if (DOWN_WORDS.has(raw)) isDown = !this.options.activeLow;
    else if (UP_WORDS.has(raw)) isDown = Boolean(this.options.activeLow);
    else throw new InputError(`${where}: unknown state '${shown(record[this.stateCol] ?? '')}' (expected 1/0, high/low, on/off or down/up)`);
    if (this.down === null && isDown) this.firstDownAtStart = true;
    if (isDown && this.down !== true) this.downSince = t;
    if (!isDown && this.down === true && t > this.downSince) this.marks.push([this.downSince, t]);
    this.down = isDown;
  }

  private interval(record: string[], where: string): void {
    this.rows++;
    const [state, startText, durText] = record;
    const start = Number(startText);
    const dur = Number(durText);
    if (!Number.isFinite(start) || !Number.isFinite(dur) || !startText || !durText) {
      throw new InputError(`${where}: startMs and durationMs must be numbers (got '${shown(startText ?? '')}', '${shown(durText ?? '')}')`);
    }
    if (state !== 'down' && state !== 'up' && state !== 'ptt') throw new InputError(`${where}: unknown state '${shown(state ?? '')}' (expected down, up or ptt)`);
    if (state !== 'down') return;
    if (dur <= 0) throw new InputError(`${where}: a key-down must last longer than 0 ms (got ${dur})`);
    if (start < this.prev) throw new InputError(`${where}: starts at ${start} ms, before the previous key-down ends (${this.prev} ms)`);
    this.marks.push([start, start + dur]);
    this.prev = start + dur;
  }

  finish(): Capture {
    if (this.mode === 'header') throw new InputError(`${this.name}: empty capture`);
    if (this.mode === 'intervals') {
      if (this.marks.length === 0) throw new InputError(`${this.name}: no key-down rows`);
      return { marks: this.marks, timeUnit: 'ms', rows: this.rows, stateColumn: 'state', warnings: [] };
    }
    if (this.down === true) this.warnings.push(`${this.name}: the capture ends with the key down; the last key-down is left out`);
    if (this.firstDownAtStart && this.marks.length > 0) this.warnings.push(`${this.name}: the capture starts with the key down; the first mark starts at the first row`);
    if (this.marks.length === 0) throw new InputError(`${this.name}: no complete key-down in ${this.rows} rows (no edges)`);
    return { marks: this.marks, timeUnit: this.timeUnit, rows: this.rows, stateColumn: this.stateName, warnings: this.warnings };
  }
}

const csvError = (name: string, err: unknown): InputError =>
  err instanceof InputError ? err : new InputError(`${name}: not a readable CSV file (${(err as Error).message.split('\n')[0]})`);

/**
 * Reads a logic-capture CSV held in memory into key-down intervals.
 * @throws InputError naming the row for a missing header, a time that goes back, an unknown state
 *   value, or a capture with no key-down.
 * @example parseCapture('time_ms,state\n0,1\n60,0\n').marks //=> [[0, 60]]
 */
export function parseCapture(text: string, options: CaptureReadOptions = {}): Capture {
  const reader = new CaptureRows(options);
  try {
    (parse(text, CSV_OPTIONS) as string[][]).forEach((record, i) => reader.push(record, i + 1));
  } catch (err) {
    throw csvError(options.name ?? 'capture', err);
  }
  return reader.finish();
}

/**
 * Reads a logic-capture CSV file as a stream (memory grows with the marks, not the rows, so
 * sample-per-row exports of long captures are fine); see {@link parseCapture}.
 */
export async function readCaptureFile(path: string, options: CaptureReadOptions = {}): Promise<Capture> {
  await peekFile(path, 0); // one-line errors for a missing file or a folder
  const reader = new CaptureRows({ name: path, ...options });
  let line = 0;
  try {
    for await (const record of createReadStream(path).pipe(parseStream(CSV_OPTIONS))) reader.push(record as string[], ++line);
  } catch (err) {
    throw csvError(path, err);
  }
  return reader.finish();
}

/** The first `bytes` bytes of a file, with one-line errors for a missing file, a folder or no permission. */
export async function peekFile(path: string, bytes: number): Promise<Buffer> {
  let handle;
  try {
    handle = await open(path, 'r');
    const st = await handle.stat();
    if (st.isDirectory()) throw new InputError(`${path}: is a folder, not a file`);
    const buf = Buffer.alloc(Math.min(bytes, st.size));
    await handle.read(buf, 0, buf.length, 0);
    return buf;
  } catch (err) {
    if (err instanceof InputError) throw err;
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(`${path}: no such file`);
    if (code === 'EISDIR') throw new InputError(`${path}: is a folder, not a file`);
    throw new InputError(`${path}: cannot read (${code === 'EACCES' ? 'permission denied' : (code ?? 'error')})`);
  } finally {
    await handle?.close();
  }
}

/**
 * Writes key-down intervals as a logic-capture CSV: a key-up row at the start of the capture
 * (`leadMs` before the first mark), then one row per edge.
 * @param timeUnit - `s` (9 decimals, 1 ns) or `ms` (6 decimals); default `s`.
 * @example captureFromMarks([[0, 60]], { timeUnit: 'ms', leadMs: 0 }) //=> 'time_ms,state\n0,0\n0,1\n60,0\n'
 */
export function captureFromMarks(marks: readonly Interval[], options: { timeUnit?: 's' | 'ms'; leadMs?: number } = {}): string {
  const unit = options.timeUnit ?? 's';
  const lead = options.leadMs ?? 0;
  const digits = unit === 's' ? 9 : 6;
  const fmt = (ms: number): string => String(Number((ms / MS_PER[unit]).toFixed(digits)));
  const rows = [`time_${unit},state`];
  if (marks.length > 0) rows.push(`${fmt(marks[0]![0] - lead)},0`);
  for (const [a, b] of marks) rows.push(`${fmt(a)},1`, `${fmt(b)},0`);
  return rows.join('\n') + '\n';
}
