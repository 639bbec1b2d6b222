import { findTone } from './tone.js';
import { PREROLL_MS } from './stream.js';

/**
 * Picks the channel that carries the strongest keyed tone: the one whose spectral peak (over the
 * first few seconds) stands highest above its noise floor.
 * @param channels - One array of samples per channel.
 * @param sampleRate - Sample rate [Hz].
 * @returns The 0-based channel index and a sentence saying why.
 * @example pickChannel([silence, tone], 8000).index //=> 1
 */
export function pickChannel(channels: Float32Array[], sampleRate: number): { index: number; reason: string } {
  if (channels.length <= 1) return { index: 0, reason: 'mono recording' };
  const span = Math.round((PREROLL_MS / 1000) * sampleRate);
  let best = -1;
  let bestDb = -Infinity;
  let bestHz = 0;
  channels.forEach((ch, i) => {
    const t = findTone(ch.subarray(0, Math.min(ch.length, 2 * span)), sampleRate);
    if (t.found && t.prominenceDb > bestDb) {
      best = i;
      bestDb = t.prominenceDb;
      bestHz = t.toneHz;
    }
  });
  if (best < 0) return { index: 0, reason: `no keyed tone in any of ${channels.length} channels; using channel 1` };
  return {
    index: best,
    reason: `channel ${best + 1} of ${channels.length}: strongest tone, ${bestHz.toFixed(1)} Hz, ${bestDb.toFixed(1)} dB above its noise floor`,
  };
}
