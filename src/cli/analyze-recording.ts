/**
 * One recording in, one report row out: decode (receiver), timing statistics and keying shape,
 * read through openAudio so long files stream with bounded memory. Used by `batch` (in worker
 * threads); `decodeAudioSource` and `followText` also serve `decode -` on a pipe. Never throws for a
 * bad file: the error goes in the row.
 */
import { InputError } from '../core/errors.js';
import { errorLine, errorRow, type BatchRow } from './batch-row.js';
import { defaultShapeWindowS, measureShape, stretchNote, type ShapeOptions, type ShapeReport } from '../core/measure/shape.js';
import { measureTiming } from '../core/measure/timing.js';
import { pickChannel, StreamDecoder, type DecodeResult } from '../core/receive/index.js';
import { concatChunks, keepableChunk, openAudio, readChannelWindow, type AudioSource, type OpenAudioOptions } from '../io/audio-source.js';

export interface AnalyzeOptions extends Pick<OpenAudioOptions, 'raw' | 'rate' | 'channels' | 'streamAboveBytes' | 'stdin'> {
  /** Carrier tone [Hz]; found automatically when omitted. */
  toneHz?: number;
  /** Channel to use (0-based); by default the one with the strongest keyed tone. */
  channel?: number;
  /** How much audio the shape analysis looks at, from the start [s] (default 60): it keeps samples, so it is bounded. */
  shapeSeconds?: number;
  /** Skip the shape analysis (faster; rise and bandwidth stay empty). */
  skipShape?: boolean;
  /** Progress through the file, 0…1. */
  onProgress?: (fraction: number) => void;
}

/** Seconds of audio buffered to choose the channel of a multichannel recording. */
const PICK_SECONDS = 10;

function round(x: number | null | undefined, digits: number): number | null {
  if (x === null || x === undefined || !Number.isFinite(x)) return null;
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}

export interface StreamDecodeOptions {
  /** Carrier tone [Hz]; found automatically when omitted. */
  toneHz?: number;
  /** Channel to decode, 0-based (the CLI's --channel counts from 1); by default the one with the strongest keyed tone in the first seconds. */
  channel?: number;
  /** Keep this much audio of the decoded channel from the start, for analyses that need samples [s] (default 0). */
  keepSeconds?: number;
  /** Progress 0…1 (only when the length is known in advance). */
  onProgress?: (fraction: number) => void;
  /** Newly final text as it is decoded (live following of a pipe). */
  onText?: (text: string) => void;
  /** Keep the receiver's envelope and threshold, decimated, for plotting (the app). */
  keepEnvelope?: boolean;
}

export interface StreamDecode {
  result: DecodeResult;
  /** The channel decoded (0-based). */
  channel: number;
  /** Which channel was chosen and why (multichannel input without `channel`), else null. */
  channelNote: string | null;
  /** The first `keepSeconds` of the decoded channel. */
  excerpt: Float32Array;
}

/**
 * Runs an opened recording (file, raw PCM or stdin) through the streaming receiver chunk by chunk:
 * memory stays bounded whatever the length. A multichannel stream is held for its first
 * PICK_SECONDS to choose the channel with the strongest keyed tone, then only that channel is decoded.
 * @example const { result } = await decodeAudioSource(await openAudio('-', { stdin, raw: 's16le', rate: 8000 }), { onText: write });
 */
export async function decodeAudioSource(audio: AudioSource, options: StreamDecodeOptions = {}): Promise<StreamDecode> {
  try {
    return await decodeChunks(audio, options);
  } finally {
    await audio.close(); // the file is closed also when decoding stops early
  }
}

/**
 * The last recording's receiver and reports, held until the next recording has made its own. The
 * engine's optimised code refers weakly to the object shapes (hidden classes) it was compiled for;
 * when the last objects of a shape are collected between two files, the code is thrown away, and
 * the next file makes new shapes and compiles it all again. Over three 10-minute files that was 23
 * discarded compilations; holding the previous file's objects until the next file's exist keeps one
 * line of shapes alive (the cost: one finished receiver's memory, about 7 MB, and the last file's
 * marks and reports; not its audio excerpt, an array whose shape never goes).
 */
const heldUntilNext: { decoder: StreamDecoder | null; analysis: unknown } = { decoder: null, analysis: null };

