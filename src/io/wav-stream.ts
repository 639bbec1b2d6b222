/**
 * Streaming WAV and raw PCM readers: bytes go in as they arrive (file blocks, stdin), and
 * Float32Array chunks (one per channel) come out, with a bounded buffer whatever the recording's length.
 *
 * Nothing here allocates from a header field: every buffer is sized from the bytes actually pushed
 * (plus at most one frame carried over), and a chunk the reader does not need is skipped by counting
 * bytes, never by buffering it. Malformed input ends in a one-line InputError naming the input.
 */
import { InputError } from '../core/errors.js';
import { compiledModule } from '../core/wasm.js';
import { inspectWavHeader } from './wav-read.js';
import { PCM_WASM_BASE64 } from './wasm/pcm.wasm.js';

/** Sample encodings the readers understand. */
export type SampleFormat = 'u8' | 's16' | 's24' | 's32' | 'f32';

/** Raw PCM encodings accepted for headerless input (stdin from a recorder). */
export const RAW_ENCODINGS = ['s16le', 'f32le'] as const;
export type RawEncoding = (typeof RAW_ENCODINGS)[number];

/** Most channels keyform reads from one file (a multi-microphone capture stays well below). */
export const MAX_CHANNELS = 256;

/** Layout of interleaved PCM frames. */
export interface PcmFormat {
  /** Sample rate [Hz], 8000…192000. */
  sampleRate: number;
  /** Channels per frame, 1…MAX_CHANNELS. */
  channelCount: number;
  sampleFormat: SampleFormat;
}

const BYTES_PER_SAMPLE: Record<SampleFormat, number> = { u8: 1, s16: 2, s24: 3, s32: 4, f32: 4 };

/** Human-readable name of a sample format, e.g. `16-bit PCM`, `32-bit float`. */
export function describeSampleFormat(f: SampleFormat): string {
  return f === 'f32' ? '32-bit float' : f === 'u8' ? '8-bit PCM' : `${BYTES_PER_SAMPLE[f] * 8}-bit PCM`;
}

/** Bytes in one interleaved frame. */
export function frameBytes(format: PcmFormat): number {
  return BYTES_PER_SAMPLE[format.sampleFormat] * format.channelCount;
}

const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

// Scaling matches the whole-file reader (wav-decoder): negative values over 2^(n−1), positive over
// 2^(n−1) − 1, so full scale maps to exactly ±1. Tables give bit-identical results at memory speed.
let s16Table: Float32Array | null = null;
function s16Lookup(): Float32Array {
  if (!s16Table) {
    s16Table = new Float32Array(65536);
    for (let v = -32768; v < 32768; v++) s16Table[v & 0xffff] = v < 0 ? v / 32768 : v / 32767;
  }
  return s16Table;
}

/** Samples converted per call of the WebAssembly converter (its memory holds them in and out). */
const S16_PIECE = 1 << 17;

/**
 * The common case, mono 16-bit, converted by WebAssembly (wasm/pcm.as.ts: eight samples at a time,
 * no table), a piece at a time through its memory; the same floats as the table. One converter per
 * thread, made on first use.
 */
class S16MonoConverter {
  private readonly bytesIn: Uint8Array;
  private readonly floatsOut: Float32Array;
  private readonly convert: (src: number, dst: number, n: number) => void;

  constructor() {
    const bytes = 6 * S16_PIECE;
    const pages = Math.ceil(bytes / 65536);
    const memory = new WebAssembly.Memory({ initial: pages, maximum: pages });
    const instance = new WebAssembly.Instance(compiledModule(PCM_WASM_BASE64), { env: { memory } });
    this.convert = instance.exports.s16ToF32 as (src: number, dst: number, n: number) => void;
    this.bytesIn = new Uint8Array(memory.buffer, 0, 2 * S16_PIECE);
    this.floatsOut = new Float32Array(memory.buffer, 2 * S16_PIECE, S16_PIECE);
  }

  /** o[i] = the i-th little-endian int16 of bytes, scaled as the table does. */
  run(bytes: Uint8Array, o: Float32Array): void {
    for (let a = 0; a < o.length; a += S16_PIECE) {
      const n = Math.min(S16_PIECE, o.length - a);
      this.bytesIn.set(bytes.subarray(2 * a, 2 * (a + n)));
      this.convert(0, 2 * S16_PIECE, n);
      o.set(n === S16_PIECE ? this.floatsOut : this.floatsOut.subarray(0, n), a);
    }
  }
}
let s16Mono: S16MonoConverter | null = null;

