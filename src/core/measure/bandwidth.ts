/**
 * Bandwidth figures of a keyed signal: occupied bandwidth (ITU-R SM.328 / Radio Regulations No. 1.153),
 * x-dB bandwidths, necessary bandwidth for on-off keyed telegraphy (ITU-R SM.1138) and the emission
 * designator that goes with it.
 */
import { checkRange, InputError } from '../errors.js';

/** A spectrum around the tone: bin offsets from the tone [Hz] and the power in each bin. */
export interface ToneSpectrum {
  offsetHz: Float64Array;
  power: Float64Array;
  /** Bin spacing [Hz]. */
  binHz: number;
}

export interface BandEdges {
  /** Lower and upper edge as offsets from the tone [Hz]. */
  lowerHz: number;
  upperHz: number;
  /** upperHz − lowerHz [Hz]. */
  widthHz: number;
}

/**
 * Occupied bandwidth per ITU-R SM.328 and RR No. 1.153: the band outside which the mean power on
 * each side is β/2 of the total (β = 1 %: 0.5 % each side). Each bin's power is taken as spread
 * evenly over the bin, so the edges are interpolated inside bins.
 * @param beta - Share of the power left outside the band, 0.0001…0.5; default 0.01.
 * @returns Band edges [Hz from the tone], or null when the spectrum holds no power.
 * @example occupiedBandwidth(flatSpectrumFromMinus100To100Hz).widthHz //=> ≈ 198 (99 % of 200 Hz)
 */
export function occupiedBandwidth(s: ToneSpectrum, beta = 0.01): BandEdges | null {
  checkRange('beta', beta, 1e-4, 0.5);
  const { offsetHz, power, binHz } = s;
  let total = 0;
  for (const p of power) total += p;
  if (!(total > 0)) return null;
  const target = (beta / 2) * total;
  const edgeFrom = (forward: boolean): number => {
    let acc = 0;
    const n = power.length;
    for (let j = 0; j < n; j++) {
      const k = forward ? j : n - 1 - j;
      const p = power[k]!;
      if (acc + p >= target) {
        const f = p > 0 ? (target - acc) / p : 0;
        // Bin k covers offset ± binHz/2.
        return forward ? offsetHz[k]! - binHz / 2 + f * binHz : offsetHz[k]! + binHz / 2 - f * binHz;
      }
      acc += p;
    }
    return forward ? offsetHz[n - 1]! : offsetHz[0]!;
  };
  const lowerHz = edgeFrom(true);
  const upperHz = edgeFrom(false);
  return { lowerHz, upperHz, widthHz: upperHz - lowerHz };
}

export interface XdbBandwidth {
  /** Outermost offsets where the spectrum is still above −x dBc [Hz]; null when not found inside the span. */
  lowerHz: number | null;
  upperHz: number | null;
  /** Width [Hz]; when only one side lies inside the span, twice that side (symmetric spectrum assumed). */
  widthHz: number | null;
  /** Which sides the width rests on. */
  basis: 'both sides' | 'upper side only' | 'lower side only' | 'beyond the span' | 'below the noise floor';
}

/**
 * x-dB bandwidth (ITU-R SM.328 wording, from memory: the band beyond whose limits every spectral
 * component is at least x dB below the 0 dB reference). Edges are interpolated in dB between bins.
 * A side is "not found" when the spectrum is still above −x dBc at the span's end on that side.
 * @param dbc - Spectrum in dB relative to the reference, one value per offset.
 * @param xDb - Level below the reference [dB], 1…150.
 * @example xDbBandwidth(offsets, dbc, 40).widthHz //=> 224 for 5 ms raised-cosine edges at 20 wpm (predictShape, 8.8 Hz RBW)
 */
