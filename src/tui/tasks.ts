/**
 * The slow jobs of the app as plain data — decoding a recording, measuring or predicting the keying
 * shape, sweeping the rise time — so they can run in a worker thread (worker.ts) or inline.
 * Every figure comes from the core's functions.
 */
import { decodeAudioSource, measureShapeOfFile } from '../cli/analyze-recording.js';
import { openAudio, type AudioSource } from '../io/audio-source.js';
import { planKeying } from '../core/timing/plan.js';
import type { EdgeKind } from '../core/signal/edges.js';
import { loadShape, loadTiming, NotAvailableError, type DecodeResult } from './core-modules.js';

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

/**
 * The same audio with a turn of the event loop after every half second of it, so that the app
 * answers keys while a long recording decodes.
 */
function withPauses(source: AudioSource): AudioSource {
  const every = Math.max(1024, Math.round(source.sampleRate / 2));
  return {
    ...source,
    chunks: () =>
      (async function* () {
        let since = 0;
        for await (const chunk of source.chunks()) {
          yield chunk;
          since += chunk[0]!.length;
          if (since >= every) {
            since = 0;
            await yieldToInput();
          }
        }
      })(),
  };
}

/**
 * Reads and decodes a recording, then measures the timing of what was heard. The recording streams
 * through the receiver as in `keyform decode` (bounded memory whatever its length); a multichannel
 * one is decoded on the channel with the strongest keyed tone.
 */
export async function decodeRecording(path: string, onProgress: (fraction: number) => void): Promise<DecodedRecording> {
  const audio = withPauses(await openAudio(path, { reuseChunks: true }));
  const { result: decode, channelNote } = await decodeAudioSource(audio, { keepEnvelope: true, onProgress: (f) => onProgress(f * 0.9) });
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
      const { report, note } = await measureShapeOfFile(task.path, { onProgress });
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