async function decodeChunks(audio: AudioSource, options: StreamDecodeOptions): Promise<StreamDecode> {
  const { sampleRate, channelCount } = audio;
  if (options.channel !== undefined && (!Number.isInteger(options.channel) || options.channel < 0 || options.channel >= channelCount)) {
    const n = `${channelCount} channel${channelCount === 1 ? '' : 's'}`;
    throw new InputError(`${audio.name}: channel ${Number(options.channel) + 1} does not exist (the input has ${n}, numbered from 1)`);
  }
  const totalFrames = audio.durationMs !== null ? Math.round((audio.durationMs / 1000) * sampleRate) : null;
  const keepFrames = Math.round((options.keepSeconds ?? 0) * sampleRate);
  const excerpt = new Float32Array(totalFrames !== null ? Math.min(keepFrames, totalFrames) : keepFrames);
  let kept = 0;
  let channel = options.channel ?? (channelCount === 1 ? 0 : -1);
  let channelNote: string | null = null;
  const held: Float32Array[][] = [];
  let heldFrames = 0;
  const decoder = new StreamDecoder(sampleRate, {
    toneHz: options.toneHz,
    onText: options.onText,
    onProgress: options.onProgress,
    expectedSamples: totalFrames ?? undefined,
    keepEnvelope: options.keepEnvelope,
  });
  let fed = 0;

  const feed = (samples: Float32Array): void => {
    decoder.push(samples);
    fed += samples.length;
    if (kept < excerpt.length) {
      const n = Math.min(samples.length, excerpt.length - kept);
      excerpt.set(samples.subarray(0, n), kept);
      kept += n;
    }
  };
  const choose = (): void => {
    const joined = concatChunks(held, channelCount);
    const pick = pickChannel(joined, sampleRate);
    channel = pick.index;
    channelNote = `${audio.name}: using ${pick.reason}`;
    held.length = 0;
    feed(joined[channel]!);
  };

  for await (const chunk of audio.chunks()) {
    if (channel >= 0) {
      feed(chunk[channel]!);
      continue;
    }
    held.push(keepableChunk(audio, chunk));
    heldFrames += chunk[0]!.length;
    if (heldFrames >= PICK_SECONDS * sampleRate) choose();
  }
  if (channel < 0) choose();
  if (fed === 0) throw new InputError(`${audio.name}: no audio samples`);
  const result = decoder.finish();
  heldUntilNext.decoder = decoder;
  return { result, channel, channelNote, excerpt: excerpt.subarray(0, kept) };
}

/**
 * Collects live text pieces into lines for a terminal or a pipe: each piece is written as soon as
 * it arrives; a line ends at a word boundary past `lineWidth` characters, so a log of a pipe
 * stays readable. Call `end()` to finish the last line.
 * @example const f = followText((s) => process.stdout.write(s)); decoderOptions.onText = f.write;
 */
export function followText(write: (s: string) => void, lineWidth = 72): { write: (piece: string) => void; end: () => void } {
  let column = 0;
  return {
    write(piece: string) {
      let text = piece;
      if (column === 0) text = text.replace(/^ +/, '');
      else if (text.startsWith(' ') && column + text.length > lineWidth) {
        write('\n');
        column = 0;
        text = text.replace(/^ +/, '');
      }
      if (text === '') return;
      write(text);
      column += text.length;
    },
    end() {
      if (column > 0) write('\n');
      column = 0;
    },
  };
}

/**
 * Analyses one recording: decode, timing and shape. Files stream through the receiver in blocks
 * (any size, bounded memory); the shape analysis sees the first `shapeSeconds` of the chosen channel.
 * @param path - WAV file (or raw PCM with `raw`/`rate`), or `-` with `stdin`.
 * @returns A row; a file that cannot be read gives `verdict: 'error'` and the one-line reason.
 * @example (await analyzeRecording('recordings/beacon-after-fix.wav')).text //=> 'VVV Q7ZKT/B …'
 */
export async function analyzeRecording(path: string, options: AnalyzeOptions = {}): Promise<BatchRow> {
  const row = errorRow(path, null);
  try {
    await analyzeInto(row, path, options);
    row.verdict = row.text.trim() === '' ? 'no signal' : row.verdict === 'mask fail' || row.verdict === 'not judged' ? row.verdict : 'ok';
  } catch (err) {
    row.verdict = 'error';
    row.error = errorLine(err);
  }
  return row;
}

