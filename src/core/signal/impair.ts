/**
 * Channel impairments for tests and benchmarks: hand-sent timing (jitter, speed drift, dash/dot
 * ratio, stretched gaps), fading (periodic deep fades, slow Rayleigh fading) and a drifting tone. Deterministic:
 * every random draw comes from a seeded source (see noise.ts).
 */
import { checkRange } from '../errors.js';
import type { Interval } from '../timeline.js';
import { keyingEnvelope } from './edges.js';
import { gaussianSource, seededRandom } from './noise.js';
import { synthesizeTone, type SynthesizedTone, type ToneOptions } from './synth.js';

export interface HandTimingOptions {
  /** Unit length of the original timeline [ms]. */
  unitMs: number;
  /** Standard deviation of the error added to every mark and gap, as % of a unit, 0…50. */
  jitterPct?: number;
  /** Speed change over the message, % (the speed drifts linearly from nominal to nominal·(1 + driftPct/100)), −50…100. */
  driftPct?: number;
  /** Dash/dot ratio of the sender (3 is standard), 2…5. */
  dahRatio?: number;
  /** Word gaps as sent [units] (7 is standard), 3…20. */
  wordGapUnits?: number;
  /** Seed of the random source. */
  seed: number;
}

/**
 * Re-times a keying timeline as a hand sender might: each mark and gap is scaled by the drifting
 * speed and disturbed by Gaussian jitter; dashes and word gaps can be set to a sender's own ratio.
 * Marks shorter than 3 units count as dots, gaps longer than 5 units as word gaps.
 * @returns New marks starting at 0 ms, every mark and gap at least 0.25 unit long.
 * @example handTiming([[0, 60], [120, 300]], { unitMs: 60, seed: 1 }) //=> [[0, 60], [120, 300]]
 */
export function handTiming(marks: readonly Interval[], options: HandTimingOptions): Interval[] {
  const { unitMs, seed } = options;
  const jitter = checkRange('jitter', options.jitterPct ?? 0, 0, 50, '%') / 100;
  const drift = checkRange('drift', options.driftPct ?? 0, -50, 100, '%') / 100;
  const dahRatio = checkRange('dash/dot ratio', options.dahRatio ?? 3, 2, 5);
  const wordGap = checkRange('word gap', options.wordGapUnits ?? 7, 3, 20, 'units');
  if (marks.length === 0) return [];
  const g = gaussianSource(seededRandom(seed));
  const total = marks[marks.length - 1]![1] - marks[0]![0];
  const out: Interval[] = [];
  let t = 0;
  for (let i = 0; i < marks.length; i++) {
    const [a, b] = marks[i]!;
    const progress = total > 0 ? (a - marks[0]![0]) / total : 0;
    const scale = 1 / (1 + drift * progress); // faster sending → shorter elements
    if (i > 0) {
      let gapUnits = (a - marks[i - 1]![1]) / unitMs;
      if (gapUnits > 5) gapUnits = wordGap * (gapUnits / 7);
      t += Math.max(0.25, gapUnits * scale + jitter * g()) * unitMs;
    }
    let markUnits = (b - a) / unitMs;
    if (markUnits >= 2) markUnits = dahRatio * (markUnits / 3);
    const len = Math.max(0.25, markUnits * scale + jitter * g()) * unitMs;
    out.push([t, t + len]);
    t += len;
  }
  return out;
}

export type FadingOptions =
  | {
      /** Regular deep fades: the level swings between 0 dB and −depthDb with a raised-cosine shape. */
      kind: 'periodic';
      /** Fade depth [dB], 0…60. */
      depthDb: number;
      /** Fade period [s], 0.1…600. */
      periodS: number;
    }
  | {
      /** Rayleigh fading: the amplitude of a complex Gaussian process low-pass filtered to `dopplerHz`. */
      kind: 'rayleigh';
      /** Fading bandwidth [Hz], 0.01…10 (slow fading: 0.05…0.5). */
      dopplerHz: number;
      seed: number;
    };

