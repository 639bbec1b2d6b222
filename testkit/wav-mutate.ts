/**
 * fast-check arbitraries for damaged WAV files: a valid file from keyform's own writer, then a few
 * mutations aimed at what readers trust (sizes, channel count, rate, bit depth, format tag, chunk ids,
 * truncation, inserted chunks, NaN/Inf floats, stray bytes).
 */
import fc from 'fast-check';
import { encodeWav, type WavEncoding } from '../src/io/wav-write.js';

/** Values that break naive readers: zero, one, odd, sign bit, all ones, just past common limits. */
const SPECIAL_U32 = [0, 1, 2, 3, 7, 15, 16, 17, 18, 40, 0x7fff_f000, 0x7fff_ffff, 0x8000_0000, 0xffff_fff0, 0xffff_ffff, 7999, 8000, 192_000, 192_001];
const SPECIAL_U16 = [0, 1, 2, 3, 4, 5, 6, 7, 8, 12, 17, 24, 32, 33, 64, 255, 256, 257, 0x7fff, 0x8000, 0xfffe, 0xffff];

// Offsets in the canonical 44-byte header that encodeWav writes.
const U32_FIELDS = [4, 16, 24, 28, 40];
const U16_FIELDS = [20, 22, 32, 34];
const TAG_FIELDS = [0, 8, 12, 36];

type Mutation =
  | { kind: 'u32'; at: number; value: number }
  | { kind: 'u16'; at: number; value: number }
  | { kind: 'byte'; at: number; value: number }
  | { kind: 'truncate'; at: number }
  | { kind: 'tag'; at: number; tag: string }
  | { kind: 'chunk'; id: string; size: number; body: number }
  | { kind: 'append'; bytes: Uint8Array }
  | { kind: 'nonfinite'; at: number; value: number };

const u32 = fc.oneof(fc.constantFrom(...SPECIAL_U32), fc.integer({ min: 0, max: 0xffff_ffff }));
const u16 = fc.oneof(fc.constantFrom(...SPECIAL_U16), fc.integer({ min: 0, max: 0xffff }));
const tag = fc.oneof(fc.constantFrom('RIFF', 'WAVE', 'fmt ', 'data', 'LIST', 'fact', 'RIFX', 'RF64', 'fmt\0', 'dat'), fc.string({ minLength: 4, maxLength: 4 }));

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('u32' as const), at: fc.constantFrom(...U32_FIELDS), value: u32 }),
  fc.record({ kind: fc.constant('u16' as const), at: fc.constantFrom(...U16_FIELDS), value: u16 }),
  fc.record({ kind: fc.constant('byte' as const), at: fc.nat(), value: fc.integer({ min: 0, max: 255 }) }),
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('tag' as const), at: fc.constantFrom(...TAG_FIELDS), tag }),
  fc.record({ kind: fc.constant('chunk' as const), id: tag, size: u32, body: fc.nat({ max: 300 }) }),
  fc.record({ kind: fc.constant('append' as const), bytes: fc.uint8Array({ maxLength: 200 }) }),
  fc.record({ kind: fc.constant('nonfinite' as const), at: fc.nat(), value: fc.constantFrom(NaN, Infinity, -Infinity, 3e38, -0) }),
);

function apply(bytes: Buffer, m: Mutation): Buffer {
  switch (m.kind) {
    case 'u32':
      if (m.at + 4 <= bytes.length) bytes.writeUInt32LE(m.value >>> 0, m.at);
      return bytes;
    case 'u16':
      if (m.at + 2 <= bytes.length) bytes.writeUInt16LE(m.value, m.at);
      return bytes;
    case 'byte':
      if (bytes.length > 0) bytes[m.at % bytes.length] = m.value;
      return bytes;
    case 'truncate':
      return bytes.subarray(0, m.at % (bytes.length + 1));
    case 'tag':
      if (m.at + 4 <= bytes.length) bytes.write(m.tag.padEnd(4, ' ').slice(0, 4), m.at, 'latin1');
      return bytes;
    case 'chunk': {
      // A chunk inserted before the data chunk, whose size field may lie about its body.
      const header = Buffer.alloc(8 + m.body);
      header.write(m.id.padEnd(4, ' ').slice(0, 4), 0, 'latin1');
      header.writeUInt32LE(m.size >>> 0, 4);
      const at = Math.min(36, bytes.length);
      return Buffer.concat([bytes.subarray(0, at), header, bytes.subarray(at)]);
    }
    case 'append':
      return Buffer.concat([bytes, Buffer.from(m.bytes)]);
    case 'nonfinite': {
      const at = 44 + 4 * (m.at % 64);
      if (at + 4 <= bytes.length) bytes.writeFloatLE(m.value, at);
      return bytes;
    }
  }
}

