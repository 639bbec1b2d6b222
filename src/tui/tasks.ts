/**
 * The slow jobs of the app as plain data — decoding a recording, measuring or predicting the keying
 * shape, sweeping the rise time — so they can run in a worker thread (worker.ts) or inline.
 * Every figure comes from the core's functions.
 */
import { readWavFile } from '../io/wav-read.js';
import { openAudio, readChannelWindow } from '../io/audio-source.js';
import { planKeying } from '../core/timing/plan.js';
import type { EdgeKind } from '../core/signal/edges.js';
import { loadReceive, loadShape, loadTiming, NotAvailableError, type DecodeResult } from './core-modules.js';

export type ShapeTask =
  | { kind: 'measure'; path: string }
  | { kind: 'predict'; wpm: number; farnsworthWpm: number | null; riseMs: number; edge: EdgeKind; message: string; quick?: boolean }
  | { kind: 'sweep'; wpm: number; farnsworthWpm: number | null; edge: EdgeKind; message: string };

export type Task = ShapeTask | { kind: 'decode'; path: string };

/** A decoded recording with the timing report of what was heard. */
export interface DecodedRecording {
  path: string;
  channelNote: string | null;
  decode: DecodeResult;
  /** measureTiming's report of the observed timeline, or null when not available. */
  timing: Record<string, unknown> | null;
  /** Why there is no timing report, when there is none. */
  timingNote?: string;
}

const yieldToInput = (): Promise<void> => new Promise((r) => setImmediate(r));

/** Reads and decodes a recording, then measures the timing of what was heard. */
export async function decodeRecording(path: string, onProgress: (fraction: number) => void): Promise<DecodedRecording> {
  const receive = await loadReceive();
  if (!receive) throw new NotAvailableError('the receiver');
  const audio = await readWavFile(path);
  let index = 0;
  let channelNote: string | null = null;
  if (audio.channels.length > 1 && receive.pickChannel) {
    const pick = receive.pickChannel(audio.channels, audio.sampleRate);
    index = pick.index;
    channelNote = `channel ${pick.index + 1} of ${audio.channels.length}: ${pick.reason}`;
  }
  const samples = audio.channels[index]!;
  let decode: DecodeResult;
  if (receive.StreamDecoder) {
    // Half-second chunks through the streaming receiver, yielding between them.
    const decoder = new receive.StreamDecoder(audio.sampleRate, { keepEnvelope: true });
    const chunk = Math.max(1024, Math.round(audio.sampleRate / 2));
    for (let i = 0; i < samples.length; i += chunk) {
      decoder.push(samples.subarray(i, Math.min(samples.length, i + chunk)));
      onProgress(Math.min(1, (i + chunk) / samples.length) * 0.9);
      await yieldToInput();
    }
    decode = decoder.finish();
  } else {
    decode = receive.decodeSamples(samples, audio.sampleRate, { keepEnvelope: true, onProgress: (f) => onProgress(f * 0.9) });
  }
  const timingModule = await loadTiming();
  let timing: Record<string, unknown> | null = null;
  let timingNote: string | undefined;
  if (!timingModule) timingNote = 'the timing report is not available yet in this build';
  else if (decode.marks.length === 0) timingNote = 'no marks heard, so no timing to report';
  else {
    try {
      timing = timingModule.measureTiming(decode, decode.unitMs > 0 ? { unitMsHint: decode.unitMs } : {});
    } catch (err) {
      timingNote = `no timing report: ${(err as Error).message}`;
    }
  }
  onProgress(1);
  return { path, channelNote, decode, timing, ...(timingNote ? { timingNote } : {}) };
}

/** Runs one shape job with the core's shape functions. */
export async function runShapeTask(task: ShapeTask, onProgress: (fraction: number) => void): Promise<unknown> {
  const shape = await loadShape();
  if (!shape) throw new NotAvailableError('the keying-shape analysis');
  switch (task.kind) {
    case 'measure': {
      // As `keyform shape` reads it: streamed, and only the default stretch of a long recording kept.
      const audio = await openAudio(task.path, { streamAboveBytes: 0, reuseChunks: true });
      const { samples, fromS, totalS } = await readChannelWindow(audio, 0, 0, shape.defaultShapeWindowS?.(audio.sampleRate) ?? Infinity);
      const report = shape.measureShape(samples, audio.sampleRate, { onProgress });
      const note = shape.stretchNote?.(fromS, samples.length / audio.sampleRate, totalS);
      if (note) report.warnings.push(`${note.text}: \`keyform shape --from S --seconds S\` analyses another stretch`);
      return report;
    }
    case 'predict': {
      // The planned message's own marks, so the figures describe what this plan would send.
      const marks = planKeying(task.message, { wpm: task.wpm, farnsworthWpm: task.farnsworthWpm }).marks;
      return shape.predictShape({
        wpm: task.wpm, farnsworthWpm: task.farnsworthWpm, riseMs: task.riseMs, edge: task.edge, text: task.message, marks,
        findShortestRise: !task.quick, onProgress,
      });
    }
    case 'sweep': {
      if (!shape.sweepRise) throw new NotAvailableError('the rise-time sweep');
      return shape.sweepRise({ wpm: task.wpm, farnsworthWpm: task.farnsworthWpm, edge: task.edge, text: task.message, onProgress });
    }
  }
}

export function runTask(task: Task, onProgress: (fraction: number) => void): Promise<unknown> {
  return task.kind === 'decode' ? decodeRecording(task.path, onProgress) : runShapeTask(task, onProgress);
}