/**
 * Multiplies a signal by a fading gain, in place. The Rayleigh gain is normalised to unit mean
 * power over the whole signal, so a stated SNR remains the average SNR; the periodic gain is 0 dB
 * at its peaks. Gain is computed every millisecond and interpolated linearly.
 * @returns The same array.
 * @example applyFading(new Float32Array(16000).fill(1), 8000, { kind: 'periodic', depthDb: 20, periodS: 2 })[8000] //=> 0.1 (−20 dB at half a period)
 */
export function applyFading(samples: Float32Array, sampleRate: number, options: FadingOptions): Float32Array {
  const stepMs = 1;
  const points = Math.ceil((samples.length / sampleRate) * 1000) + 2;
  const gain = new Float64Array(points);
  if (options.kind === 'periodic') {
    checkRange('fade depth', options.depthDb, 0, 60, 'dB');
    checkRange('fade period', options.periodS, 0.1, 600, 's');
    for (let k = 0; k < points; k++) {
      const phase = (2 * Math.PI * k * stepMs) / (options.periodS * 1000);
      const db = -options.depthDb * 0.5 * (1 - Math.cos(phase));
      gain[k] = 10 ** (db / 20);
    }
  } else {
    checkRange('Doppler bandwidth', options.dopplerHz, 0.01, 10, 'Hz');
    const g = gaussianSource(seededRandom(options.seed));
    // Two cascaded one-pole low-passes per quadrature component, cut-off at dopplerHz.
    const a = Math.exp((-2 * Math.PI * options.dopplerHz * stepMs) / 1000);
    let i1 = 0, i2 = 0, q1 = 0, q2 = 0;
    // Let the filters settle before the signal starts.
    const settle = Math.ceil(5000 / options.dopplerHz / stepMs);
    for (let k = -settle; k < points; k++) {
      i1 = a * i1 + (1 - a) * g();
      q1 = a * q1 + (1 - a) * g();
      i2 = a * i2 + (1 - a) * i1;
      q2 = a * q2 + (1 - a) * q1;
      if (k >= 0) gain[k] = Math.hypot(i2, q2);
    }
    let power = 0;
    for (let k = 0; k < points; k++) power += gain[k]! * gain[k]!;
    const norm = Math.sqrt(points / power);
    for (let k = 0; k < points; k++) gain[k] = gain[k]! * norm;
  }
  for (let i = 0; i < samples.length; i++) {
    const x = (i * 1000) / sampleRate / stepMs;
    const k = Math.floor(x);
    const f = x - k;
    samples[i] = samples[i]! * (gain[k]! * (1 - f) + gain[k + 1]! * f);
  }
  return samples;
}

/**
 * Synthesizes a keyed tone whose frequency wanders, as an oscillator warming up or drifting would:
 * the same keying envelope and framing as synthesizeTone, with a phase-continuous sine at
 * `toneHz + offsetHz(t)`.
 * @param tone - As for synthesizeTone (`chirp` is ignored).
 * @param offsetHz - Frequency offset [Hz] at t seconds from the first sample; the tone must stay
 *   between 0 and sampleRate/2.
 * @example synthesizeDriftingTone(opts, (t) => 2 * t) // a tone rising by 2 Hz/s
 */
export function synthesizeDriftingTone(tone: ToneOptions, offsetHz: (seconds: number) => number): SynthesizedTone {
  // Checks the options and gives the framing (start time and length) of the steady tone.
  const steady = synthesizeTone({ ...tone, chirp: undefined });
  const { sampleRate, marks, edge, riseMs } = tone;
  const n = steady.samples.length;
  const env = keyingEnvelope({ marks, sampleRate, edge, riseMs, startMs: steady.startMs, lengthSamples: n });
  const amp = 10 ** (tone.levelDb / 20);
  const samples = new Float32Array(n);
  let phase = 0;
  for (let i = 0; i < n; i++) {
    const hz = tone.toneHz + offsetHz(i / sampleRate);
    if (!(hz > 0 && hz < sampleRate / 2)) throw new RangeError(`drifting tone left 0…${sampleRate / 2} Hz (${hz} Hz at ${(i / sampleRate).toFixed(2)} s)`);
    samples[i] = amp * env[i]! * Math.sin(phase);
    phase += (2 * Math.PI * hz) / sampleRate;
    if (phase > 2 * Math.PI) phase -= 2 * Math.PI;
  }
  return { samples, sampleRate, startMs: steady.startMs };
}
