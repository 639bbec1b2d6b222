/**
 * One way in for audio: a WAV file, raw PCM, or stdin (`-`), read whole when small and in chunks
 * when large or piped, always handed out as Float32Array chunks (one array per channel).
 */
import { stat } from 'node:fs/promises';
import { checkRange, InputError } from '../core/errors.js';
import { readInputFile } from './files.js';
import { decodeWavBytes } from './wav-read.js';
import {
  MAX_CHANNELS,
  RawPcmParser,
  readFileBlocks,
  readStreamBlocks,
  WavStreamParser,
  frameBytes,
  type RawEncoding,
} from './wav-stream.js';

/**
 * Files larger than this take the streaming path [bytes] (16 MiB: 17 minutes of 8 kHz mono 16-bit).
 * Reading whole costs about five times the file in memory (the bytes, and a float per sample): an
 * hour at 8 kHz (58 MB) peaked at 314 MB that way against about 100 MB streamed, and decoded no faster.
 */
export const STREAM_ABOVE_BYTES = 16 * 1024 * 1024;
/** Largest chunk handed out by the whole-file path [frames]. */
const WHOLE_CHUNK_FRAMES = 1 << 16;

export interface OpenAudioOptions {
  /** Headerless PCM layout; needs `rate` (and `channels` when not mono). */
  raw?: RawEncoding;
  /** Raw PCM sample rate [Hz], 8000…192000. */
  rate?: number;
  /** Raw PCM channels, 1…MAX_CHANNELS (default 1). */
  channels?: number;
  /** Where `-` reads from (the CLI passes its stdin). */
  stdin?: AsyncIterable<unknown>;
  /** Stream files above this size [bytes] (default 16 MiB); 0 streams everything. */
  streamAboveBytes?: number;
  /** Block size for streamed reads [bytes] (default 1 MiB). */
  blockBytes?: number;
  /**
   * Streamed input: hand out each chunk in arrays reused for the next one (valid until the next
   * chunk is pulled; copy what you keep). Saves a new array per block on long recordings.
   */
  reuseChunks?: boolean;
}

export interface AudioSource {
  /** The path, or `stdin`. */
  name: string;
  sampleRate: number;
  channelCount: number;
  /** `16-bit PCM`, `32-bit float`, `raw 16-bit PCM`, … */
  encoding: string;
  /** Length of the audio [ms], or null when unknown in advance (stdin). */
  durationMs: number | null;
  /** True when read in chunks rather than whole. */
  streaming: boolean;
  /** True when each chunk's arrays are reused for the next chunk (see OpenAudioOptions.reuseChunks). */
  reusesChunks: boolean;
  /** Filled as reading proceeds (truncated data, NaN samples read as 0, …); complete once chunks() has ended. */
  warnings: string[];
  /** The audio, chunk by chunk (one Float32Array per channel). Can be iterated once. */
  chunks(): AsyncIterable<Float32Array[]>;
  /** Releases the input (closes the file) when the chunks are not read to the end; safe to call twice. */
  close(): Promise<void>;
}

type Parser = WavStreamParser | RawPcmParser;

/**
 * Opens a recording for reading. `-` is stdin (always streamed); files over `streamAboveBytes`
 * (16 MiB) are streamed from disk; smaller WAV files are read whole. Raw PCM needs `raw` and `rate`.
 * Every failure is a one-line InputError naming the input.
 * @example
 * const audio = await openAudio('beacon.wav');
 * for await (const [left] of audio.chunks()) decoder.push(left!);
 */
