/**
 * The receiver: WAV samples in, keying timeline and text out. Public API of src/core/receive.
 */
import { StreamDecoder, type DecodeOptions, type DecodeResult } from './stream.js';

export type { DecodedCharacter } from './assemble.js';
export { StreamDecoder, PREROLL_MS, type DecodeOptions, type DecodeResult } from './stream.js';
export { pickChannel } from './channel.js';
export { findTone, type ToneEstimate } from './tone.js';
export { estimateTiming, type TimingEstimate } from './estimate-timing.js';
export { lnI0, lnI0Fast } from './lni0.js';
export { editDistance } from './edit-distance.js';
export { fitToneLine, fitToneLineFrames, ToneTracker, type ToneLine } from './tone-track.js';

/** Samples handed to the stream decoder at a time by decodeSamples. */
const CHUNK = 1 << 16;

/**
 * Decodes a whole recording held in memory: a thin wrapper that feeds a StreamDecoder in chunks.
 * @param samples - Mono samples, −1…1.
 * @param sampleRate - Sample rate [Hz], 8000…192000.
 * @param options - Tone [Hz] if known, envelope, progress and live-text callbacks.
 * @returns Text, timeline (marks in ms from the start of the audio), speed, tone, SNR, characters.
 * @example decodeSamples(wavOf('Q7ZKT'), 8000).text //=> 'Q7ZKT'
 */
export function decodeSamples(samples: Float32Array, sampleRate: number, options: DecodeOptions = {}): DecodeResult {
  const decoder = new StreamDecoder(sampleRate, { ...options, expectedSamples: options.expectedSamples ?? samples.length });
  for (let off = 0; off < samples.length; off += CHUNK) decoder.push(samples.subarray(off, off + CHUNK));
  const result = decoder.finish();
  options.onProgress?.(1);
  return result;
}