const U8_TABLE = (() => {
  const t = new Float32Array(256);
  for (let b = 0; b < 256; b++) {
    const d = b - 128;
    t[b] = d < 0 ? d / 128 : d / 127;
  }
  return t;
})();

/**
 * Turns interleaved PCM bytes into one Float32Array per channel. Bytes of an incomplete frame are
 * carried to the next push (at most one frame), so chunk boundaries may fall anywhere.
 * Non-finite float samples (NaN, ±Inf) become 0 and are counted in `nonFiniteCount`.
 */
export class PcmDeinterleaver {
  readonly format: PcmFormat;
  /** Non-finite float samples replaced by 0 so far. */
  nonFiniteCount = 0;
  /** Whole frames converted so far. */
  framesOut = 0;
  private readonly frameSize: number;
  private carry: Uint8Array;
  private carryLength = 0;
  private work = new Uint8Array(0);
  private readonly reuse: boolean;
  /** Output arrays kept between pushes (with `reuse`), one per channel. */
  private outBuffers: Float32Array[] = [];

  /**
   * @param options - `reuse`: hand out views of arrays kept between pushes (each chunk is valid until
   *   the next push; a consumer that keeps samples copies them). Saves allocating (and the garbage
   *   collector freeing) a new array per block on long recordings.
   */
  constructor(format: PcmFormat, options: { reuse?: boolean } = {}) {
    this.format = format;
    this.frameSize = frameBytes(format);
    this.carry = new Uint8Array(this.frameSize);
    this.reuse = options.reuse ?? false;
  }

  /** Bytes of an incomplete last frame held back (0 at a frame boundary). */
  get pendingBytes(): number {
    return this.carryLength;
  }

  /** Converts the complete frames in `carry + bytes`; returns null when there is no whole frame yet. */
  push(bytes: Uint8Array): Float32Array[] | null {
    const total = this.carryLength + bytes.length;
    const frames = Math.floor(total / this.frameSize);
    if (frames === 0) {
      this.carry.set(bytes, this.carryLength);
      this.carryLength = total;
      return null;
    }
    const usable = frames * this.frameSize;
    // Copy into an aligned scratch buffer (sized from the bytes pushed, reused between pushes).
    if (this.work.length < usable) this.work = new Uint8Array(Math.max(usable, this.work.length * 2));
    const work = this.work;
    work.set(this.carry.subarray(0, this.carryLength), 0);
    const fromNew = usable - this.carryLength;
    work.set(bytes.subarray(0, fromNew), this.carryLength);
    const rest = bytes.length - fromNew;
    this.carry.set(bytes.subarray(fromNew), 0);
    this.carryLength = rest;
    this.framesOut += frames;
    return this.convert(work, frames);
  }