export async function openAudio(pathOrDash: string, options: OpenAudioOptions = {}): Promise<AudioSource> {
  const isStdin = pathOrDash === '-';
  const name = isStdin ? 'stdin' : pathOrDash;
  if (options.raw === undefined && (options.rate !== undefined || options.channels !== undefined)) {
    throw new InputError('--rate and --channels describe raw PCM: give --raw s16le or --raw f32le too');
  }
  if (options.raw !== undefined) {
    if (options.raw !== 's16le' && options.raw !== 'f32le') throw new InputError(`--raw must be one of s16le, f32le (got '${String(options.raw)}')`);
    if (options.rate === undefined) throw new InputError('raw PCM needs its sample rate: give --rate HZ');
    checkRange('--rate', options.rate, 8000, 192_000, 'Hz');
    checkRange('--channels', options.channels ?? 1, 1, MAX_CHANNELS);
    if (!Number.isInteger(options.rate) || !Number.isInteger(options.channels ?? 1)) throw new InputError('--rate and --channels must be whole numbers');
  }

  let size: number | null = null;
  if (!isStdin) {
    try {
      const st = await stat(pathOrDash);
      if (st.isDirectory()) throw new InputError(`${name}: is a folder, not a file`);
      size = st.size;
    } catch (err) {
      if (err instanceof InputError) throw err;
      throw new InputError(`${name}: no such file`);
    }
    if (size === 0) throw new InputError(`${name}: empty file`);
  }

  const threshold = options.streamAboveBytes ?? STREAM_ABOVE_BYTES;
  if (!isStdin && options.raw === undefined && size! <= threshold) return openWavBytes(name, await readInputFile(pathOrDash));

  let blocks: AsyncIterator<Uint8Array>;
  if (isStdin) {
    if (!options.stdin) throw new InputError('no stdin to read from');
    if ((options.stdin as { isTTY?: boolean }).isTTY) {
      throw new InputError('- reads audio from stdin, but stdin is a terminal: pipe a recording or a recorder into keyform');
    }
    blocks = readStreamBlocks(options.stdin)[Symbol.asyncIterator]();
  } else {
    blocks = readFileBlocks(pathOrDash, options.blockBytes)[Symbol.asyncIterator]();
  }
  const reuse = options.reuseChunks ?? false;
  const parser: Parser =
    options.raw !== undefined
      ? new RawPcmParser(name, { encoding: options.raw, sampleRate: options.rate!, channelCount: options.channels ?? 1, reuse })
      : new WavStreamParser(name, { reuse });

  // Read until the header is known; keep the audio those first blocks held (at most one block).
  const early: Float32Array[][] = [];
  let ended = false;
  try {
    while (parser instanceof WavStreamParser && parser.format === null) {
      const r = await blocks.next();
      if (r.done) {
        ended = true;
        parser.finish(); // throws the right message (empty, not a WAV, no fmt, no data)
        break;
      }
      // Copies when arrays are reused: more blocks may be needed before the header is complete.
      for (const c of parser.push(r.value)) early.push(keepableChunk({ reusesChunks: reuse }, c));
    }
  } catch (err) {
    await blocks.return?.(); // close the file now, not at garbage collection
    throw err;
  }
  const format = parser.format!;
  let durationMs: number | null = null;
  if (size !== null) {
    const offset = parser instanceof WavStreamParser ? parser.format!.dataOffset : 0;
    const declared = parser instanceof WavStreamParser ? parser.format!.dataBytes : null;
    const available = Math.max(0, size - offset);
    const bytes = declared === null ? available : Math.min(declared, available);
    durationMs = (Math.floor(bytes / frameBytes(format)) / format.sampleRate) * 1000;
  }
  const warnings: string[] = [];
  return {
    name,
    sampleRate: format.sampleRate,
    channelCount: format.channelCount,
    encoding: format.encoding,
    durationMs,
    streaming: true,
    reusesChunks: reuse,
    warnings,
    chunks: readOnce(async function* () {
      try {
        for (const c of early.splice(0)) yield c;
        while (!ended && !(parser instanceof WavStreamParser && parser.done)) {
          const r = await blocks.next();
          if (r.done) break;
          for (const c of parser.push(r.value)) yield c;
        }
        warnings.push(...parser.finish().warnings);
      } finally {
        await blocks.return?.();
      }
    }),
    async close() {
      await blocks.return?.();
    },
  };
}

/**
 * Opens a WAV file already in memory (the whole-file path of openAudio): header checked by the
 * streaming parser, samples by the whole-file reader (wav-decoder) where it can.
 */
export function openWavBytes(name: string, bytes: Uint8Array): AudioSource {
  const header = new WavStreamParser(name, { headerOnly: true });
  header.push(bytes);
  header.finish();
  const f = header.format!;
  let channels: Float32Array[];
  const warnings: string[] = [];
  const available = bytes.length - f.dataOffset;
  if (f.dataBytes === null || f.dataBytes > available || f.extensible) {
    // Open-ended or cut-short data chunk, or WAVE_FORMAT_EXTENSIBLE (which wav-decoder does not read):
    // the streaming parser reads what is there, with a warning where something is missing.
    const parser = new WavStreamParser(name);
    const parts = parser.push(bytes);
    warnings.push(...parser.finish().warnings);
    channels = concatChunks(parts, f.channelCount);
  } else {
    channels = decodeWavBytes(name, bytes).channels;
    let bad = 0;
    if (f.sampleFormat === 'f32') {
      for (const ch of channels) {
        for (let i = 0; i < ch.length; i++) {
          const v = ch[i]!;
          if (v - v !== 0) {
            ch[i] = 0;
            bad++;
          }
        }
      }
    }
    if (bad > 0) warnings.push(`${name}: ${bad} non-finite float samples (NaN or infinity) read as 0`);
  }
  const frames = channels[0]?.length ?? 0;
  return {
    name,
    sampleRate: f.sampleRate,
    channelCount: f.channelCount,
    encoding: f.encoding,
    durationMs: (frames / f.sampleRate) * 1000,
    streaming: false,
    reusesChunks: false,
    warnings,
    chunks: readOnce(async function* () {
      for (let i = 0; i < frames; i += WHOLE_CHUNK_FRAMES) {
        yield channels.map((c) => c.subarray(i, Math.min(frames, i + WHOLE_CHUNK_FRAMES)));
      }
    }),
    close: async () => {},
  };
}

