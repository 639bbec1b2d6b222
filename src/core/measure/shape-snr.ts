/**
 * Signal-to-noise ratio of a recording as the keying-shape analysis sees it: key-down level against
 * the key-up noise in the wide analysis envelope, so that the report can leave out figures the
 * recording cannot support instead of printing confident numbers made of noise.
 */
import type { Interval } from '../timeline.js';
import { SNR_BANDWIDTH_HZ } from '../signal/noise.js';
import type { Baseband } from './shape-analytic.js';

/**
 * Lowest SNR at which keyform reports rise, fall, overshoot, chirp and the edge kind [dB, key-down
 * carrier power over noise in 2500 Hz, as noiseSigmaForSnr]. Measured with keyform's own synthesizer
 * and seeded noise (5 ms raised-cosine edges at 18 wpm / 8 kHz and 25 wpm / 48 kHz, 2.5 ms linear at
 * 20 wpm / 16 kHz; three seeds each): at 20 dB the median 10–90 % rise read 3–7 % short, at 15 dB
 * 6–19 % short, at 10 dB up to 90 % off (table in docs/shape.md).
 */
export const MIN_EDGE_SNR_DB = 20;

/**
 * Lowest SNR at which keyform reports the occupied and x-dB bandwidths, click levels and a mask
 * verdict [dB, same convention]. Measured the same way (plus hard keying at 18 wpm / 24 kHz): at
 * 24 dB the noise-corrected 99 % bandwidth was 1–5 % above the noise-free figure, at 22 dB 2–10 %,
 * at 20 dB 3–16 % (the wider the sampled band, the worse), at 15 dB up to 12× too wide.
 */
export const MIN_SPECTRUM_SNR_DB = 24;

export interface ShapeSnr {
  /** Key-down carrier power over noise power in 2500 Hz [dB]; null when there is not enough key-down or key-up time. */
  snrDb: number | null;
  /** Key-down carrier power over the noise in the envelope's own band [dB]. */
  envelopeSnrDb: number | null;
  /** Noise bandwidth of the envelope filter [Hz]. */
  envelopeNoiseBandwidthHz: number;
  /** Key-down and key-up time the estimate rests on [ms]. */
  keyDownMs: number;
  keyUpMs: number;
}

/**
 * Noise bandwidth of the analysis envelope's filter [Hz]: flat pass band plus, on each side, a
 * raised-cosine taper whose squared gain integrates to 3/8 of its width [analytic].
 * @example envelopeNoiseBandwidthHz({ passBandHz: [300, 1100], taperHz: 175 }) //=> 931.25
 */
export function envelopeNoiseBandwidthHz(bb: Pick<Baseband, 'passBandHz' | 'taperHz'>): number {
  return bb.passBandHz[1] - bb.passBandHz[0] + 2 * (3 / 8) * bb.taperHz;
}

/**
 * Estimates the SNR from the complex envelope and a set of key-down intervals (e.g. the receiver's,
 * which finds marks far below the SNR at which edges can be measured). Only the middle half of each
 * mark and of each gap is used, so edges and timing errors of a few ms do not count as signal or noise.
 * Gaps longer than `maxGapMs` (before the first and after the last mark too) count as key-up.
 * @param bb - Complex envelope (complexBaseband), one value per sample.
 * @param sampleRate - Sample rate [Hz].
 * @param marks - Key-down intervals [ms from the first sample], in time order.
 * @returns SNR in keyform's convention (carrier over noise in 2500 Hz, as noiseSigmaForSnr) and in the envelope's band.
 * @example estimateShapeSnr(complexBaseband(noisy, 8000, { toneHz: 700 }), 8000, plan.marks).snrDb //=> ≈ the SNR it was made with
 */
export function estimateShapeSnr(bb: Baseband, sampleRate: number, marks: readonly Interval[]): ShapeSnr {
  const perMs = sampleRate / 1000;
  const N = bb.re.length;
  const bandHz = envelopeNoiseBandwidthHz(bb);
  const power = (a: number, b: number): [number, number] => {
    const i0 = Math.max(0, Math.round(a * perMs));
    const i1 = Math.min(N, Math.round(b * perMs));
    let s = 0;
    for (let i = i0; i < i1; i++) s += bb.re[i]! * bb.re[i]! + bb.im[i]! * bb.im[i]!;
    return [s, Math.max(0, i1 - i0)];
  };
  let onSum = 0;
  let onN = 0;
  let offSum = 0;
  let offN = 0;
  // The envelope filter's start-up at both ends of the record is not key-up noise.
  const edgeMs = 10;
  let prevEnd = edgeMs;
  const addGap = (a: number, b: number): void => {
    const q = 0.25 * (b - a);
    if (b - a < 4) return;
    const [s, n] = power(a + q, b - q);
    offSum += s;
    offN += n;
  };
  for (const [a, b] of marks) {
    if (a > prevEnd) addGap(prevEnd, a);
    const q = 0.25 * (b - a);
    if (b - a >= 4) {
      const [s, n] = power(a + q, b - q);
      onSum += s;
      onN += n;
    }
    prevEnd = Math.max(prevEnd, b);
  }
  addGap(prevEnd, (N / perMs) - edgeMs);
  const result: ShapeSnr = { snrDb: null, envelopeSnrDb: null, envelopeNoiseBandwidthHz: bandHz, keyDownMs: onN / perMs, keyUpMs: offN / perMs };
  // At least 50 ms of each, or the estimate is mostly luck.
  if (onN < 50 * perMs || offN < 50 * perMs) return result;
  const pOn = onSum / onN;
  const pOff = offSum / offN;
  if (!(pOff > 0)) {
    result.envelopeSnrDb = 200;
    result.snrDb = 200;
    return result;
  }
  // |z|² of a tone of amplitude A is A² (twice its power A²/2), and of noise twice its power in the band: the ratio is carrier over noise.
  const ratio = Math.max((pOn - pOff) / pOff, 1e-6);
  result.envelopeSnrDb = 10 * Math.log10(ratio);
  result.snrDb = 10 * Math.log10((ratio * bandHz) / SNR_BANDWIDTH_HZ);
  return result;
}
