/**
 * Streamed reads with reused chunk arrays: the samples must be exactly those of a read with a new
 * array per block (the whole-file reader, wav-decoder, is the independent reference), including the
 * audio of the blocks read before the header was complete, and a multichannel decode (which holds
 * its first seconds to choose the channel) must not change.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioSource } from '../../src/cli/analyze-recording.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { openAudio, readAllAudio } from '../../src/io/audio-source.js';
import { decodeWavBytes } from '../../src/io/wav-read.js';
import { encodeWav } from '../../src/io/wav-write.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-reuse-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A two-channel WAV: keyed tone on the right, noise only on the left; with a large chunk before `data`. */
function stereoFile(name: string): { path: string; bytes: Uint8Array } {
  const rate = 8000;
  const plan = planKeying('Q7ZKT DE Q3ABC TEST', { wpm: 22 });
  const right = synthesizeTone({ marks: plan.marks, sampleRate: rate, toneHz: 650, levelDb: -10, edge: 'raised-cosine', riseMs: 5, padMs: 300 }).samples;
  addNoise(right, noiseSigmaForSnr(10 ** (-10 / 20), rate, 10), 3);
  const left = new Float32Array(right.length);
  addNoise(left, 0.02, 4);
  const wav = encodeWav({ sampleRate: rate, channels: [left, right], encoding: 's16' });
  // Put a 3000-byte 'junk' chunk between 'fmt ' and 'data', so the header spans blocks of 1 KiB.
  const fmtEnd = 12 + 8 + 16;
  const junk = new Uint8Array(8 + 3000);
  junk.set([0x6a, 0x75, 0x6e, 0x6b]); // 'junk'
  new DataView(junk.buffer).setUint32(4, 3000, true);
  const bytes = new Uint8Array(wav.length + junk.length);
  bytes.set(wav.subarray(0, fmtEnd), 0);
  bytes.set(junk, fmtEnd);
  bytes.set(wav.subarray(fmtEnd), fmtEnd + junk.length);
  new DataView(bytes.buffer).setUint32(4, bytes.length - 8, true);
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return { path, bytes };
}

describe('streamed reads with reused chunk arrays', () => {
  it('give the same samples as the whole-file reader, block after block', async () => {
    const { path, bytes } = stereoFile('q-reuse.wav');
    const reference = decodeWavBytes('q-reuse.wav', Buffer.from(bytes)).channels; // wav-decoder
    const audio = await openAudio(path, { streamAboveBytes: 0, blockBytes: 1024, reuseChunks: true });
    expect(audio.reusesChunks).toBe(true);
    const got = await readAllAudio(audio);
    expect(got).toHaveLength(2);
    for (let c = 0; c < 2; c++) {
      expect(got[c]!.length).toBe(reference[c]!.length);
      expect(Array.from(got[c]!)).toEqual(Array.from(reference[c]!));
    }
  });

  it('really reuse: consecutive chunks share one buffer', async () => {
    const { path } = stereoFile('q-reuse-2.wav');
    const audio = await openAudio(path, { streamAboveBytes: 0, blockBytes: 4096, reuseChunks: true });
    const buffers = new Set<ArrayBufferLike>();
    let chunks = 0;
    for await (const [left] of audio.chunks()) {
      buffers.add(left!.buffer);
      chunks++;
    }
    expect(chunks).toBeGreaterThan(10);
    // The early chunk (copied) and then one reused buffer per channel size: far fewer than chunks.
    expect(buffers.size).toBeLessThanOrEqual(3);
  });

  it('decode a two-channel recording exactly as without reuse (the channel is chosen from held chunks)', async () => {
    const { path } = stereoFile('q-reuse-3.wav');
    const plain = await decodeAudioSource(await openAudio(path, { streamAboveBytes: 0, blockBytes: 2048 }));
    const reused = await decodeAudioSource(await openAudio(path, { streamAboveBytes: 0, blockBytes: 2048, reuseChunks: true }));
    expect(plain.channel).toBe(1);
    expect(reused.channel).toBe(1);
    expect(reused.result.text).toBe(plain.result.text);
    expect(reused.result.text).toBe('Q7ZKT DE Q3ABC TEST');
    expect(reused.result.marks).toEqual(plain.result.marks);
  });
});
