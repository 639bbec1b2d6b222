/**
 * readChannelWindow: a stretch of one channel, read chunk by chunk. Checked against the whole-file
 * reader (wav-decoder, an independent implementation) sample for sample, for files (known length) and
 * a pipe (unknown length); reading must stop once the stretch is full.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.js';
import { openAudio, readChannelWindow, type AudioSource } from '../../src/io/audio-source.js';
import { decodeWavBytes } from '../../src/io/wav-read.js';
import { encodeWav } from '../../src/io/wav-write.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-window-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const RATE = 8000;
/** 10 s, two channels of different ramps-and-sines, 16-bit: every sample tells where it came from. */
const left = Float32Array.from({ length: 10 * RATE }, (_, i) => 0.8 * Math.sin(i * 0.013) * ((i % 977) / 977));
const right = Float32Array.from({ length: 10 * RATE }, (_, i) => 0.5 * Math.cos(i * 0.007));
const bytes = encodeWav({ sampleRate: RATE, channels: [left, right], encoding: 's16' });
const path = join(dir, 'two.wav');
writeFileSync(path, bytes);
const reference = decodeWavBytes(path, bytes).channels;

/** The file as a pipe in pieces of 1000 bytes, counting how many pieces were taken. */
function piped(): { source: Promise<AudioSource>; taken: () => number } {
  let n = 0;
  async function* pipe(): AsyncGenerator<Uint8Array> {
    for (let pos = 0; pos < bytes.length; pos += 1000) {
      n++;
      yield bytes.subarray(pos, pos + 1000);
    }
  }
  return { source: openAudio('-', { stdin: pipe(), reuseChunks: true }), taken: () => n };
}

describe('readChannelWindow', () => {
  it('gives the samples of the stretch, the same as the whole-file reader, from a file (streamed, reused arrays)', async () => {
    for (const [channel, fromS, seconds] of [[0, 0, 2], [1, 3.25, 1.5], [0, 7, 100], [1, 0, 10]] as const) {
      const w = await readChannelWindow(await openAudio(path, { streamAboveBytes: 0, reuseChunks: true, blockBytes: 4096 }), channel, fromS, seconds);
      const a = Math.round(fromS * RATE);
      const b = Math.min(10 * RATE, a + Math.round(seconds * RATE));
      expect(w.samples).toEqual(reference[channel]!.subarray(a, b));
      expect(w.fromS).toBe(fromS);
      expect(w.totalS).toBe(10);
    }
  });

  it('from a pipe (length unknown): the same samples, and the rest of the input is not read', async () => {
    const p = piped();
    const w = await readChannelWindow(await p.source, 1, 1, 0.5);
    expect(w.samples).toEqual(reference[1]!.subarray(8000, 12_000));
    expect(w.totalS).toBeNull();
    // 1.5 s of two 16-bit channels is 48,000 bytes, 48 pieces; the file has 321.
    expect(p.taken()).toBeLessThan(60);
    expect(Math.ceil(bytes.length / 1000)).toBe(321);
  });

  it('a start past the end, a channel that is not there: one-line errors naming the file', async () => {
    const err1 = await readChannelWindow(await openAudio(path), 0, 12, 1).catch((e: unknown) => e);
    expect(err1).toBeInstanceOf(InputError);
    expect((err1 as Error).message).toBe(`${path}: --from 12 s is past the end of the recording (10.0 s)`);
    const err2 = await readChannelWindow(await openAudio(path), 2, 0, 1).catch((e: unknown) => e);
    expect((err2 as Error).message).toBe(`${path}: has 2 channel(s), no channel 3`);
  });
});
