/** Sample encodings keyform can write. */
export type WavEncoding = 'u8' | 's16' | 's24' | 's32' | 'f32';

export interface WavWriteOptions {
  sampleRate: number;
  /** One array per channel, all the same length, samples in −1…1. */
  channels: readonly Float32Array[];
  encoding?: WavEncoding;
}

const BYTES: Record<WavEncoding, number> = { u8: 1, s16: 2, s24: 3, s32: 4, f32: 4 };

/**
 * Encodes audio as a RIFF/WAVE file (PCM format tag 1, or IEEE float tag 3 for `f32`).
 * Integer samples are rounded and clipped to the encoding's range.
 */
export function encodeWav(options: WavWriteOptions): Buffer {
  const { sampleRate, channels } = options;
  const encoding = options.encoding ?? 's16';
  const nch = channels.length;
  const n = nch > 0 ? channels[0]!.length : 0;
  const bps = BYTES[encoding];
  const dataBytes = n * nch * bps;
  const buf = Buffer.alloc(44 + dataBytes + (dataBytes & 1));
  buf.write('RIFF', 0, 'ascii');
  buf.writeUInt32LE(36 + dataBytes + (dataBytes & 1), 4);
  buf.write('WAVE', 8, 'ascii');
  buf.write('fmt ', 12, 'ascii');
  buf.writeUInt32LE(16, 16);
  buf.writeUInt16LE(encoding === 'f32' ? 3 : 1, 20);
  buf.writeUInt16LE(nch, 22);
  buf.writeUInt32LE(sampleRate, 24);
  buf.writeUInt32LE(sampleRate * nch * bps, 28);
  buf.writeUInt16LE(nch * bps, 32);
  buf.writeUInt16LE(bps * 8, 34);
  buf.write('data', 36, 'ascii');
  buf.writeUInt32LE(dataBytes, 40);
  let off = 44;
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < nch; c++) {
      const x = Math.max(-1, Math.min(1, channels[c]![i]!));
      switch (encoding) {
        case 'u8':
          buf.writeUInt8(Math.max(0, Math.min(255, Math.round(x * 127.5 + 127.5))), off);
          break;
        case 's16':
          buf.writeInt16LE(Math.round(x * 32767), off);
          break;
        case 's24':
          buf.writeIntLE(Math.round(x * 8388607), off, 3);
          break;
        case 's32':
          buf.writeInt32LE(Math.round(x * 2147483647), off);
          break;
        case 'f32':
          buf.writeFloatLE(x, off);
          break;
      }
      off += bps;
    }
  }
  return buf;
}
