/** Test helper: a recording fed to the streaming receiver in chunks of random sizes, as a pipe delivers it. */
import { StreamDecoder, type DecodeOptions, type DecodeResult } from '../../src/core/receive/index.js';

/** Pushes `x` in chunks of 1…maxChunk samples (sizes from `rnd`, 0…1) and returns the finished result. */
export function decodeInChunks(x: Float32Array, sampleRate: number, rnd: () => number, maxChunk: number, options: DecodeOptions = {}): DecodeResult {
  const d = new StreamDecoder(sampleRate, options);
  for (let off = 0; off < x.length; ) {
    const n = 1 + Math.floor(rnd() * maxChunk);
    d.push(x.subarray(off, off + n));
    off += n;
  }
  return d.finish();
}
