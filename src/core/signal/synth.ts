import { checkRange, InputError } from '../errors.js';
import type { Interval } from '../timeline.js';
import { keyingEnvelope, rampLengthMs, type EdgeKind } from './edges.js';

export interface ToneOptions {
  marks: readonly Interval[];
  /** Sample rate [Hz], 8000…192000. */
  sampleRate: number;
  /** Tone frequency [Hz], above 0 and below sampleRate/2. */
  toneHz: number;
  /** Peak amplitude [dBFS], −120…0. */
  levelDb: number;
  edge: EdgeKind;
  /** 10–90 % rise and fall time [ms], 0…50. */
  riseMs: number;
  /** Silence before the first mark and after the last edge [ms]. */
  padMs: number;
  /** Optional frequency offset [Hz] applied at time t ms after each key-down (chirp model). */
  chirp?: (msSinceKeyDown: number) => number;
}

export interface SynthesizedTone {
  samples: Float32Array;
  sampleRate: number;
  /** Time of sample 0 on the timeline [ms] (negative: silence before the first mark). */
  startMs: number;
}

/**
 * Synthesizes a keyed tone: a phase-continuous sine at `toneHz` times the keying envelope.
 * @example synthesizeTone({ marks: [[0, 60]], sampleRate: 8000, toneHz: 700, levelDb: -6, edge: 'hard', riseMs: 0, padMs: 0 }).samples.length //=> 480
 */
export function synthesizeTone(options: ToneOptions): SynthesizedTone {
  const { marks, sampleRate, toneHz, levelDb, edge, riseMs, padMs } = options;
  checkRange('sample rate', sampleRate, 8000, 192_000, 'Hz');
  if (!(toneHz > 0 && toneHz < sampleRate / 2)) {
    throw new InputError(`tone must be above 0 and below sampleRate/2 = ${sampleRate / 2} Hz (got ${toneHz})`);
  }
  checkRange('level', levelDb, -120, 0, 'dBFS');
  checkRange('rise', riseMs, 0, 50, 'ms');
  checkRange('pad', padMs, 0, 600_000, 'ms');
  const endMark = marks.length > 0 ? marks[marks.length - 1]![1] : 0;
  const T = rampLengthMs(edge, riseMs);
  const tailMs = edge === 'exponential' ? 7 * T : T / 2; // 7τ: the RC tail has fallen below 0.1 %
  const leadMs = edge === 'exponential' ? 0 : T / 2;
  const startMs = -(padMs + leadMs);
  const lengthSamples = Math.ceil(((endMark + tailMs + padMs - startMs) * sampleRate) / 1000);
  const env = keyingEnvelope({ marks, sampleRate, edge, riseMs, startMs, lengthSamples });
  const amp = 10 ** (levelDb / 20);
  const samples = new Float32Array(lengthSamples);
  const w = (2 * Math.PI * toneHz) / sampleRate;
  if (!options.chirp) {
    for (let i = 0; i < lengthSamples; i++) samples[i] = amp * env[i]! * Math.sin(w * i);
    return { samples, sampleRate, startMs };
  }
  let phase = 0;
  let m = 0;
  for (let i = 0; i < lengthSamples; i++) {
    const t = startMs + (i * 1000) / sampleRate;
    while (m + 1 < marks.length && marks[m + 1]![0] - T / 2 <= t) m++;
    const since = marks.length > 0 ? t - marks[m]![0] : 0;
    const f = toneHz + options.chirp(since);
    samples[i] = amp * env[i]! * Math.sin(phase);
    phase += (2 * Math.PI * f) / sampleRate;
    if (phase > 2 * Math.PI) phase -= 2 * Math.PI;
  }
  return { samples, sampleRate, startMs };
}
