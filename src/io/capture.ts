/**
 * Logic captures of a keying line as CSV: a header naming a time column (its unit in the name:
 * `time_s`, `Time [s]`, `time_ms`, `t (us)`; a bare `time` means seconds) and a state column, then
 * one row per edge or sample. Also reads the interval CSV written by `keyform encode --format csv`
 * (`state,startMs,durationMs`), so a plan can stand in for a capture.
 */
import { parse } from 'csv-parse/sync';
import { InputError } from '../core/errors.js';
import type { Interval } from '../core/timeline.js';
import { readInputFile } from './files.js';

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

interface Row {
  record: string[];
  info: { lines: number };
}

function parseRows(text: string, name: string): Row[] {
  try {
    return parse(text, { skip_empty_lines: true, trim: true, comment: '#', relax_column_count: true, info: true, bom: true }) as unknown as Row[];
  } catch (err) {
    throw new InputError(`${name}: not a readable CSV file (${(err as Error).message})`);
  }
}

function readIntervalCsv(rows: Row[], name: string): Capture {
  const marks: Interval[] = [];
  let prevEnd = -Infinity;
  for (const { record, info } of rows.slice(1)) {
    const [state, startText, durText] = record;
    const where = `${name}: row ${info.lines}`;
    const start = Number(startText);
    const dur = Number(durText);
    if (!Number.isFinite(start) || !Number.isFinite(dur) || startText === '' || durText === '') {
      throw new InputError(`${where}: startMs and durationMs must be numbers (got '${startText ?? ''}', '${durText ?? ''}')`);
    }
    if (state !== 'down' && state !== 'up' && state !== 'ptt') throw new InputError(`${where}: unknown state '${state ?? ''}' (expected down, up or ptt)`);
    if (state !== 'down') continue;
    if (dur <= 0) throw new InputError(`${where}: a key-down must last longer than 0 ms (got ${dur})`);
    if (start < prevEnd) throw new InputError(`${where}: starts at ${start} ms, before the previous key-down ends (${prevEnd} ms)`);
    marks.push([start, start + dur]);
    prevEnd = start + dur;
  }
  if (marks.length === 0) throw new InputError(`${name}: no key-down rows`);
  return { marks, timeUnit: 'ms', rows: rows.length - 1, stateColumn: 'state', warnings: [] };
}

/**
 * Reads a logic-capture CSV into key-down intervals.
 * @throws InputError naming the row for a missing header, a time that goes back, an unknown state
 *   value, or a capture with no key-down.
 * @example parseCapture('time_ms,state\n0,1\n60,0\n').marks //=> [[0, 60]]
 */
export function parseCapture(text: string, options: CaptureReadOptions = {}): Capture {
  const name = options.name ?? 'capture';
  const rows = parseRows(text, name);
  if (rows.length === 0) throw new InputError(`${name}: empty capture`);
  const header = rows[0]!.record.map((h) => h.trim());
  if (header.join(',').toLowerCase() === 'state,startms,durationms') return readIntervalCsv(rows, name);

  const timeCol = header.findIndex((h) => timeUnitFromHeader(h) !== null);
  if (timeCol < 0) {
    throw new InputError(`${name}: row ${rows[0]!.info.lines}: the first row must name the columns, with the time unit (e.g. time_s,state or time_ms,state)`);
  }
  const timeUnit = timeUnitFromHeader(header[timeCol]!)!;
  let stateCol: number;
  if (options.column !== undefined) {
    stateCol = header.findIndex((h) => h.toLowerCase() === options.column!.toLowerCase());
    if (stateCol < 0) throw new InputError(`${name}: no column '${options.column}' (columns: ${header.join(', ')})`);
  } else {
    stateCol = header.findIndex((h) => /^(state|key|level|value)$/i.test(h));
    if (stateCol < 0) stateCol = header.findIndex((_, i) => i !== timeCol);
    if (stateCol < 0) throw new InputError(`${name}: needs a state column next to the time column`);
  }

  const marks: Interval[] = [];
  const warnings: string[] = [];
  let prevTime = -Infinity;
  let down: boolean | null = null;
  let downSince = 0;
  let firstDownAtStart = false;
  for (const [k, { record, info }] of rows.slice(1).entries()) {
    const where = `${name}: row ${info.lines}`;
    const timeText = record[timeCol] ?? '';
    const t = Number(timeText) * MS_PER[timeUnit];
    if (timeText === '' || !Number.isFinite(t)) throw new InputError(`${where}: time '${timeText}' is not a number`);
    if (t < prevTime) throw new InputError(`${where}: time ${timeText} goes back (the previous row is later); rows must be in time order`);
    prevTime = t;
    const raw = (record[stateCol] ?? '').toLowerCase();
    let isDown: boolean;
    if (raw === 'down') isDown = true;
    else if (raw === 'up') isDown = false;
    else if (DOWN_WORDS.has(raw)) isDown = !options.activeLow;
    else if (UP_WORDS.has(raw)) isDown = Boolean(options.activeLow);
    else throw new InputError(`${where}: unknown state '${record[stateCol] ?? ''}' (expected 1/0, high/low, on/off or down/up)`);
    if (down === null && isDown && k === 0) firstDownAtStart = true;
    if (isDown && down !== true) downSince = t;
    if (!isDown && down === true && t > downSince) marks.push([downSince, t]);
    down = isDown;
  }
  if (down === true) warnings.push(`${name}: the capture ends with the key down; the last key-down is left out`);
  if (firstDownAtStart && marks.length > 0) warnings.push(`${name}: the capture starts with the key down; the first mark starts at the first row`);
  if (marks.length === 0) throw new InputError(`${name}: no complete key-down in ${rows.length - 1} rows (no edges)`);
  return { marks, timeUnit, rows: rows.length - 1, stateColumn: header[stateCol]!, warnings };
}

/** Reads a logic-capture CSV file; see {@link parseCapture}. */
export async function readCaptureFile(path: string, options: CaptureReadOptions = {}): Promise<Capture> {
  return parseCapture((await readInputFile(path)).toString('utf8'), { name: path, ...options });
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
