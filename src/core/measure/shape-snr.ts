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
 * and seeded noise (test/shape/snr-thresholds.bench.ts: 5 ms raised-cosine edges at 18 wpm / 8 kHz and
 * 25 wpm / 48 kHz, 2.5 ms linear at 20 wpm / 16 kHz, hard keying at 18 wpm / 24 kHz; three seeds each):
 * at 20 dB the median 10–90 % rise of the shaped edges read 4–8 % short, at 15 dB up to 19 % short,
 * at 10 dB up to 90 % off (table in the README, keyform shape section). Applied to the recording's average and to each
 * mark's own SNR (measureShape).
 */
export const MIN_EDGE_SNR_DB = 20;

/**
 * Lowest SNR at which keyform reports the occupied and x-dB bandwidths, click levels and a mask
 * verdict [dB, same convention]. Measured the same way: at 24 dB the noise-corrected 99 % bandwidth
 * was 1–4.5 % above the noise-free figure, at 22 dB up to 10 %, at 20 dB up to 16 % (the wider the
 * sampled band, the worse), at 15 dB up to 12× too wide.
 */
export const MIN_SPECTRUM_SNR_DB = 24;

export interface ShapeSnr {
  /** Key-down carrier power over noise power in 2500 Hz [dB]; null when there is not enough key-down or key-up time. */
  snrDb: number | null;
  /** Key-down carrier power over the noise in the envelope's own band [dB]. */
  envelopeSnrDb: number | null;
  /** Noise bandwidth of the envelope filter [Hz]. */
  envelopeNoiseBandwidthHz: number;
  /** Mean |z|² of the key-up noise in the envelope (the envelope's units squared); null without key-up time. */
  noisePower: number | null;
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

/** Running sums of |z|² over key-down and key-up interiors, so that stretches of a long recording can be added up. */
export interface SnrSums {
  onSum: number;
  onN: number;
  offSum: number;
  offN: number;
}

/**
 * Adds one stretch of a recording to the SNR sums: the middle half of each mark and of each gap
 * (marks on the recording's clock), counted only where it falls in [keepFromMs, keepToMs) and more
 * than 10 ms from the recording's ends (the envelope filter's start-up is not key-up noise).
 * @param bb - Complex envelope of the stretch; its first sample is at `startMs` on the recording's clock.
 * @param recordMs - Length of the whole recording [ms].
 * @example addSnrSums(sums, bb, 8000, marks, { startMs: 0, keepFromMs: 0, keepToMs: 5000, recordMs: 5000 })
 */
export function addSnrSums(
  sums: SnrSums,
  bb: Pick<Baseband, 're' | 'im'>,
  sampleRate: number,
  marks: readonly Interval[],
  at: { startMs: number; keepFromMs: number; keepToMs: number; recordMs: number },
): SnrSums {
  const perMs = sampleRate / 1000;
  const lo = Math.max(at.keepFromMs, 10);
  const hi = Math.min(at.keepToMs, at.recordMs - 10);
  const span = { lo, hi, startMs: at.startMs, perMs };
  let prevEnd = 0;
  for (const [a, b] of marks) {
    if (a > prevEnd) addMiddle(sums, bb, prevEnd, a, false, span);
    addMiddle(sums, bb, a, b, true, span);
    prevEnd = Math.max(prevEnd, b);
  }
  addMiddle(sums, bb, prevEnd, at.recordMs, false, span);
  return sums;
}

/**
 * Adds the power of the middle half of (a, b) [ms] (nothing for spans under 4 ms), clipped to
 * [lo, hi), to the mark or the gap sums. A module-level function rather than a callback made at each
 * call, so that its compiled code is kept from one recording to the next.
 */
function addMiddle(
  sums: SnrSums,
  bb: Pick<Baseband, 're' | 'im'>,
  a: number,
  b: number,
  on: boolean,
  span: { lo: number; hi: number; startMs: number; perMs: number },
): void {
  if (b - a < 4) return;
  const m0 = a + 0.25 * (b - a);
  const m1 = b - 0.25 * (b - a);
  if (m1 <= span.lo || m0 >= span.hi) return;
  const i0 = Math.max(0, Math.round((Math.max(m0, span.lo) - span.startMs) * span.perMs));
  const i1 = Math.min(bb.re.length, Math.round((Math.min(m1, span.hi) - span.startMs) * span.perMs));
  let s = 0;
  for (let i = i0; i < i1; i++) s += bb.re[i]! * bb.re[i]! + bb.im[i]! * bb.im[i]!;
  const n = Math.max(0, i1 - i0);
  if (on) {
    sums.onSum += s;
    sums.onN += n;
  } else {
    sums.offSum += s;
    sums.offN += n;
  }
}

/**
 * SNR from the sums (see addSnrSums) and the envelope filter that made them.
 * @example snrFromSums(sums, 8000, bb).snrDb //=> ≈ the SNR the recording was made with
 */
export function snrFromSums(sums: SnrSums, sampleRate: number, bb: Pick<Baseband, 'passBandHz' | 'taperHz'>): ShapeSnr {
  const perMs = sampleRate / 1000;
  const bandHz = envelopeNoiseBandwidthHz(bb);
  const { onSum, onN, offSum, offN } = sums;
  const result: ShapeSnr = {
    snrDb: null,
    envelopeSnrDb: null,
    envelopeNoiseBandwidthHz: bandHz,
    noisePower: offN > 0 ? offSum / offN : null,
    keyDownMs: onN / perMs,
    keyUpMs: offN / perMs,
  };
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

/**
 * Estimates the SNR from the complex envelope and a set of key-down intervals (e.g. the receiver's,
 * which finds marks far below the SNR at which edges can be measured). Only the middle half of each
 * mark and of each gap is used, so edges and timing errors of a few ms do not count as signal or noise.
 * @param bb - Complex envelope (complexBaseband), one value per sample.
 * @param sampleRate - Sample rate [Hz].
 * @param marks - Key-down intervals [ms from the first sample], in time order.
 * @returns SNR in keyform's convention (carrier over noise in 2500 Hz, as noiseSigmaForSnr) and in the envelope's band.
 * @example estimateShapeSnr(complexBaseband(noisy, 8000, { toneHz: 700 }), 8000, plan.marks).snrDb //=> ≈ the SNR it was made with
 */
export function estimateShapeSnr(bb: Baseband, sampleRate: number, marks: readonly Interval[]): ShapeSnr {
  const recordMs = (bb.re.length * 1000) / sampleRate;
  const sums = addSnrSums({ onSum: 0, onN: 0, offSum: 0, offN: 0 }, bb, sampleRate, marks, { startMs: 0, keepFromMs: 0, keepToMs: recordMs, recordMs });
  return snrFromSums(sums, sampleRate, bb);
}
