import { FRACTIONAL_ZERO } from './fractional.js';

/**
 * Level tracking and slicing at the slot rate: a matched filter (coherent sum over about one unit),
 * a signal level that follows the marks (and decays through fades), a noise level that follows the
 * gaps, and an on/off decision between them with hysteresis.
 */
export interface SlicerOptions {
  /** Matched-filter length [slots], about one unit, ≥ 1. */
  windowSlots: number;
  /** Slot length [ms]. */
  slotMs: number;
  /** Starting carrier power of one slot (|z|² units). */
  signalPow: number;
  /** Starting noise power of one slot (|z|² units). */
  noisePow: number;
  /** Mixer frames summed into one slot (the SNR cap is per frame, so slot lengths compare fairly). */
  framesPerSlot: number;
}

/** Highest SNR of one mixer frame the levels may claim (20 dB), so a noiseless file does not divide by zero. */
const MAX_FRAME_SNR = 100;
/** Slots above this many times the noise level do not update it. */
const NOISE_GATE = 4;
/** Mean of an exponential variable below NOISE_GATE times its mean, over that mean [analytic]. */
const NOISE_GATE_MEAN = 1 - (NOISE_GATE * Math.exp(-NOISE_GATE)) / (1 - Math.exp(-NOISE_GATE));

/**
 * @example const s = new LevelSlicer({ windowSlots: 4, slotMs: 15, signalPow: 2.25, noisePow: 0.25, framesPerSlot: 6 }); s.step(1.5, 0) // true once a mark fills the window
 */
export class LevelSlicer {
  private readonly w: number;
  private readonly ringRe: Float64Array;
  private readonly ringIm: Float64Array;
  private pos = 0;
  private sumRe = FRACTIONAL_ZERO;
  private sumIm = FRACTIONAL_ZERO;
  private steps = 0;
  /** Tracked full-mark envelope power |S|²/w. */
  private peakPow: number;
  /** Tracked noise power of one slot. */
  private noise: number;
  private on = false;
  private offSlots = 0;
  private readonly alphaSignal: number;
  private readonly alphaNoise: number;
  private readonly alphaDecay: number;
  private readonly maxSlotSnr: number;
  private prevAmp = FRACTIONAL_ZERO;
  private prevPrevAmp = FRACTIONAL_ZERO;

  constructor(options: SlicerOptions) {
    this.maxSlotSnr = MAX_FRAME_SNR * Math.max(1, options.framesPerSlot);
    this.w = Math.max(1, Math.round(options.windowSlots));
    this.ringRe = new Float64Array(this.w);
    this.ringIm = new Float64Array(this.w);
    this.noise = Math.max(options.noisePow, options.signalPow / this.maxSlotSnr, 1e-30);
    this.peakPow = this.w * options.signalPow + this.noise;
    this.alphaSignal = 0.35; // per envelope peak, i.e. per mark: follows a fade within a few marks
    this.alphaNoise = Math.min(1, options.slotMs / 1500);
    this.alphaDecay = Math.min(1, options.slotMs / 700);
    this.updatePowers();
  }

  /**
   * Carrier power of one slot during a mark (|z|² units), as of the last step. A field rather than a
   * getter (both powers are worked out once per step, by updatePowers): a number returned by a call
   * the engine does not inline is boxed on the heap, and the decoder reads them at every slot.
   */
  signalPow = FRACTIONAL_ZERO;
  /** Noise power of one slot (|z|² units), never more than 20 dB per frame below the carrier. */
  noisePow = FRACTIONAL_ZERO;

  private updatePowers(): void {
    const signalPow = Math.max(this.peakPow - this.noise, 0) / this.w;
    this.signalPow = signalPow;
    this.noisePow = Math.max(this.noise, signalPow / this.maxSlotSnr, 1e-30);
  }

  /** Matched-filter amplitude at the last step, normalised to one slot's noise scale. */
  envelope = FRACTIONAL_ZERO;
  /** Decision threshold at the last step, on the same scale. */
  threshold = FRACTIONAL_ZERO;

