/**
 * Tone tracking for the receiver: a fit of the tone's drift over the pre-roll, and a Kalman filter
 * that follows the tone and its drift rate from the phase steps of key-down slots afterwards.
 */
import { fftOfSize } from '../signal/fft.js';
import { Mixer } from './mixer.js';
import { FRACTIONAL_ZERO } from './fractional.js';

/** A straight-line tone track: toneHz(t) = startHz + rateHzPerS · t. */
export interface ToneLine {
  /** Tone at t = 0 (the first sample given) [Hz]. */
  startHz: number;
  /** Drift rate [Hz/s]. */
  rateHzPerS: number;
  /** Segments whose peak went into the fit (0: no fit, the rate is 0). */
  segments: number;
}

/** Pre-roll segment length for the drift fit [s], search half-width around the tone [Hz], and prominence a segment's peak needs [dB]. */
const SEGMENT_S = 1;
const SEARCH_HZ = 60;
const SEGMENT_PROMINENCE_DB = 12;

/**
 * Fits a straight line to the tone over a stretch of complex baseband frames (mixed at `toneHz`):
 * the strongest spectral peak within ±60 Hz in each second (Welch average of three Hann windows
 * of half a second, fft.js, parabolic interpolation of the log power), weighted by its prominence over the
 * band's median, least squares. Segments where the peak does not stand 12 dB clear (no keying, or
 * a weak signal) are left out; with fewer than three, the line is flat at `toneHz`.
 * @param frameRe - Real parts of the frames. @param frameIm - Imaginary parts.
 * @param count - Frames to use. @param frameRateHz - Frames per second (> 2·60 Hz).
 * @param toneHz - Tone the frames were mixed with [Hz].
 * @returns Tone at the first frame [Hz] and drift rate [Hz/s].
 * @example fitToneLineFrames(re, im, 2400, 400, 706).rateHzPerS //=> ≈ 2 for a tone rising 2 Hz/s
 */
export function fitToneLineFrames(frameRe: Float64Array, frameIm: Float64Array, count: number, frameRateHz: number, toneHz: number): ToneLine {
  const seg = Math.round(SEGMENT_S * frameRateHz);
  // Welch average inside each segment: three half-overlapping windows of half a segment (bins of
  // about 2 Hz, as in findTone), so a noise bin rarely stands out as a carrier would.
  const win = Math.max(8, seg >> 1);
  const hop = win >> 1;
  let size = 1;
  while (size < win) size *= 2;
  const fft = fftOfSize(size);
  const input = fft.createComplexArray();
  const out = fft.createComplexArray();
  const power = new Float64Array(size);
  const binHz = frameRateHz / size;
  const kMax = Math.min(size / 2 - 2, Math.floor(SEARCH_HZ / binHz));
  const band: number[] = [];
  const t: number[] = [];
  const f: number[] = [];
  const w: number[] = [];
  for (let a = 0; a + seg <= count; a += seg) {
    power.fill(0);
    for (let b = a; b + win <= a + seg; b += hop) {
      input.fill(0);
      for (let i = 0; i < win; i++) {
        const h = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / win);
        input[2 * i] = frameRe[b + i]! * h;
        input[2 * i + 1] = frameIm[b + i]! * h;
      }
      fft.transform(out, input);
      for (let k = 0; k < size; k++) power[k] = power[k]! + out[2 * k]! ** 2 + out[2 * k + 1]! ** 2;
    }
    const at = (k: number): number => power[(k + size) % size]!; // bin k of a signed frequency
    let kPeak = 0;
    band.length = 0;
    for (let k = -kMax; k <= kMax; k++) {
      band.push(at(k));
      if (at(k) > at(kPeak)) kPeak = k;
    }
    band.sort((x, y) => x - y);
    const median = band[band.length >> 1]!;
    const peak = at(kPeak);
    if (!(peak > 0)) continue;
    const prominenceDb = median > 0 ? 10 * Math.log10(peak / median) : 300;
    if (prominenceDb < SEGMENT_PROMINENCE_DB) continue;
    const l = Math.log(at(kPeak - 1) + 1e-300);
    const c = Math.log(peak);
    const r = Math.log(at(kPeak + 1) + 1e-300);
    const den = l - 2 * c + r;
    const delta = den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (l - r)) / den)) : 0;
    t.push((a + seg / 2) / frameRateHz);
    f.push(toneHz + (kPeak + delta) * binHz);
    w.push(Math.min(prominenceDb, 60));
  }
  if (t.length < 3) return { startHz: toneHz, rateHzPerS: 0, segments: 0 };
  let sw = 0, st = 0, sf = 0;
  for (let i = 0; i < t.length; i++) { sw += w[i]!; st += w[i]! * t[i]!; sf += w[i]! * f[i]!; }
  const tm = st / sw;
  const fm = sf / sw;
  let stt = 0, stf = 0;
  for (let i = 0; i < t.length; i++) { stt += w[i]! * (t[i]! - tm) ** 2; stf += w[i]! * (t[i]! - tm) * (f[i]! - fm); }
  const rate = stt > 0 ? stf / stt : 0;
  return { startHz: fm - rate * tm, rateHzPerS: rate, segments: t.length };
}

/**
 * The same fit from audio samples: mixes them to baseband at `toneHz` (frames of about 2.5 ms)
 * and calls fitToneLineFrames.
 * @param samples - Audio (e.g. the receiver's pre-roll, a few seconds). @param sampleRate - [Hz].
 * @param toneHz - Tone found over the whole stretch [Hz].
 * @example fitToneLine(toneRisingBy2HzPerS, 8000, 706).rateHzPerS //=> ≈ 2
 */