  private convert(work: Uint8Array, frames: number): Float32Array[] {
    const nch = this.format.channelCount;
    const out: Float32Array[] = [];
    if (this.reuse) {
      // Sized from the bytes pushed (like `work`), never from a header field.
      if ((this.outBuffers[0]?.length ?? -1) < frames) this.outBuffers = Array.from({ length: nch }, () => new Float32Array(frames));
      for (let c = 0; c < nch; c++) out.push(this.outBuffers[c]!.subarray(0, frames));
    } else for (let c = 0; c < nch; c++) out.push(new Float32Array(frames));
    const n = frames * nch;
    const buf = work.buffer;
    const off = work.byteOffset;
    switch (this.format.sampleFormat) {
      case 'u8': {
        for (let c = 0; c < nch; c++) {
          const o = out[c]!;
          for (let i = 0, k = c; i < frames; i++, k += nch) o[i] = U8_TABLE[work[k]!]!;
        }
        break;
      }
      case 's16': {
        if (nch === 1) {
          s16Mono ??= new S16MonoConverter();
          s16Mono.run(work, out[0]!);
          break;
        }
        const table = s16Lookup();
        if (LITTLE_ENDIAN_HOST) {
          const u = new Uint16Array(buf, off, n);
          for (let c = 0; c < nch; c++) {
            const o = out[c]!;
            for (let i = 0, k = c; i < frames; i++, k += nch) o[i] = table[u[k]!]!;
          }
        } else {
          for (let c = 0; c < nch; c++) {
            const o = out[c]!;
            for (let i = 0, k = 2 * c; i < frames; i++, k += 2 * nch) o[i] = table[work[k]! | (work[k + 1]! << 8)]!;
          }
        }
        break;
      }
      case 's24': {
        for (let c = 0; c < nch; c++) {
          const o = out[c]!;
          for (let i = 0, k = 3 * c; i < frames; i++, k += 3 * nch) {
            const v = ((work[k]! | (work[k + 1]! << 8) | (work[k + 2]! << 16)) << 8) >> 8;
            o[i] = v < 0 ? v / 8388608 : v / 8388607;
          }
        }
        break;
      }
      case 's32': {
        const view = new DataView(buf, off, n * 4);
        for (let c = 0; c < nch; c++) {
          const o = out[c]!;
          for (let i = 0, k = 4 * c; i < frames; i++, k += 4 * nch) {
            const v = view.getInt32(k, true);
            o[i] = v < 0 ? v / 2147483648 : v / 2147483647;
          }
        }
        break;
      }
      case 'f32': {
        let bad = 0;
        if (LITTLE_ENDIAN_HOST) {
          const f = new Float32Array(buf, off, n);
          for (let c = 0; c < nch; c++) {
            const o = out[c]!;
            for (let i = 0, k = c; i < frames; i++, k += nch) {
              const v = f[k]!;
              if (v - v === 0) o[i] = v;
              else {
                o[i] = 0; // written, not skipped: with reused arrays the slot may hold an old sample
                bad++;
              }
            }
          }
        } else {
          const view = new DataView(buf, off, n * 4);
          for (let c = 0; c < nch; c++) {
            const o = out[c]!;
            for (let i = 0, k = 4 * c; i < frames; i++, k += 4 * nch) {
              const v = view.getFloat32(k, true);
              if (v - v === 0) o[i] = v;
              else {
                o[i] = 0; // written, not skipped: with reused arrays the slot may hold an old sample
                bad++;
              }
            }
          }
        }
        this.nonFiniteCount += bad;
        break;
      }
    }
    return out;
  }
}

/** What the WAV header says, once it has been read. */
export interface WavStreamFormat extends PcmFormat {
  /** Byte offset of the first sample in the input. */
  dataOffset: number;
  /** Length of the data chunk in bytes, or null when the header leaves it open (0, 0x7ffff000 or 0xFFFFFFFF: a pipe or an unfinished recording). */
  dataBytes: number | null;
  /** `16-bit PCM`, `32-bit float`, … */
  encoding: string;
  /** The fmt chunk uses WAVE_FORMAT_EXTENSIBLE (tag 0xFFFE) with a PCM or float sub-format. */
  extensible: boolean;
}

type State = 'riff' | 'chunk-header' | 'fmt-body' | 'skip' | 'data' | 'done';

/** Largest `fmt ` chunk accepted (the standard ones are 16, 18 and 40 bytes). */
const MAX_FMT_BYTES = 1024;
/**
 * Data sizes at or above this are the "length unknown" placeholders writers put in a header they
 * cannot go back to fix (a pipe); 0x7ffff000 is what sox writes to a pipe (seen in its output).
 */
const OPEN_LENGTH_FROM = 0xffff_f000;
const SOX_PIPE_LENGTH = 0x7fff_f000;

/**
 * A push parser for RIFF/WAVE: `push(bytes)` returns the audio chunks completed by those bytes
 * (one Float32Array per channel each), `finish()` checks the end and returns warnings.
 * Reads PCM u8/s16/s24/s32 and IEEE float32 (format tags 1, 3 and WAVE_FORMAT_EXTENSIBLE).
 * @example
 * const p = new WavStreamParser('x.wav'); const chunks = p.push(bytes); const { warnings } = p.finish();
 */
export class WavStreamParser {
  readonly name: string;
  /** Known once the header up to the data chunk has been read. */
  format: WavStreamFormat | null = null;
  private state: State = 'riff';
  private offset = 0;
  /** Small holding buffer for header items (RIFF header, chunk headers, the fmt body). */
  private pending = new Uint8Array(12);
  private pendingLength = 0;
  private need = 12;
  private skipLeft = 0;
  private chunkId = '';
  private chunkSize = 0;
  private riffHeader = new Uint8Array(12);
  private fmt: ReturnType<typeof inspectWavHeader> | null = null;
  private extensible = false;
  private dataLeft = Infinity;
  private deinterleaver: PcmDeinterleaver | null = null;
  private readonly headerOnly: boolean;
  private readonly reuse: boolean;