/** A WAV file from keyform's writer, then 0–5 mutations. */
export function mutatedWav(): fc.Arbitrary<Uint8Array> {
  return fc
    .record({
      encoding: fc.constantFrom<WavEncoding>('u8', 's16', 's24', 's32', 'f32'),
      channelCount: fc.integer({ min: 1, max: 3 }),
      frames: fc.nat({ max: 200 }),
      sampleRate: fc.constantFrom(8000, 11025, 44100, 48000),
      mutations: fc.array(mutation, { maxLength: 5 }),
    })
    .map(({ encoding, channelCount, frames, sampleRate, mutations }) => {
      const channels = Array.from({ length: channelCount }, (_, c) => {
        const a = new Float32Array(frames);
        for (let i = 0; i < frames; i++) a[i] = Math.sin(0.1 * (c + 1) * i) * 0.8;
        return a;
      });
      let bytes: Buffer = Buffer.from(encodeWav({ sampleRate, channels, encoding }));
      for (const m of mutations) bytes = apply(Buffer.from(bytes), m);
      return new Uint8Array(bytes);
    });
}

type BodyDamage =
  | { kind: 'zero' | 'full' | 'noise'; at: number; length: number; seed: number }
  | { kind: 'nonfinite'; at: number; length: number; value: number }
  | { kind: 'truncate'; keep: number };

const bodyDamage: fc.Arbitrary<BodyDamage> = fc.oneof(
  fc.record({ kind: fc.constantFrom('zero' as const, 'full' as const, 'noise' as const), at: fc.double({ min: 0, max: 1, noNaN: true }), length: fc.nat({ max: 8000 }), seed: fc.nat() }),
  fc.record({ kind: fc.constant('nonfinite' as const), at: fc.double({ min: 0, max: 1, noNaN: true }), length: fc.nat({ max: 2000 }), value: fc.constantFrom(NaN, Infinity, -Infinity) }),
  fc.record({ kind: fc.constant('truncate' as const), keep: fc.double({ min: 0, max: 1, noNaN: true }) }),
);

/**
 * A keyed recording of 0.5–3 s (keyform's synthesizer, 8 kHz, 16-bit or float) whose *body* is
 * damaged: dropouts, full-scale bursts, random bytes, NaN/Inf runs, cut short. For the receiver.
 */
export function damagedRecording(keyed: (seconds: number) => Float32Array): fc.Arbitrary<Uint8Array> {
  return fc
    .record({
      seconds: fc.double({ min: 0.5, max: 3, noNaN: true }),
      encoding: fc.constantFrom<WavEncoding>('s16', 'f32'),
      damage: fc.array(bodyDamage, { maxLength: 4 }),
    })
    .map(({ seconds, encoding, damage }) => {
      let bytes: Buffer = Buffer.from(encodeWav({ sampleRate: 8000, channels: [keyed(seconds)], encoding }));
      const bps = encoding === 'f32' ? 4 : 2;
      const frames = (bytes.length - 44) / bps;
      for (const d of damage) {
        if (d.kind === 'truncate') {
          bytes = bytes.subarray(0, 44 + Math.floor(d.keep * (bytes.length - 44)));
          continue;
        }
        const start = Math.floor(d.at * frames);
        const end = Math.min(frames, start + d.length);
        let x = (d.kind === 'noise' ? d.seed : 0) >>> 0;
        for (let i = start; i < end; i++) {
          const o = 44 + i * bps;
          if (o + bps > bytes.length) break;
          if (d.kind === 'zero') bytes.fill(0, o, o + bps);
          else if (d.kind === 'full') {
            if (bps === 2) bytes.writeInt16LE(i % 2 ? 32767 : -32768, o);
            else bytes.writeFloatLE(i % 2 ? 1 : -1, o);
          } else if (d.kind === 'noise') {
            x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
            bytes.writeUInt16LE(x >>> 16, o);
          } else if (d.kind === 'nonfinite' && bps === 4) bytes.writeFloatLE(d.value, o);
        }
      }
      return new Uint8Array(bytes);
    });
}
