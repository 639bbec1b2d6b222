import WavDecoder from 'wav-decoder';
import { InputError } from '../core/errors.js';
import { readInputFile } from './files.js';

export interface DecodedAudio {
  sampleRate: number;
  /** One array per channel, samples in −1…1. */
  channels: Float32Array[];
  /** Human-readable encoding, e.g. `16-bit PCM` or `32-bit float`. */
  encoding: string;
}

const FORMAT_NAMES: Record<number, string> = {
  0x0002: 'ADPCM', 0x0006: 'A-law', 0x0007: 'µ-law', 0x0011: 'IMA ADPCM', 0x0055: 'MP3', 0x0050: 'MPEG',
};

interface FmtInfo {
  formatTag: number;
  /** Byte offset of the format tag field when the file uses WAVE_FORMAT_EXTENSIBLE (0xFFFE), else −1. */
  extensibleTagOffset?: number;
  channels: number;
  sampleRate: number;
  bitsPerSample: number;
}

/** Reads the RIFF header and `fmt ` chunk, with a one-line error for anything keyform cannot read. */
export function inspectWavHeader(name: string, bytes: Uint8Array): FmtInfo {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const tag = (o: number): string => String.fromCharCode(bytes[o]!, bytes[o + 1]!, bytes[o + 2]!, bytes[o + 3]!);
  if (bytes.length === 0) throw new InputError(`${name}: empty file`);
  if (bytes.length < 12 || tag(0) !== 'RIFF' || tag(8) !== 'WAVE') {
    throw new InputError(`${name}: not a WAV file (no RIFF/WAVE header)`);
  }
  let off = 12;
  while (off + 8 <= bytes.length) {
    const id = tag(off);
    const size = view.getUint32(off + 4, true);
    if (id === 'fmt ') {
      if (size < 16 || off + 8 + 16 > bytes.length) throw new InputError(`${name}: truncated fmt chunk`);
      let formatTag = view.getUint16(off + 8, true);
      const extensibleTagOffset = formatTag === 0xfffe ? off + 8 : -1;
      const channels = view.getUint16(off + 10, true);
      const sampleRate = view.getUint32(off + 12, true);
      const bitsPerSample = view.getUint16(off + 22, true);
      if (formatTag === 0xfffe && size >= 40 && off + 8 + 26 <= bytes.length) formatTag = view.getUint16(off + 8 + 24, true);
      if (formatTag !== 1 && formatTag !== 3) {
        const what = FORMAT_NAMES[formatTag] ?? 'compressed or unknown';
        throw new InputError(`${name}: unsupported WAV encoding (format tag 0x${formatTag.toString(16).padStart(4, '0')}, ${what}); use PCM or float`);
      }
      if (channels === 0) throw new InputError(`${name}: WAV header says 0 channels`);
      if (sampleRate < 8000 || sampleRate > 192_000) {
        throw new InputError(`${name}: sample rate ${sampleRate} Hz is outside 8000…192000 Hz`);
      }
      const okBits = formatTag === 3 ? [32] : [8, 16, 24, 32];
      if (!okBits.includes(bitsPerSample)) {
        throw new InputError(`${name}: unsupported ${bitsPerSample}-bit ${formatTag === 3 ? 'float' : 'PCM'} samples`);
      }
      if (channels > 256) throw new InputError(`${name}: WAV header says ${channels} channels (at most 256 are read)`);
      // The block size must match channels × sample size: readers size their buffers from it, so a
      // header that disagrees could make them reserve far more memory than the file holds.
      const blockAlign = view.getUint16(off + 20, true);
      if (blockAlign !== (channels * bitsPerSample) / 8) {
        throw new InputError(`${name}: WAV header block size ${blockAlign} does not match ${channels} channel(s) of ${bitsPerSample}-bit samples`);
      }
      return { formatTag, channels, sampleRate, bitsPerSample, extensibleTagOffset };
    }
    off += 8 + size + (size & 1);
  }
  throw new InputError(`${name}: no fmt chunk in WAV file`);
}

/** Decodes a whole WAV file held in memory (short recordings; long ones take the streaming path). */
export function decodeWavBytes(name: string, bytes: Uint8Array): DecodedAudio {
  const fmt = inspectWavHeader(name, bytes);
  let data;
  try {
    // wav-decoder reads only the plain format tags: give it a copy that names the sub-format of a
    // WAVE_FORMAT_EXTENSIBLE file (what sox and many recorders write for 24-bit and multichannel).
    let input: Uint8Array | ArrayBuffer = bytes;
    if (fmt.extensibleTagOffset !== undefined && fmt.extensibleTagOffset >= 0) {
      const copy = new Uint8Array(bytes); // a fresh ArrayBuffer of exactly the file's length
      new DataView(copy.buffer).setUint16(fmt.extensibleTagOffset, fmt.formatTag, true);
      input = copy.buffer;
    }
    data = WavDecoder.decode.sync(input);
  } catch (err) {
    throw new InputError(`${name}: unreadable WAV data (${(err as Error).message})`);
  }
  if (!data || data.channelData.length === 0) throw new InputError(`${name}: no audio data`);
  const encoding = fmt.formatTag === 3 ? `${fmt.bitsPerSample}-bit float` : `${fmt.bitsPerSample}-bit PCM`;
  return { sampleRate: data.sampleRate, channels: data.channelData, encoding };
}

/** Reads and decodes a WAV file. Errors are one-line InputErrors naming the file. */
export async function readWavFile(path: string): Promise<DecodedAudio> {
  return decodeWavBytes(path, await readInputFile(path));
}
