/**
 * Quadrature mixer and first decimation stage: multiplies the input by e^(−j·2π·toneHz·n/sampleRate)
 * (a recursive complex oscillator, renormalised once per frame) and sums `samplesPerFrame` products
 * into one complex frame (a boxcar, i.e. first-order CIC, decimator). Per input sample this costs a
 * handful of multiply-adds; everything after it runs at the frame rate.
 */
export class Mixer {
  readonly samplesPerFrame: number;
  private cosStep = 1;
  private sinStep = 0;
  private c = 1;
  private s = 0;
  private accRe = 0;
  private accIm = 0;
  private count = 0;
  private toneHzValue = 0;

  /**
   * @param sampleRate - Input sample rate [Hz].
   * @param toneHz - Mixing frequency [Hz], 0…sampleRate/2.
   * @param samplesPerFrame - Decimation factor (samples summed per frame), ≥ 1.
   */
  constructor(
    readonly sampleRate: number,
    toneHz: number,
    samplesPerFrame: number,
  ) {
    this.samplesPerFrame = Math.max(1, Math.round(samplesPerFrame));
    this.setTone(toneHz);
  }

  /** Current mixing frequency [Hz]. */
  get toneHz(): number {
    return this.toneHzValue;
  }

  /** Retunes the oscillator [Hz] without a phase jump. */
  setTone(toneHz: number): void {
    this.toneHzValue = toneHz;
    const w = (2 * Math.PI * toneHz) / this.sampleRate;
    this.cosStep = Math.cos(w);
    this.sinStep = Math.sin(w);
  }

  /**
   * Mixes a chunk; writes complete frames (sum / samplesPerFrame) to `outRe`/`outIm` from index 0
   * and returns how many were written. The arrays must hold ⌈chunk.length / samplesPerFrame⌉ + 1.
   */
  process(chunk: Float32Array, outRe: Float64Array, outIm: Float64Array): number {
    const n = this.samplesPerFrame;
    const cs = this.cosStep;
    const ss = this.sinStep;
    let c = this.c;
    let s = this.s;
    let re = this.accRe;
    let im = this.accIm;
    let count = this.count;
    let frames = 0;
    for (let i = 0; i < chunk.length; i++) {
      const x = chunk[i]!;
      re += x * c;
      im -= x * s;
      const c2 = c * cs - s * ss;
      s = s * cs + c * ss;
      c = c2;
      if (++count === n) {
        outRe[frames] = re / n;
        outIm[frames] = im / n;
        frames++;
        re = 0;
        im = 0;
        count = 0;
        const g = 1.5 - 0.5 * (c * c + s * s); // keep the oscillator on the unit circle
        c *= g;
        s *= g;
      }
    }
    this.c = c;
    this.s = s;
    this.accRe = re;
    this.accIm = im;
    this.count = count;
    return frames;
  }
}