export function xDbBandwidth(offsetHz: ArrayLike<number>, dbc: ArrayLike<number>, xDb: number): XdbBandwidth {
  checkRange('x', xDb, 1, 150, 'dB');
  const n = dbc.length;
  const level = -xDb;
  let lo = -1;
  let hi = -1;
  for (let k = 0; k < n; k++) {
    if (dbc[k]! > level) {
      if (lo < 0) lo = k;
      hi = k;
    }
  }
  if (lo < 0) return { lowerHz: null, upperHz: null, widthHz: null, basis: 'beyond the span' };
  const interp = (inside: number, outside: number): number => {
    const a = dbc[inside]!;
    const b = dbc[outside]!;
    const f = a === b ? 0 : (a - level) / (a - b);
    return offsetHz[inside]! + f * (offsetHz[outside]! - offsetHz[inside]!);
  };
  const lowerHz = lo > 0 && offsetHz[lo]! < 0 ? interp(lo, lo - 1) : null;
  const upperHz = hi < n - 1 && offsetHz[hi]! > 0 ? interp(hi, hi + 1) : null;
  if (lowerHz !== null && upperHz !== null) return { lowerHz, upperHz, widthHz: upperHz - lowerHz, basis: 'both sides' };
  if (upperHz !== null) return { lowerHz, upperHz, widthHz: 2 * upperHz, basis: 'upper side only' };
  if (lowerHz !== null) return { lowerHz, upperHz, widthHz: -2 * lowerHz, basis: 'lower side only' };
  return { lowerHz, upperHz, widthHz: null, basis: 'beyond the span' };
}

/** K factors of ITU-R SM.1138 for telegraphy by on-off keying (A1A). */
export const SM1138_K = { fading: 5, nonFading: 3 } as const;

/**
 * Necessary bandwidth of on-off keyed telegraphy (class A1A) per ITU-R SM.1138: Bn = B·K.
 * @param modulationRateBaud - B, the modulation rate [baud] = 1 / unit length [s], 0.01…10000.
 * @param k - 5 for a fading circuit (default), 3 for a non-fading one; 1…10.
 * @returns Bn [Hz].
 * @example necessaryBandwidthHz(20, 5) //=> 100 (SM.1138's worked example)
 */
export function necessaryBandwidthHz(modulationRateBaud: number, k: number = SM1138_K.fading): number {
  checkRange('modulation rate', modulationRateBaud, 0.01, 10_000, 'baud');
  checkRange('K', k, 1, 10);
  return modulationRateBaud * k;
}

/**
 * The bandwidth part of an emission designator (ITU Radio Regulations Appendix 1): three
 * significant figures, with H, K, M or G in place of the decimal point (400H, 2K40, 25H3, H100).
 * @param bandwidthHz - 0.001 Hz … 999 GHz.
 * @example bandwidthCode(100) //=> '100H'
 * @example bandwidthCode(2400) //=> '2K40'
 */
export function bandwidthCode(bandwidthHz: number): string {
  if (!(bandwidthHz >= 0.001 && bandwidthHz < 999.5e9)) {
    throw new InputError(`bandwidth must be from 0.001 Hz to 999 GHz for a designator (got ${bandwidthHz} Hz)`);
  }
  const units: Array<[string, number]> = [['H', 1], ['K', 1e3], ['M', 1e6], ['G', 1e9]];
  // Round to three significant figures first, then pick the unit (999.6 Hz becomes 1K00).
  const mag = Math.floor(Math.log10(bandwidthHz));
  const rounded = Number((Math.round(bandwidthHz / 10 ** (mag - 2)) * 10 ** (mag - 2)).toPrecision(3));
  let u = 0;
  while (u < units.length - 1 && rounded >= 1000 * units[u]![1]) u++;
  const [letter, scale] = units[u]!;
  const x = rounded / scale;
  if (x < 1) {
    const digits = Math.round(x * 1000).toString().padStart(3, '0');
    return `${letter}${digits}`;
  }
  const intDigits = Math.floor(x).toString();
  const frac = (x - Math.floor(x)).toFixed(3 - intDigits.length).slice(2);
  return `${intDigits}${letter}${frac}`;
}

/**
 * Emission designator for aural Morse telegraphy by on-off keying without a modulating tone:
 * bandwidth code + A1A (double sideband, one channel of digital information without a subcarrier,
 * telegraphy for aural reception) + A (two-condition code) + N (no multiplexing).
 * @example emissionDesignator(100) //=> '100HA1AAN' (ITU-R SM.1138's example)
 */
export function emissionDesignator(necessaryBandwidth: number): string {
  return `${bandwidthCode(necessaryBandwidth)}A1AAN`;
}

/**
 * dB of a power ratio, with a floor [dB] so that zero power gives a finite number.
 * @example powerDb(0.01) //=> -20
 */
export function powerDb(ratio: number, floorDb = -200): number {
  return ratio > 0 ? Math.max(floorDb, 10 * Math.log10(ratio)) : floorDb;
}
