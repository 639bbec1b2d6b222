import { FRACTIONAL_ZERO } from './fractional.js';

/**
 * SNR estimate from decided marks and gaps, robust to the few slots that straddle a keying edge.
 *
 * A slot that a gap shares with the tail of a mark carries carrier power; at high SNR a handful of
 * such slots outweigh all the noise in the gaps and cap the estimate (a clean file read 22–34 dB
 * whatever its true SNR). The noise power is therefore taken from the median of the gap slots'
 * powers rather than their mean: for complex Gaussian noise |z|² is exponentially distributed, so
 * median = ln 2 · mean [analytic], and a minority of contaminated slots barely moves the median.
 * The carrier power is the mean of the mark slots' powers less that noise (E|A + n|² = |A|² + σ²).
 * State is bounded: a fixed log-power histogram for the gaps and running sums for the marks.
 */

/** Histogram range of log10(power) and bins per decade (0.05 dB bins). */
const LOG_MIN = -30;
const LOG_MAX = 10;
const BINS_PER_DECADE = 200;
const BINS = (LOG_MAX - LOG_MIN) * BINS_PER_DECADE;

/**
 * Median of a sample from a fixed log-spaced histogram (bounded memory, any number of values).
 * Values at or below 10^−30 count in an underflow bin (read back as 0).
 * @example const h = new LogHistogram(); [1, 2, 3].forEach((v) => h.add(v)); h.quantile(0.5) //=> ≈ 2
 */
export class LogHistogram {
  private readonly counts = new Float64Array(BINS + 2);
  private total = 0;

  /** Adds one value (≥ 0, any scale between 10^−30 and 10^10). */
  add(value: number): void {
    let bin: number;
    if (!(value > 10 ** LOG_MIN)) bin = 0;
    else bin = 1 + Math.min(BINS, Math.max(0, Math.floor((Math.log10(value) - LOG_MIN) * BINS_PER_DECADE)));
    this.counts[bin]! += 1;
    this.total++;
  }

  /** Number of values added. */
  get count(): number {
    return this.total;
  }

  /**
   * The q-quantile, interpolated inside its bin on the log scale.
   * @param q - 0…1. @returns The value (0 when it falls in the underflow bin; NaN when empty).
   */
  quantile(q: number): number {
    if (this.total === 0) return NaN;
    const target = q * this.total;
    let acc = 0;
    for (let b = 0; b < this.counts.length; b++) {
      const c = this.counts[b]!;
      if (acc + c >= target && c > 0) {
        if (b === 0) return 0;
        const frac = (target - acc) / c;
        return 10 ** (LOG_MIN + (b - 1 + frac) / BINS_PER_DECADE);
      }
      acc += c;
    }
    return 10 ** LOG_MAX;
  }
}

/**
 * Collects slot powers of decided marks and gaps and turns them into keyform's SNR.
 * @example const e = new SnrEstimator(); e.addMark(1.01); e.addGap(0.01); e.ratio() // carrier/noise per slot
 */
export class SnrEstimator {
  private readonly gaps = new LogHistogram();
  private markSum = FRACTIONAL_ZERO;
  private markCount = 0;

  /** Power |z|² of a slot inside a decided mark. */
  addMark(power: number): void {
    this.markSum += power;
    this.markCount++;
  }

  /** Power |z|² of a slot inside a decided gap. */
  addGap(power: number): void {
    this.gaps.add(power);
  }

  /** Noise power of one slot: median of the gap slots / ln 2; NaN without gaps. */
  noisePow(): number {
    return this.gaps.quantile(0.5) / Math.LN2;
  }

  /**
   * Carrier power over noise power of one slot, or null when there are no marks or gaps, the
   * noise is zero (a noiseless file) or the marks are not above it.
   */
  ratio(): number | null {
    if (this.markCount === 0 || this.gaps.count === 0) return null;
    const noise = this.noisePow();
    const carrier = this.markSum / this.markCount - noise;
    if (!(noise > 0) || !(carrier > 0)) return null;
    return carrier / noise;
  }
}