export function fitToneLine(samples: Float32Array, sampleRate: number, toneHz: number): ToneLine {
  const spf = Math.max(1, Math.round(sampleRate / 400));
  const mixer = new Mixer(sampleRate, toneHz, spf);
  const re = new Float64Array(Math.ceil(samples.length / spf) + 1);
  const im = new Float64Array(re.length);
  const n = mixer.process(samples, re, im);
  return fitToneLineFrames(re, im, n, sampleRate / spf, toneHz);
}

export interface ToneTrackerOptions {
  /** Starting tone [Hz] and drift rate [Hz/s]. */
  toneHz: number;
  rateHzPerS: number;
  /** Time between updates (one slot) [s], > 0. */
  stepS: number;
  /** Starting uncertainty of the tone [Hz] and of the rate [Hz/s] (one standard deviation). */
  toneSigmaHz: number;
  rateSigmaHzPerS: number;
}

/** How fast the drift rate may wander: spectral density of its random walk [(Hz/s)²/s]. */
const RATE_WANDER = 0.05;
/** How fast the tone may wander beside its drift [Hz²/s]. */
const TONE_WANDER = 0.02;
/** Innovations are clipped to this many standard deviations (a noise slot taken for a mark). */
const CLIP_SIGMA = 3;

/**
 * Kalman filter over tone [Hz] and drift rate [Hz/s] (a constant-velocity model with a random walk
 * on the rate). Each pair of consecutive key-down slots gives one measurement: the phase step
 * between them over the slot time is the tone's offset from the mixer, with a variance from the
 * slots' own SNR (phase noise ≈ σ²/(2|z|²) per slot at high SNR [analytic]), so strong signals
 * follow fast drift and weak ones average long.
 * @example const k = new ToneTracker({ toneHz: 700, rateHzPerS: 0, stepS: 0.015, toneSigmaHz: 3, rateSigmaHzPerS: 1 }); k.step(); k.toneHz //=> 700
 */
export class ToneTracker {
  private f: number;
  private r: number;
  private pff: number;
  private pfr = FRACTIONAL_ZERO;
  private prr: number;
  private readonly dt: number;

  constructor(options: ToneTrackerOptions) {
    this.f = options.toneHz;
    this.r = options.rateHzPerS;
    this.dt = options.stepS;
    this.pff = options.toneSigmaHz ** 2;
    this.prr = options.rateSigmaHzPerS ** 2;
  }

  /** Tracked tone [Hz]. */
  get toneHz(): number {
    return this.f;
  }

  /** Tracked drift rate [Hz/s]. */
  get rateHzPerS(): number {
    return this.r;
  }

  /** Moves the state on by one slot (prediction). */
  step(): void {
    const dt = this.dt;
    this.f += this.r * dt;
    const pff = this.pff + 2 * dt * this.pfr + dt * dt * this.prr + TONE_WANDER * dt + (RATE_WANDER * dt ** 3) / 3;
    const pfr = this.pfr + dt * this.prr + (RATE_WANDER * dt * dt) / 2;
    this.pff = pff;
    this.pfr = pfr;
    this.prr += RATE_WANDER * dt;
  }

  /**
   * Takes one measurement: the phase step between two consecutive key-down slots.
   * @param mixerHz - Tone the slots were mixed with [Hz].
   * @param stepRad - Phase step of the later slot over the earlier, −π…π [rad].
   * @param varianceRad2 - Its variance [rad²].
   */
  measure(mixerHz: number, stepRad: number, varianceRad2: number): void {
    const m = this.input;
    m[0] = mixerHz;
    m[1] = stepRad;
    m[2] = varianceRad2;
    this.measureFrom(m);
  }

  private readonly input = new Float64Array(3);

  /**
   * As measure, with [mixerHz, stepRad, varianceRad2] in m[0…2]: a caller in a hot loop passes its
   * own array, as numbers passed to a call the engine does not inline are boxed on the heap.
   */
  measureFrom(m: Float64Array): void {
    const mixerHz = m[0]!;
    const stepRad = m[1]!;
    const varianceRad2 = m[2]!;
    const k2pi = 2 * Math.PI * this.dt;
    const y = mixerHz + stepRad / k2pi;
    const R = Math.min(varianceRad2, (Math.PI * Math.PI) / 3) / (k2pi * k2pi);
    const S = this.pff + R;
    const limit = CLIP_SIGMA * Math.sqrt(S);
    const nu = Math.max(-limit, Math.min(limit, y - this.f));
    const kf = this.pff / S;
    const kr = this.pfr / S;
    this.f += kf * nu;
    this.r += kr * nu;
    const pff = (1 - kf) * this.pff;
    const pfr = (1 - kf) * this.pfr;
    const prr = this.prr - kr * this.pfr;
    this.pff = pff;
    this.pfr = pfr;
    this.prr = prr;
  }

  private loHz = -Infinity;
  private hiHz = Infinity;
  private maxRateHzPerS = Infinity;

  /** Sets the range that clamp keeps the tone [Hz] and its rate [Hz/s] within (none at first). */
  setLimits(loHz: number, hiHz: number, maxRateHzPerS: number): void {
    this.loHz = loHz;
    this.hiHz = hiHz;
    this.maxRateHzPerS = maxRateHzPerS;
  }

  /**
   * Keeps the tone within the limits' [lo, hi] and the rate within ±their maximum. The limits are
   * set once (setLimits) rather than passed at each slot: numbers passed to a call the engine does
   * not inline are boxed on the heap.
   */
  clamp(): void {
    this.f = Math.min(this.hiHz, Math.max(this.loHz, this.f));
    this.r = Math.min(this.maxRateHzPerS, Math.max(-this.maxRateHzPerS, this.r));
  }
}
