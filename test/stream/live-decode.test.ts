import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { decodeAudioSource, followText } from '../../src/cli/analyze-recording.js';
import { synthesizeDriftingTone } from '../../src/core/signal/impair.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { openAudio } from '../../src/io/audio-source.js';

/** Interleaved s16le bytes of the given channels (what a recorder writes to a pipe). */
function s16le(channels: Float32Array[]): Buffer {
  const n = channels[0]!.length;
  const buf = Buffer.alloc(n * channels.length * 2);
  for (let i = 0, o = 0; i < n; i++) for (const ch of channels) (buf.writeInt16LE(Math.round(Math.max(-1, Math.min(1, ch[i]!)) * 32767), o), (o += 2));
  return buf;
}

/** A readable stream that hands out `bytes` in pieces of `piece` bytes (odd sizes split frames). */
function pipeOf(bytes: Buffer, piece: number): Readable {
  let pos = 0;
  return new Readable({
    read() {
      if (pos >= bytes.length) this.push(null);
      else {
        this.push(bytes.subarray(pos, pos + piece));
        pos += piece;
      }
    },
  });
}

function keyed(text: string, wpm: number, sampleRate: number, padMs: number): Float32Array {
  const plan = planKeying(text, { wpm });
  return synthesizeTone({ marks: plan.marks, sampleRate, toneHz: 600, levelDb: -10, edge: 'raised-cosine', riseMs: 4, padMs }).samples;
}

describe('decoding a raw PCM pipe chunk by chunk (keyform decode - --raw s16le --rate 8000)', () => {
  it('gives the keyed text, piece by piece through onText, from frames split anywhere', async () => {
    const text = 'Q7ZKT DE Q3ABC TEST';
    const samples = keyed(text, 24, 8000, 500);
    const audio = await openAudio('-', { stdin: pipeOf(s16le([samples]), 1001), raw: 's16le', rate: 8000 });
    expect(audio.durationMs).toBeNull();
    const pieces: string[] = [];
    const { result, channel } = await decodeAudioSource(audio, { onText: (t) => pieces.push(t) });
    expect(channel).toBe(0);
    expect(result.text.trim()).toBe(text);
    // The live pieces add up to the final text.
    expect(pieces.join('').trim()).toBe(text);
    // 24 WPM PARIS as planned, within 5 %.
    expect(Math.abs(result.wpm! - 24) / 24).toBeLessThan(0.05);
  });

  it('gives the same marks and envelope whatever sizes the pipe hands its bytes out in (a drifting tone, retuned as it goes)', async () => {
    const plan = planKeying('Q7ZKT DE Q3ABC TEST RST 599', { wpm: 22 });
    const x = synthesizeDriftingTone({ marks: plan.marks, sampleRate: 8000, toneHz: 650, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }, (t) => 3 * t).samples;
    addNoise(x, noiseSigmaForSnr(10 ** (-6 / 20), 8000, 10), 5);
    const bytes = s16le([x]);
    const results = [];
    for (const piece of [777, 4096, 65536, bytes.length]) {
      const audio = await openAudio('-', { stdin: pipeOf(bytes, piece), raw: 's16le', rate: 8000 });
      results.push((await decodeAudioSource(audio, { keepEnvelope: true })).result);
    }
    expect(results[0]!.text).toBe(plan.text);
    for (const r of results.slice(1)) {
      expect(r.marks).toEqual(results[0]!.marks);
      expect(r.envelope!.values).toEqual(results[0]!.envelope!.values);
    }
  });

  it('picks the channel carrying the keyed tone in a two-channel stream', async () => {
    const text = 'Q9XYZ BEACON';
    const signal = keyed(text, 20, 8000, 400);
    const noise = addNoise(new Float32Array(signal.length), noiseSigmaForSnr(0.3, 8000, 0), 99);
    const audio = await openAudio('-', { stdin: pipeOf(s16le([noise, signal]), 4096), raw: 's16le', rate: 8000, channels: 2 });
    const { result, channel, channelNote } = await decodeAudioSource(audio);
    expect(channel).toBe(1);
    expect(channelNote).toMatch(/^stdin: using channel 2 of 2/);
    expect(result.text.trim()).toBe(text);
  });

  it('refuses a channel the input does not have', async () => {
    const audio = await openAudio('-', { stdin: pipeOf(Buffer.alloc(16000), 1000), raw: 's16le', rate: 8000 });
    await expect(decodeAudioSource(audio, { channel: 1 })).rejects.toThrow(/stdin: channel 2 does not exist \(the input has 1 channel, numbered from 1\)/);
  });
});

describe('followText', () => {
  it('writes pieces at once and breaks lines at word boundaries past the width', () => {
    let out = '';
    const f = followText((s) => (out += s), 12);
    for (const p of [' Q', '7', 'Z', 'K', 'T', ' D', 'E', ' Q', '3', 'A', 'B', 'C', ' K']) f.write(p);
    f.end();
    expect(out).toBe('Q7ZKT DE Q3ABC\nK\n');
  });
});