async function analyzeInto(row: BatchRow, path: string, options: AnalyzeOptions): Promise<void> {
  // Every file streams (block by block, whatever its size) unless told otherwise: the analysis goes
  // through the audio once, so reading it whole would only cost memory and a second pass to convert.
  const audio = await openAudio(path, { ...options, streamAboveBytes: options.streamAboveBytes ?? 0, reuseChunks: true });
  const keepSeconds = options.skipShape ? 0 : (options.shapeSeconds ?? 60);
  const { result, excerpt, channelNote } = await decodeAudioSource(audio, { toneHz: options.toneHz, channel: options.channel, keepSeconds, onProgress: options.onProgress });
  const sampleRate = audio.sampleRate;
  if (channelNote) row.warnings.push(channelNote);
  row.warnings.push(...audio.warnings);
  row.durationS = round((audio.durationMs ?? result.durationMs) / 1000, 3);
  row.text = result.text;
  row.wpm = round(result.wpm, 1);
  row.toneHz = round(result.toneHz, 1);
  row.snrDb = round(result.snrDb, 1);
  row.warnings.push(...result.warnings);

  let timing: unknown = null;
  let shape: unknown = null;
  if (result.marks.length >= 2) {
    try {
      const report = measureTiming(result);
      timing = report;
      row.jitterPct = round(report.jitterPct, 1);
    } catch (err) {
      row.warnings.push(`timing: ${errorLine(err)}`);
    }
  }
  if (excerpt.length > 0 && result.marks.length > 0) {
    try {
      const report = measureShape(excerpt, sampleRate, {
        toneHz: result.toneHz ?? options.toneHz,
        unitMs: result.unitMs ?? undefined,
        // The receiver has run already: its marks give the shape analysis its SNR estimate.
        timing: { marks: result.marks, unitMs: result.unitMs ?? null },
        findShortestRise: false,
      });
      shape = report;
      // Null where the shape report could not stand behind the figure (too noisy).
      row.riseMs = report.measurable.edges ? round(report.riseMs.median, 2) : null;
      row.occupiedBandwidthHz = report.measurable.spectrum ? round(report.occupiedBandwidthHz, 0) : null;
      if (report.mask.pass === false) row.verdict = 'mask fail';
      else if (report.mask.pass === null) row.verdict = 'not judged';
      row.warnings.push(...report.warnings.map((w) => `shape: ${w}`));
      // Too noisy: the warnings above say so. Otherwise say why the mask was not judged.
      if (report.mask.pass === null && report.measurable.spectrum && report.mask.note) row.warnings.push(`shape: mask ${report.mask.note}`);
    } catch (err) {
      row.warnings.push(`shape: ${errorLine(err)}`);
    }
  }
  heldUntilNext.analysis = { result, timing, shape };
}

/** A recording's keying shape as measured from a stretch of it. */
export interface FileShape {
  report: ShapeReport;
  /** Length of the stretch asked for [s] (the default when none was given). */
  seconds: number;
  /** Where the stretch lies, and a sentence saying so, when it is not the whole recording. */
  note: ReturnType<typeof stretchNote>;
}

/**
 * Measures the keying shape of a recording file as `keyform shape` and the app do: streamed, with only
 * the stretch from `fromS` kept (`seconds`, by default defaultShapeWindowS), so a long recording costs
 * no more memory than that stretch. Reading takes the first tenth of the progress.
 * @param channel - 0-based (default 0).
 * @example (await measureShapeOfFile('recordings/beacon-after-fix.wav')).report.riseMs.median //=> ≈ 5
 */
export async function measureShapeOfFile(
  path: string,
  options: { channel?: number; fromS?: number; seconds?: number; shape?: Omit<ShapeOptions, 'onProgress'>; onProgress?: (fraction: number) => void } = {},
): Promise<FileShape> {
  const progress = options.onProgress ?? ((): void => {});
  const audio = await openAudio(path, { streamAboveBytes: 0, reuseChunks: true });
  const seconds = options.seconds ?? defaultShapeWindowS(audio.sampleRate);
  const { samples, fromS, totalS } = await readChannelWindow(audio, options.channel ?? 0, options.fromS ?? 0, seconds, (x) => progress(0.1 * x));
  const report = measureShape(samples, audio.sampleRate, { ...options.shape, onProgress: (x) => progress(0.1 + 0.9 * x) });
  return { report, seconds, note: stretchNote(fromS, samples.length / audio.sampleRate, totalS) };
}