  /** @param options - `headerOnly`: stop after the header; `reuse`: see PcmDeinterleaver (each chunk valid until the next push). */
  constructor(name: string, options: { headerOnly?: boolean; reuse?: boolean } = {}) {
    this.name = name;
    this.headerOnly = options.headerOnly ?? false;
    this.reuse = options.reuse ?? false;
  }

  /** Non-finite float samples replaced by 0 so far. */
  get nonFiniteCount(): number {
    return this.deinterleaver?.nonFiniteCount ?? 0;
  }

  /** Audio bytes of the data chunk consumed so far. */
  get dataBytesRead(): number {
    return this.format ? (this.deinterleaver?.framesOut ?? 0) * frameBytes(this.format) + (this.deinterleaver?.pendingBytes ?? 0) : 0;
  }

  /** True once the data chunk is complete (further bytes are ignored). */
  get done(): boolean {
    return this.state === 'done';
  }

  /** Feeds bytes; returns the audio chunks they complete (possibly none). Throws InputError on a malformed header. */
  push(bytes: Uint8Array): Float32Array[][] {
    const out: Float32Array[][] = [];
    let pos = 0;
    while (pos < bytes.length && this.state !== 'done') {
      if (this.state === 'data') {
        if (this.headerOnly) {
          this.state = 'done';
          break;
        }
        const take = Math.min(bytes.length - pos, this.dataLeft);
        const chunk = this.deinterleaver!.push(bytes.subarray(pos, pos + take));
        if (chunk) out.push(chunk);
        pos += take;
        this.offset += take;
        this.dataLeft -= take;
        if (this.dataLeft === 0) this.state = 'done';
        continue;
      }
      if (this.state === 'skip') {
        const take = Math.min(bytes.length - pos, this.skipLeft);
        pos += take;
        this.offset += take;
        this.skipLeft -= take;
        if (this.skipLeft === 0) this.expect('chunk-header', 8);
        continue;
      }
      const take = Math.min(bytes.length - pos, this.need - this.pendingLength);
      this.pending.set(bytes.subarray(pos, pos + take), this.pendingLength);
      this.pendingLength += take;
      pos += take;
      this.offset += take;
      if (this.pendingLength === this.need) this.headerItem();
    }
    return out;
  }

  /** Called at the end of the input: throws if no audio could be found, else returns warnings. */
  finish(): { warnings: string[] } {
    const warnings: string[] = [];
    const name = this.name;
    switch (this.state) {
      case 'riff':
        if (this.pendingLength === 0) throw new InputError(`${name}: empty file`);
        throw new InputError(`${name}: not a WAV file (no RIFF/WAVE header)`);
      case 'chunk-header':
      case 'fmt-body':
      case 'skip':
        if (!this.fmt) throw new InputError(`${name}: no fmt chunk in WAV file`);
        throw new InputError(`${name}: no data chunk in WAV file`);
      default:
        break;
    }
    if (this.headerOnly) return { warnings };
    const f = this.format!;
    const got = this.dataBytesRead;
    if (f.dataBytes !== null && got < f.dataBytes) {
      warnings.push(`${name}: data chunk declares ${f.dataBytes} bytes but the input ends after ${got}; read what is there`);
    }
    const partial = this.deinterleaver?.pendingBytes ?? 0;
    if (partial > 0) warnings.push(`${name}: ${partial} trailing bytes do not make a whole frame; ignored`);
    if (this.nonFiniteCount > 0) warnings.push(`${name}: ${this.nonFiniteCount} non-finite float samples (NaN or infinity) read as 0`);
    return { warnings };
  }

  private expect(state: State, need: number): void {
    this.state = state;
    this.need = need;
    this.pendingLength = 0;
    if (this.pending.length < need) this.pending = new Uint8Array(need);
  }

  private tag(o: number): string {
    const p = this.pending;
    return String.fromCharCode(p[o]!, p[o + 1]!, p[o + 2]!, p[o + 3]!);
  }

