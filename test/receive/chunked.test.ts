/**
 * The streaming receiver is a function of the samples alone: however a recording is cut into chunks
 * (a file read a block at a time, a pipe read as its data arrive), the text, marks, tone and
 * envelope come out the same as from one long call.
 */
import { describe, expect, it } from 'vitest';
import { decodeSamples, StreamDecoder, type DecodeOptions, type DecodeResult } from '../../src/core/receive/index.js';
import { synthesizeDriftingTone } from '../../src/core/signal/impair.js';
import { addNoise, noiseSigmaForSnr, seededRandom } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';

const RATE = 8000;
const AMP = 10 ** (-6 / 20);

/** Pushes `x` in chunks of 1…maxChunk samples (sizes from `rnd`, 0…1) and returns the finished result. */
function decodeInChunks(x: Float32Array, rnd: () => number, maxChunk: number, options: DecodeOptions = {}): DecodeResult {
  const d = new StreamDecoder(RATE, options);
  for (let off = 0; off < x.length; ) {
    const n = 1 + Math.floor(rnd() * maxChunk);
    d.push(x.subarray(off, off + n));
    off += n;
  }
  return d.finish();
}

describe('decoding in chunks', () => {
  it('gives the same result whatever the chunk sizes, and onText adds up to the text', () => {
    const plan = planKeying('Q7ZKT DE Q3ABC TEST', { wpm: 20 });
    const tone = synthesizeTone({ marks: plan.marks, sampleRate: RATE, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }).samples;
    const x = addNoise(tone, noiseSigmaForSnr(AMP, RATE, 3), 21);
    const whole = decodeSamples(x, RATE);
    const pieces: string[] = [];
    const streamed = decodeInChunks(x, seededRandom(4), 3000, { onText: (t) => pieces.push(t) });
    expect(streamed.text).toBe(plan.text);
    expect(streamed.text).toBe(whole.text);
    expect(streamed.marks).toEqual(whole.marks);
    expect(pieces.join('')).toBe(plan.text);
    expect(pieces.length).toBe(plan.characters.length);
  });

  it('gives the same marks and envelope however the stream is cut into chunks, while the tracker retunes the mixer', () => {
    // 3 Hz/s of drift: the mixer is retuned every few slots, each time from the end of a slot. A file
    // is read a block at a time and a pipe as its data arrive, so chunk ends fall anywhere; the marks
    // must not depend on where (nothing about them may, the decoder being a function of the samples).
    const plan = planKeying('Q7ZKT DE Q3ABC TEST RST 599', { wpm: 22 });
    const x = synthesizeDriftingTone({ marks: plan.marks, sampleRate: RATE, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }, (t) => 3 * t).samples;
    addNoise(x, noiseSigmaForSnr(AMP, RATE, 8), 15);
    const whole = decodeSamples(x, RATE, { keepEnvelope: true });
    expect(whole.text).toBe(plan.text);
    const rnd = seededRandom(8);
    for (const maxChunk of [997, 4096, 30011]) {
      const r = decodeInChunks(x, rnd, maxChunk, { keepEnvelope: true });
      expect(r.text).toBe(whole.text);
      expect(r.marks).toEqual(whole.marks);
      expect(r.toneHz).toBe(whole.toneHz);
      // The matched-filter envelope, unrounded: a retune a few samples late would show in it.
      expect(r.envelope!.values).toEqual(whole.envelope!.values);
    }
  });
});
