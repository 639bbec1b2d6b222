import { execFileSync, spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { gaussianSource, seededRandom } from '../../src/core/signal/noise.js';
import { openAudio, readAllAudio } from '../../src/io/audio-source.js';
import { decodeWavBytes } from '../../src/io/wav-read.js';
import { RawPcmParser, WavStreamParser } from '../../src/io/wav-stream.js';
import { encodeWav, type WavEncoding } from '../../src/io/wav-write.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-stream-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Seeded test signal: a tone plus noise, different in every channel, kept within ±1. */
function testChannels(channelCount: number, frames: number, seed: number): Float32Array[] {
  const g = gaussianSource(seededRandom(seed));
  return Array.from({ length: channelCount }, (_, c) => {
    const a = new Float32Array(frames);
    for (let i = 0; i < frames; i++) a[i] = Math.max(-1, Math.min(1, 0.5 * Math.sin(0.3 * (c + 1) * i) + 0.2 * g()));
    // Full scale both ways, so the extremes of every encoding are exercised.
    if (frames > 2) {
      a[0] = 1;
      a[1] = -1;
    }
    return a;
  });
}

/** Feeds `bytes` to the streaming parser in pieces whose sizes come from a seeded generator. */
function parseInPieces(bytes: Uint8Array, seed: number, maxPiece: number): { channels: Float32Array[]; warnings: string[] } {
  const random = seededRandom(seed);
  const parser = new WavStreamParser('t.wav');
  const parts: Float32Array[][] = [];
  for (let pos = 0; pos < bytes.length; ) {
    const n = 1 + Math.floor(random() * maxPiece);
    parts.push(...parser.push(bytes.subarray(pos, pos + n)));
    pos += n;
  }
  const { warnings } = parser.finish();
  const nch = parser.format!.channelCount;
  const channels = Array.from({ length: nch }, (_, c) => {
    const all = parts.flatMap((p) => Array.from(p[c]!));
    return Float32Array.from(all);
  });
  return { channels, warnings };
}

const ENCODINGS: WavEncoding[] = ['u8', 's16', 's24', 's32', 'f32'];

describe('streaming WAV parser', () => {
  for (const encoding of ENCODINGS) {
    for (const channelCount of [1, 2, 3]) {
      it(`gives the whole-file reader's samples for ${encoding}, ${channelCount} channel(s), with chunk boundaries anywhere`, () => {
        const bytes = encodeWav({ sampleRate: 8000, channels: testChannels(channelCount, 701, 11 * channelCount), encoding });
        // The whole-file reader (wav-decoder) is the reference the streaming parser must match bit for bit.
        const whole = decodeWavBytes('t.wav', bytes).channels;
        for (const [seed, maxPiece] of [[1, 1], [2, 7], [3, 100], [4, 5000]] as const) {
          const { channels, warnings } = parseInPieces(bytes, seed, maxPiece);
          expect(warnings).toEqual([]);
          expect(channels.length).toBe(channelCount);
          for (let c = 0; c < channelCount; c++) expect(channels[c]).toEqual(whole[c]);
        }
      });
    }
  }

  it('reads 24-bit stereo WAVE_FORMAT_EXTENSIBLE from sox (an independent tool) to the samples sox writes as raw float', async () => {
    const path = join(dir, 'sox-24.wav');
    const raw = join(dir, 'sox-f32.raw');
    const synth = ['synth', '0.5', 'sine', '600', 'sine', '900', 'vol', '0.5'];
    // sox writes WAVE_FORMAT_EXTENSIBLE with a fact chunk for 24-bit stereo; -D: no dither, so both runs agree.
    execFileSync('sox', ['-D', '-n', '-r', '8000', '-b', '24', '-c', '2', path, ...synth]);
    execFileSync('sox', ['-D', '-n', '-r', '8000', '-b', '32', '-e', 'floating-point', '-c', '2', '-t', 'raw', raw, ...synth]);
    const { channels } = parseInPieces(readFileSync(path), 9, 333);
    const reference = await readAllAudio(await openAudio(raw, { raw: 'f32le', rate: 8000, channels: 2 }));
    expect(channels[0]!.length).toBe(4000); // 0.5 s at 8000 Hz
    for (let c = 0; c < 2; c++) {
      let worst = 0;
      for (let i = 0; i < 4000; i++) worst = Math.max(worst, Math.abs(channels[c]![i]! - reference[c]![i]!));
      expect(worst).toBeLessThan(2 ** -22); // 24-bit quantisation step is 2^-23 [analytic]
    }
    // Peak of a 0.5 amplitude sine (sox `vol 0.5`): within 1 % of 0.5 [analytic].
    const peak = channels[0]!.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
    expect(peak).toBeGreaterThan(0.495);
    expect(peak).toBeLessThan(0.505);
    // The whole-file path of openAudio reads it too.
    expect(await readAllAudio(await openAudio(path))).toEqual(channels);
  });

  it('reads a WAV stream from a pipe (sox writing to stdout, header length left open) chunk by chunk', async () => {
    const child = spawn('sox', ['-n', '-r', '8000', '-b', '16', '-t', 'wav', '-', 'synth', '2', 'sine', '700'], { stdio: ['ignore', 'pipe', 'ignore'] });
    const audio = await openAudio('-', { stdin: child.stdout });
    expect(audio.streaming).toBe(true);
    expect(audio.sampleRate).toBe(8000);
    expect(audio.durationMs).toBeNull();
    const [samples] = await readAllAudio(audio);
    // 2 s at 8000 Hz = 16000 frames, as asked of sox.
    expect(samples!.length).toBe(16000);
    expect(audio.warnings).toEqual([]);
  });

  it('reads what is there when the data chunk claims more bytes than the file has, with a warning', () => {
    const bytes = encodeWav({ sampleRate: 8000, channels: testChannels(1, 100, 5), encoding: 's16' });
    const cut = bytes.subarray(0, 44 + 2 * 60 + 1); // 60 whole frames and one stray byte
    const parser = new WavStreamParser('cut.wav');
    const parts = parser.push(cut);
    const { warnings } = parser.finish();
    expect(parts.reduce((s, p) => s + p[0]!.length, 0)).toBe(60);
    expect(warnings.join('\n')).toMatch(/declares 200 bytes but the input ends after 121/);
    expect(warnings.join('\n')).toMatch(/1 trailing bytes/);
  });

  it('reads NaN and infinite float samples as 0 and says how many', () => {
    const ch = Float32Array.from([0.25, NaN, Infinity, -Infinity, -0.5]);
    const bytes = encodeWav({ sampleRate: 8000, channels: [Float32Array.from([0, 0, 0, 0, 0])], encoding: 'f32' });
    // encodeWav clips to ±1, so write the non-finite values into the data chunk directly.
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    ch.forEach((v, i) => view.setFloat32(44 + 4 * i, v, true));
    const parser = new WavStreamParser('nan.wav');
    const [chunk] = parser.push(bytes);
    expect(Array.from(chunk![0]!)).toEqual([0.25, 0, 0, 0, -0.5]);
    expect(parser.finish().warnings.join('\n')).toMatch(/3 non-finite float samples/);
  });

  it('skips unknown chunks of any size by counting, without reading them into memory', () => {
    const wav = encodeWav({ sampleRate: 8000, channels: testChannels(1, 50, 3), encoding: 's16' });
    const junk = Buffer.alloc(8 + 5001 + 1);
    junk.write('JUNK', 0, 'ascii');
    junk.writeUInt32LE(5001, 4); // odd size: one pad byte follows
    const bytes = Buffer.concat([wav.subarray(0, 36), junk, wav.subarray(36)]);
    const { channels } = parseInPieces(bytes, 4, 999);
    expect(channels[0]).toEqual(decodeWavBytes('t.wav', wav).channels[0]);
  });

  it.each([
    ['empty input', Buffer.alloc(0), /empty file/],
    ['a text file', Buffer.from('hello, this is not audio at all\n'), /not a WAV file/],
    ['no fmt chunk', Buffer.concat([Buffer.from('RIFF\x04\x00\x00\x00WAVE', 'latin1')]), /no fmt chunk/],
  ])('rejects %s with a one-line error naming the input', (_label, bytes, message) => {
    const parser = new WavStreamParser('bad.wav');
    const run = (): void => {
      parser.push(bytes);
      parser.finish();
    };
    expect(run).toThrow(message);
    expect(run).toThrow(/^bad\.wav: [^\n]+$/);
  });
});

describe('raw PCM', () => {
  it('reads s16le with the same scaling as WAV (negative over 32768, positive over 32767)', () => {
    const values = [0, 1, -1, 32767, -32768, 12345, -12345];
    const bytes = Buffer.alloc(values.length * 2);
    values.forEach((v, i) => bytes.writeInt16LE(v, 2 * i));
    const parser = new RawPcmParser('-', { encoding: 's16le', sampleRate: 8000, channelCount: 1 });
    const out = [...parser.push(bytes.subarray(0, 5)), ...parser.push(bytes.subarray(5))];
    const got = out.flatMap((c) => Array.from(c[0]!));
    expect(got).toEqual(values.map((v) => Math.fround(v < 0 ? v / 32768 : v / 32767)));
  });

  it('reads every one of the 65,536 16-bit values, mono, in pieces of odd and even lengths, to the same scaling', () => {
    // Mono s16 is converted two samples per 32-bit load; an odd number of samples in a push leaves
    // one on its own. The reference is the scaling written out, as the whole-file reader (wav-decoder) uses it.
    const bytes = Buffer.alloc(65536 * 2);
    for (let v = -32768; v < 32768; v++) bytes.writeInt16LE(v, 2 * (v + 32768));
    const expected = Array.from({ length: 65536 }, (_, k) => Math.fround(k < 32768 ? (k - 32768) / 32768 : (k - 32768) / 32767));
    for (const pieceBytes of [2, 6, 7, 4096, 65537, 131072]) {
      const parser = new RawPcmParser('-', { encoding: 's16le', sampleRate: 8000, channelCount: 1 });
      const out: Float32Array[][] = [];
      for (let pos = 0; pos < bytes.length; pos += pieceBytes) out.push(...parser.push(bytes.subarray(pos, pos + pieceBytes)));
      const got = out.flatMap((c) => Array.from(c[0]!));
      expect(got.length).toBe(65536);
      expect(got).toEqual(expected);
    }
  });

  it('reads interleaved stereo f32le, split anywhere', () => {
    const frames = [[0.5, -0.25], [0.125, 1], [-1, 0]];
    const bytes = Buffer.alloc(frames.length * 8);
    frames.flat().forEach((v, i) => bytes.writeFloatLE(v, 4 * i));
    const parser = new RawPcmParser('-', { encoding: 'f32le', sampleRate: 48000, channelCount: 2 });
    const out = [...parser.push(bytes.subarray(0, 3)), ...parser.push(bytes.subarray(3, 13)), ...parser.push(bytes.subarray(13))];
    expect(out.flatMap((c) => Array.from(c[0]!))).toEqual(frames.map((f) => f[0]));
    expect(out.flatMap((c) => Array.from(c[1]!))).toEqual(frames.map((f) => f[1]));
    expect(parser.finish().warnings).toEqual([]);
  });

  it('warns when what it reads as raw PCM is a WAV file (its header arriving in pieces)', () => {
    const wav = encodeWav({ sampleRate: 8000, channels: [new Float32Array(400).fill(0.25)], encoding: 's16' });
    const parser = new RawPcmParser('-', { encoding: 's16le', sampleRate: 8000, channelCount: 1 });
    for (let i = 0; i < wav.length; i += 5) parser.push(wav.subarray(i, i + 5));
    const { warnings } = parser.finish();
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toMatch(/^-: starts with a WAV header but was read as raw PCM \(--raw\)/);
    // Raw samples that are not a header: no warning.
    const raw = new RawPcmParser('-', { encoding: 's16le', sampleRate: 8000, channelCount: 1 });
    raw.push(wav.subarray(44));
    expect(raw.finish().warnings).toEqual([]);
  });

  it('matches sox: the same tone written as raw s16le and as WAV reads to the same samples', async () => {
    const raw = join(dir, 'tone.raw');
    const wav = join(dir, 'tone.wav');
    const synth = ['synth', '0.3', 'sine', '650'];
    execFileSync('sox', ['-D', '-n', '-r', '16000', '-b', '16', '-e', 'signed', '-t', 'raw', raw, ...synth]);
    execFileSync('sox', ['-D', '-n', '-r', '16000', '-b', '16', wav, ...synth]);
    const fromRaw = await readAllAudio(await openAudio(raw, { raw: 's16le', rate: 16000 }));
    const fromWav = await readAllAudio(await openAudio(wav));
    expect(fromRaw[0]!.length).toBe(4800); // 0.3 s at 16000 Hz
    expect(fromRaw).toEqual(fromWav);
  });
});

/** A stdin that ends at once. */
async function* noInput(): AsyncGenerator<Uint8Array> {}

describe('openAudio', () => {
  it('gives the same samples on the whole-file and the streaming path', async () => {
    const path = join(dir, 'both.wav');
    writeFileSync(path, encodeWav({ sampleRate: 11025, channels: testChannels(2, 30_000, 8), encoding: 's24' }));
    const whole = await openAudio(path);
    const streamed = await openAudio(path, { streamAboveBytes: 0, blockBytes: 4093 });
    expect(whole.streaming).toBe(false);
    expect(streamed.streaming).toBe(true);
    // 30000 frames at 11025 Hz [analytic].
    expect(streamed.durationMs).toBeCloseTo((30_000 / 11025) * 1000, 9);
    expect(whole.durationMs).toBeCloseTo((30_000 / 11025) * 1000, 9);
    expect(await readAllAudio(streamed)).toEqual(await readAllAudio(whole));
  });

  it('needs --rate for raw PCM and refuses --rate without --raw', async () => {
    await expect(openAudio('-', { raw: 's16le', stdin: noInput() })).rejects.toThrow(/needs its sample rate/);
    await expect(openAudio('x.wav', { rate: 8000 })).rejects.toThrow(/give --raw/);
    await expect(openAudio('-', { raw: 's16le', rate: 4000, stdin: noInput() })).rejects.toThrow(/--rate must be from 8000 to 192000/);
  });
});

describe('choosing the path', () => {
  it('streams a file over 16 MiB without reading it whole, and stops reading when the consumer stops', async () => {
    const { openSync, closeSync, ftruncateSync, writeSync } = await import('node:fs');
    const path = join(dir, 'long.wav');
    const dataBytes = 17 * 1024 * 1024; // 17 MiB of 16-bit mono: over the 16 MiB threshold
    const header = Buffer.from(encodeWav({ sampleRate: 8000, channels: [new Float32Array(0)] }));
    header.writeUInt32LE(36 + dataBytes, 4);
    header.writeUInt32LE(dataBytes, 40);
    const fd = openSync(path, 'w');
    writeSync(fd, header);
    ftruncateSync(fd, 44 + dataBytes); // sparse: silence, nothing written
    closeSync(fd);
    const audio = await openAudio(path);
    expect(audio.streaming).toBe(true);
    // 17 MiB / 2 bytes per frame / 8000 Hz [analytic].
    expect(audio.durationMs).toBeCloseTo((dataBytes / 2 / 8000) * 1000, 6);
    let frames = 0;
    for await (const [ch] of audio.chunks()) {
      frames += ch!.length;
      if (frames >= 1_000_000) break;
    }
    // Two blocks of 1 MiB read, not 17: the first holds the 44-byte header, so (2 MiB − 44) / 2 frames.
    expect(frames).toBe((2 * 1024 * 1024 - 44) / 2);
  });

  it('refuses to wait on a terminal for audio', async () => {
    const tty = Object.assign(noInput(), { isTTY: true });
    await expect(openAudio('-', { stdin: tty })).rejects.toThrow(/stdin is a terminal/);
  });
});
