/**
 * The row a batch report holds for one recording, and the helpers that make a row without
 * analysing anything. Kept apart from the analysis so that the main thread of `batch`, which only
 * writes rows, does not load the decoder, timing and shape code its workers run.
 */
import { InputError } from '../core/errors.js';

/** One line of a batch report. Numbers are null where they could not be measured. */
export interface BatchRow {
  /** The path as given. */
  file: string;
  /** Length of the audio [s]. */
  durationS: number | null;
  /** Decoded text. */
  text: string;
  /** Character speed [wpm, PARIS]. */
  wpm: number | null;
  /** Carrier tone in the recording [Hz]. */
  toneHz: number | null;
  /** Key-down carrier power over noise in 2500 Hz [dB] (the receiver's estimate). */
  snrDb: number | null;
  /** Median 10–90 % rise time of the marks [ms] (shape analysis). */
  riseMs: number | null;
  /** Occupied (99 % power) bandwidth per ITU-R SM.328 [Hz] (shape analysis). */
  occupiedBandwidthHz: number | null;
  /** Timing jitter [% of a unit] (timing report). */
  jitterPct: number | null;
  /**
   * `ok`, `no signal`, `mask fail` (the keyed spectrum exceeds the shape mask), `not judged` (decoded,
   * but too noisy for the shape analysis to judge the mask: rise and bandwidth are null) or `error`.
   */
  verdict: BatchVerdict;
  /** One-line reason when verdict is `error`. */
  error: string | null;
  /** Receiver, timing and shape warnings, one line each. */
  warnings: string[];
}

export type BatchVerdict = 'ok' | 'no signal' | 'mask fail' | 'not judged' | 'error';

/** Column order of the report files. */
export const BATCH_COLUMNS: readonly (keyof BatchRow)[] = [
  'file', 'durationS', 'text', 'wpm', 'toneHz', 'snrDb', 'riseMs', 'occupiedBandwidthHz', 'jitterPct', 'verdict', 'error', 'warnings',
];

/** A row with nothing measured: verdict `error` with the given one-line reason. */
export function errorRow(file: string, error: string | null): BatchRow {
  return {
    file, durationS: null, text: '', wpm: null, toneHz: null, snrDb: null, riseMs: null, occupiedBandwidthHz: null,
    jitterPct: null, verdict: 'error', error, warnings: [],
  };
}

/** Makes the one-line message of a failure: InputErrors as they are, anything else marked internal. */
export function errorLine(err: unknown): string {
  const msg = err instanceof Error ? err.message : String(err);
  const line = msg.split('\n')[0]!;
  return err instanceof InputError ? line : `internal error: ${line}`;
}