  private headerItem(): void {
    const name = this.name;
    const p = this.pending;
    const view = new DataView(p.buffer, p.byteOffset, this.pendingLength);
    if (this.state === 'riff') {
      if (this.tag(0) !== 'RIFF' || this.tag(8) !== 'WAVE') throw new InputError(`${name}: not a WAV file (no RIFF/WAVE header)`);
      this.riffHeader.set(p.subarray(0, 12));
      this.expect('chunk-header', 8);
      return;
    }
    if (this.state === 'chunk-header') {
      this.chunkId = this.tag(0);
      this.chunkSize = view.getUint32(4, true);
      if (this.chunkId === 'fmt ') {
        if (this.fmt) throw new InputError(`${name}: two fmt chunks in WAV file`);
        if (this.chunkSize < 16 || this.chunkSize > MAX_FMT_BYTES) {
          throw new InputError(`${name}: fmt chunk of ${this.chunkSize} bytes is not a valid WAV format block`);
        }
        this.expect('fmt-body', this.chunkSize + (this.chunkSize & 1));
        return;
      }
      if (this.chunkId === 'data') {
        this.startData();
        return;
      }
      this.skipLeft = this.chunkSize + (this.chunkSize & 1);
      if (this.skipLeft === 0) this.expect('chunk-header', 8);
      else this.state = 'skip';
      return;
    }
    // fmt body: validate through the whole-file reader's own header check, then the frame layout.
    const size = this.chunkSize;
    const synthetic = new Uint8Array(12 + 8 + size);
    synthetic.set(this.riffHeader, 0);
    synthetic.set([0x66, 0x6d, 0x74, 0x20, size & 0xff, (size >>> 8) & 0xff, 0, 0], 12);
    synthetic.set(p.subarray(0, size), 20);
    const fmt = inspectWavHeader(name, synthetic);
    if (fmt.channels > MAX_CHANNELS) throw new InputError(`${name}: WAV header says ${fmt.channels} channels (keyform reads up to ${MAX_CHANNELS})`);
    const blockAlign = view.getUint16(12, true);
    const expected = (fmt.channels * fmt.bitsPerSample) / 8;
    if (blockAlign !== expected) {
      throw new InputError(`${name}: WAV block size ${blockAlign} bytes does not match ${fmt.channels} channels of ${fmt.bitsPerSample} bits`);
    }
    this.fmt = fmt;
    this.extensible = view.getUint16(0, true) === 0xfffe;
    this.expect('chunk-header', 8);
  }

  private startData(): void {
    const fmt = this.fmt;
    if (!fmt) throw new InputError(`${this.name}: data chunk before the fmt chunk in WAV file`);
    const sampleFormat: SampleFormat = fmt.formatTag === 3 ? 'f32' : (['u8', 's16', 's24', 's32'] as const)[fmt.bitsPerSample / 8 - 1]!;
    const open = this.chunkSize === 0 || this.chunkSize === SOX_PIPE_LENGTH || this.chunkSize >= OPEN_LENGTH_FROM;
    this.format = {
      sampleRate: fmt.sampleRate,
      channelCount: fmt.channels,
      sampleFormat,
      dataOffset: this.offset,
      dataBytes: open ? null : this.chunkSize,
      encoding: describeSampleFormat(sampleFormat),
      extensible: this.extensible,
    };
    this.dataLeft = open ? Infinity : this.chunkSize;
    this.deinterleaver = new PcmDeinterleaver(this.format, { reuse: this.reuse });
    this.state = 'data';
    this.pendingLength = 0;
  }
}

/**
 * A push parser for headerless PCM with a known layout (`s16le` or `f32le`).
 * @example new RawPcmParser('-', { encoding: 's16le', sampleRate: 8000, channelCount: 1 }).push(bytes)
 */
export class RawPcmParser {
  readonly name: string;
  readonly format: PcmFormat & { encoding: string };
  private readonly deinterleaver: PcmDeinterleaver;
  /** The first bytes of the input, to notice a WAV file read as raw PCM. */
  private readonly head = new Uint8Array(12);
  private headBytes = 0;

  /** @param options - Layout; `reuse`: see PcmDeinterleaver (each chunk valid until the next push). */
  constructor(name: string, options: { encoding: RawEncoding; sampleRate: number; channelCount: number; reuse?: boolean }) {
    this.name = name;
    const sampleFormat: SampleFormat = options.encoding === 'f32le' ? 'f32' : 's16';
    this.format = { sampleRate: options.sampleRate, channelCount: options.channelCount, sampleFormat, encoding: `raw ${describeSampleFormat(sampleFormat)}` };
    this.deinterleaver = new PcmDeinterleaver(this.format, { reuse: options.reuse });
  }