/** AudioSource.chunks from a generator: the audio can be gone through once only. */
function readOnce(chunks: () => AsyncGenerator<Float32Array[]>): () => AsyncIterable<Float32Array[]> {
  let used = false;
  return () => {
    if (used) throw new Error('audio chunks can be read only once');
    used = true;
    return chunks();
  };
}

/**
 * A chunk that may be kept past the next one: a copy when the source reuses its arrays, else the
 * chunk itself.
 */
export function keepableChunk(source: Pick<AudioSource, 'reusesChunks'>, chunk: Float32Array[]): Float32Array[] {
  return source.reusesChunks ? chunk.map((a) => a.slice()) : chunk;
}

/** Joins chunks into one array per channel. */
export function concatChunks(parts: readonly Float32Array[][], channelCount: number): Float32Array[] {
  const total = parts.reduce((s, p) => s + (p[0]?.length ?? 0), 0);
  const out: Float32Array[] = [];
  for (let c = 0; c < channelCount; c++) {
    const a = new Float32Array(total);
    let o = 0;
    for (const p of parts) {
      a.set(p[c]!, o);
      o += p[c]!.length;
    }
    out.push(a);
  }
  return out;
}

/**
 * Reads a whole recording (any path openAudio takes) into one array per channel.
 * Meant for short inputs; long ones should be consumed chunk by chunk.
 */
export async function readAllAudio(source: AudioSource): Promise<Float32Array[]> {
  const parts: Float32Array[][] = [];
  for await (const c of source.chunks()) parts.push(keepableChunk(source, c));
  return concatChunks(parts, source.channelCount);
}

/** One channel's stretch of a recording, and where it sits in the whole. */
export interface ChannelWindow {
  samples: Float32Array;
  /** Where the stretch starts in the recording [s]. */
  fromS: number;
  /** Length of the whole recording [s], when known (files); null for stdin. */
  totalS: number | null;
}

/**
 * One channel's samples from `fromS` for at most `seconds`, read chunk by chunk: only the stretch is
 * kept, and reading stops as soon as it is full, so the rest of a long file is never read.
 * @param channel - 0-based.
 * @param onProgress - Fraction of the reading done, 0…1 (files only: a pipe's length is unknown).
 * @example (await readChannelWindow(await openAudio('long.wav'), 0, 0, 600)).samples.length //=> ≤ 600 × rate
 */
export async function readChannelWindow(
  source: AudioSource,
  channel: number,
  fromS: number,
  seconds: number,
  onProgress?: (fraction: number) => void,
): Promise<ChannelWindow> {
  const rate = source.sampleRate;
  const totalS = source.durationMs === null ? null : source.durationMs / 1000;
  try {
    if (channel >= source.channelCount) throw new InputError(`${source.name}: has ${source.channelCount} channel(s), no channel ${channel + 1}`);
    const start = Math.round(fromS * rate);
    const totalFrames = totalS === null ? null : Math.round(totalS * rate);
    if (totalFrames !== null && start >= totalFrames) {
      throw new InputError(`${source.name}: --from ${fromS} s is past the end of the recording (${totalS!.toFixed(1)} s)`);
    }
    const want = Math.round(seconds * rate);
    // Known length: one array of the right size. Unknown (a pipe): pieces, joined at the end.
    const out: Float32Array | null = totalFrames === null ? null : new Float32Array(Math.min(want, totalFrames - start));
    const pieces: Float32Array[][] = [];
    let frame = 0; // frames of the recording gone by
    let kept = 0;
    const limit = out === null ? want : out.length;
    for await (const chunk of source.chunks()) {
      const x = chunk[channel]!;
      const from = Math.max(0, start - frame);
      const n = Math.min(x.length - from, limit - kept);
      if (n > 0) {
        if (out !== null) out.set(x.subarray(from, from + n), kept);
        else pieces.push([x.slice(from, from + n)]);
        kept += n;
      }
      frame += x.length;
      if (onProgress && totalFrames !== null) onProgress(Math.min(1, frame / (start + limit)));
      if (kept >= limit) break;
    }
    if (kept === 0) throw new InputError(`${source.name}: no audio samples${start > 0 ? ` from ${fromS} s on` : ''}`);
    const samples = out === null ? concatChunks(pieces, 1)[0]! : kept < out.length ? out.subarray(0, kept) : out;
    return { samples, fromS: start / rate, totalS };
  } finally {
    await source.close();
  }
}