  /**
   * Takes one slot value; returns the key-down decision for the window ending at it (the envelope
   * and threshold behind it are left in `envelope` and `threshold`: no object per slot).
   */
  step(zr: number, zi: number): boolean {
    const z = this.input;
    z[0] = zr;
    z[1] = zi;
    return this.stepFrom(z);
  }

  private readonly input = new Float64Array(2);

  /**
   * As step, with the slot value [re, im] in z[0], z[1]: a caller in a hot loop passes its own
   * array, as numbers passed to a call the engine does not inline are boxed on the heap.
   */
  stepFrom(z: Float64Array): boolean {
    const zr = z[0]!;
    const zi = z[1]!;
    const w = this.w;
    const oldRe = this.ringRe[this.pos]!;
    const oldIm = this.ringIm[this.pos]!;
    this.sumRe += zr - oldRe;
    this.sumIm += zi - oldIm;
    this.ringRe[this.pos] = zr;
    this.ringIm[this.pos] = zi;
    this.pos = (this.pos + 1) % w;
    // (Also at the first step, where the sums are the ring's one value either way: so that this
    // branch has run before the engine compiles the method, rather than first at step 4096.)
    if (++this.steps % 4096 === 0 || this.steps === 1) {
      this.sumRe = 0;
      this.sumIm = 0;
      for (let i = 0; i < w; i++) {
        this.sumRe += this.ringRe[i]!;
        this.sumIm += this.ringIm[i]!;
      }
    }
    const e = (this.sumRe * this.sumRe + this.sumIm * this.sumIm) / w;
    const noise = this.noisePow;
    const lo = Math.sqrt(noise) * 0.886; // mean of a Rayleigh amplitude, √(π/4)·σ [analytic]
    const hi = Math.sqrt(Math.max(this.peakPow, noise));
    const threshold = 0.5 * (lo + hi);
    const hyst = 0.1 * (hi - lo);
    const amp = Math.sqrt(e);
    this.on = this.on ? amp > threshold - hyst : amp > threshold + hyst;
    // Constant-false-alarm test against the noise alone: a Rayleigh amplitude with E[r²] = σ²
    // exceeds 2.63·σ with probability e^(−6.9) ≈ 1e-3 [analytic]. Marks that pass it feed the
    // signal level even when a fade has taken them below the slicing threshold.
    // Only the envelope's peaks (one per mark: the full overlap of a dot, a point of a dash's
    // plateau) measure the level; the slopes of each mark would pull it down.
    const prev = this.prevAmp;
    if (prev > 2.63 * Math.sqrt(noise) && prev >= this.prevPrevAmp && prev > amp) {
      // Strong signals follow fades quickly; weak ones average over more marks (less noise).
      const unitSnrDb = 10 * Math.log10(Math.max(1e-9, (this.peakPow - noise) / noise));
      const alpha = this.alphaSignal * (1 + Math.min(1, Math.max(0, (unitSnrDb - 12) / 10)));
      this.peakPow += alpha * (prev * prev - this.peakPow);
    }
    this.prevPrevAmp = prev;
    this.prevAmp = amp;
    if (this.on) {
      this.offSlots = 0;
    } else {
      this.offSlots++;
      // The slot leaving the window is at least one window away from any mark the slicer saw.
      if (this.offSlots >= 2 * w) {
        // Only slots that look like noise: a mark faded below the slicing threshold is still far
        // above the noise and must not raise it. Noise power |z|² is exponential, so slots below
        // c times its mean have mean (1 − c·e^(−c)/(1 − e^(−c))) times it [analytic]; undo that.
        const p = oldRe * oldRe + oldIm * oldIm;
        if (p < NOISE_GATE * this.noise) this.noise += this.alphaNoise * (p / NOISE_GATE_MEAN - this.noise);
      }
      // Through a fade no mark passes the threshold: let the signal level sink toward the noise.
      if (this.offSlots > 8 * w) this.peakPow -= this.alphaDecay * (this.peakPow - noise);
    }
    this.envelope = amp;
    this.threshold = threshold;
    this.updatePowers();
    return this.on;
  }
}