  push(bytes: Uint8Array): Float32Array[][] {
    if (this.headBytes < 12) {
      const n = Math.min(12 - this.headBytes, bytes.length);
      this.head.set(bytes.subarray(0, n), this.headBytes);
      this.headBytes += n;
    }
    const chunk = this.deinterleaver.push(bytes);
    return chunk ? [chunk] : [];
  }

  finish(): { warnings: string[] } {
    const warnings: string[] = [];
    if (this.deinterleaver.framesOut === 0 && this.deinterleaver.pendingBytes === 0) throw new InputError(`${this.name}: no audio (empty input)`);
    const ascii = (a: number, b: number): string => String.fromCharCode(...this.head.subarray(a, b));
    if (this.headBytes === 12 && ascii(0, 4) === 'RIFF' && ascii(8, 12) === 'WAVE') {
      warnings.push(`${this.name}: starts with a WAV header but was read as raw PCM (--raw): its header was taken for samples and its own rate and layout were not used; leave out --raw, --rate and --channels to read it as a WAV`);
    }
    const partial = this.deinterleaver.pendingBytes;
    if (partial > 0) warnings.push(`${this.name}: ${partial} trailing bytes do not make a whole frame; ignored`);
    if (this.deinterleaver.nonFiniteCount > 0) {
      warnings.push(`${this.name}: ${this.deinterleaver.nonFiniteCount} non-finite float samples (NaN or infinity) read as 0`);
    }
    return { warnings };
  }
}

/** Size of the blocks read from files [bytes]. */
export const READ_BLOCK_BYTES = 1 << 20;

function fileError(path: string, err: unknown): InputError {
  const code = (err as NodeJS.ErrnoException).code;
  if (code === 'ENOENT' || code === 'ENOTDIR') return new InputError(`${path}: no such file`);
  if (code === 'EISDIR') return new InputError(`${path}: is a folder, not a file`);
  if (code === 'EACCES' || code === 'EPERM') return new InputError(`${path}: cannot read (permission denied)`);
  return new InputError(`${path}: cannot read (${code ?? (err as Error).message})`);
}

/**
 * Reads a file in blocks. The yielded view is reused: consume it before pulling the next one.
 * The next block is already being read (by the thread pool) while the caller works on this one,
 * so reading and decoding overlap. File-system failures become one-line InputErrors naming the file.
 */
export async function* readFileBlocks(path: string, blockBytes = READ_BLOCK_BYTES, startByte = 0): AsyncGenerator<Uint8Array> {
  const { open } = await import('node:fs/promises');
  let handle;
  try {
    handle = await open(path, 'r');
  } catch (err) {
    throw fileError(path, err);
  }
  let pending: Promise<number> | null = null;
  try {
    const st = await handle.stat();
    if (st.isDirectory()) throw new InputError(`${path}: is a folder, not a file`);
    // Two buffers: one being read into while the other is with the caller.
    const bufs = [new Uint8Array(blockBytes), new Uint8Array(blockBytes)];
    let position = startByte;
    const file = handle;
    const readInto = (buf: Uint8Array, at: number): Promise<number> =>
      file.read(buf, 0, blockBytes, at).then(
        (r) => r.bytesRead,
        (err: unknown) => {
          throw fileError(path, err);
        },
      );
    let which = 0;
    pending = readInto(bufs[0]!, position);
    while (pending) {
      const n = await pending;
      pending = null;
      if (n === 0) return;
      position += n;
      const current = bufs[which]!;
      which ^= 1;
      // Start the next read before handing this block out (a short read means the end is near:
      // the next read returns 0 then).
      const next = readInto(bufs[which]!, position);
      next.catch(() => {}); // a failure is reported when the next block is pulled; never unhandled
      pending = next;
      yield current.subarray(0, n);
    }
  } finally {
    await pending?.catch(() => {}); // a read still in flight (the caller stopped early) ends first
    await handle.close();
  }
}

/** Byte chunks of a readable stream (stdin), whatever it yields (Buffer, Uint8Array or string). */
export async function* readStreamBlocks(stream: AsyncIterable<unknown>): AsyncGenerator<Uint8Array> {
  for await (const chunk of stream) {
    if (chunk instanceof Uint8Array) yield chunk;
    else if (typeof chunk === 'string') yield Buffer.from(chunk, 'latin1');
  }
}
