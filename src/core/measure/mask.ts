/**
 * Spectral masks: a limit line of (offset from the carrier, maximum level) points, checked against a
 * measured spectrum in dBc. keyform measures; it does not certify — defer to local regulations.
 */
import { InputError } from '../errors.js';

export interface MaskPoint {
  /** Distance from the carrier [Hz], applied on both sides. */
  offsetHz: number;
  /** Highest allowed level at that distance [dBc, relative to the spectrum's peak at the report's RBW]. */
  maxDbc: number;
}

export interface SpectralMask {
  name: string;
  /** Points in increasing offset; the limit is interpolated linearly (in dB) between points and held after the last. */
  points: MaskPoint[];
}

/**
 * keyform's default mask. Common practice, not a regulation: clicks must fall off about as fast as
 * those of raised-cosine edges of 3 ms (10–90 %) at 20–40 wpm, measured with a resolution bandwidth
 * near 10 Hz; the usual ~5 ms recommendation passes with a wide margin and hard keying fails.
 * (Chosen from keyform's own sweeps: raised cosine needs 3 ms, linear 3–5 ms, single-pole RC 5–7 ms at 20–30 wpm.)
 */
export const DEFAULT_MASK: SpectralMask = {
  name: 'keyform default (common practice, about 10 Hz RBW)',
  points: [
    { offsetHz: 200, maxDbc: -35 },
    { offsetHz: 300, maxDbc: -50 },
    { offsetHz: 500, maxDbc: -60 },
    { offsetHz: 1000, maxDbc: -70 },
  ],
};

/**
 * Checks a mask's points: offsets above 0 Hz and increasing, levels from −200 to 0 dBc; throws InputError naming the point.
 * @example validateMask(DEFAULT_MASK).points.length //=> 4
 */
export function validateMask(mask: SpectralMask): SpectralMask {
  if (mask.points.length === 0) throw new InputError(`mask '${mask.name}' has no points`);
  mask.points.forEach((p, i) => {
    if (!(Number.isFinite(p.offsetHz) && p.offsetHz > 0)) throw new InputError(`mask point ${i + 1}: offset must be above 0 Hz (got ${p.offsetHz})`);
    if (!(Number.isFinite(p.maxDbc) && p.maxDbc <= 0 && p.maxDbc >= -200)) throw new InputError(`mask point ${i + 1}: level must be from -200 to 0 dBc (got ${p.maxDbc})`);
    if (i > 0 && p.offsetHz <= mask.points[i - 1]!.offsetHz) {
      throw new InputError(`mask point ${i + 1}: offsets must increase (got ${p.offsetHz} Hz after ${mask.points[i - 1]!.offsetHz} Hz)`);
    }
  });
  return mask;
}

/**
 * Parses a mask from CSV text: one `offsetHz,maxDbc` pair per line; blank lines, `#` comments and a
 * header line of words are skipped.
 * @example parseMaskCsv('offset_hz,max_dbc\n200,-30\n600,-50\n', 'mine').points[1] //=> { offsetHz: 600, maxDbc: -50 }
 */
export function parseMaskCsv(text: string, name: string): SpectralMask {
  const points: MaskPoint[] = [];
  text.split(/\r?\n/).forEach((raw, i) => {
    const line = raw.replace(/#.*/, '').trim();
    if (line === '') return;
    const cells = line.split(/[,;\t]/).map((c) => c.trim());
    if (points.length === 0 && cells.every((c) => c === '' || Number.isNaN(Number(c)))) return; // header
    if (cells.length < 2) throw new InputError(`${name}: line ${i + 1}: expected 'offsetHz,maxDbc' (got '${raw.trim()}')`);
    const offsetHz = Number(cells[0]);
    const maxDbc = Number(cells[1]);
    if (cells[0] === '' || cells[1] === '' || !Number.isFinite(offsetHz) || !Number.isFinite(maxDbc)) {
      throw new InputError(`${name}: line ${i + 1}: not two numbers (got '${raw.trim()}')`);
    }
    points.push({ offsetHz: Math.abs(offsetHz), maxDbc });
  });
  return validateMask({ name, points });
}

/**
 * The mask's limit at a distance from the carrier, or null inside its first point (no limit there).
 * @example maskLimitDbc(DEFAULT_MASK, 400) //=> -55
 */
export function maskLimitDbc(mask: SpectralMask, offsetHz: number): number | null {
  const d = Math.abs(offsetHz);
  const pts = mask.points;
  if (d < pts[0]!.offsetHz) return null;
  for (let i = 0; i + 1 < pts.length; i++) {
    const a = pts[i]!;
    const b = pts[i + 1]!;
    if (d <= b.offsetHz) return a.maxDbc + ((b.maxDbc - a.maxDbc) * (d - a.offsetHz)) / (b.offsetHz - a.offsetHz);
  }
  return pts[pts.length - 1]!.maxDbc;
}

export interface MaskViolation {
  /** The mask point starting the stretch that was exceeded [Hz]. */
  pointOffsetHz: number;
  /** Where the worst excess in that stretch was, signed (negative: below the carrier) [Hz]. */
  offsetHz: number;
  /** The limit there and the measured level [dBc]. */
  limitDbc: number;
  measuredDbc: number;
  /** How far above the limit [dB]. */
  excessDb: number;
}

export interface MaskVerdict {
  name: string;
  pass: boolean;
  violations: MaskViolation[];
  /** Worst excess over the limit anywhere [dB] (negative: margin to the limit). */
  worstExcessDb: number | null;
  /** Mask points farther out than the analysed spectrum reaches on both sides (not checked). */
  uncheckedPointsHz: number[];
  /** Mask points whose stretch lies (partly) below the recording's noise floor, where the transmitter could not be checked. */
  noiseLimitedPointsHz: number[];
  /** Spectrum bins inside the mask that were judged: compared with the limit, or under the noise floor with the limit above it (clean). 0: no verdict possible. */
  judgedBins: number;
}

/**
 * Checks a spectrum (offsets from the carrier and levels in dBc) against a mask: each stretch from one
 * mask point to the next (and beyond the last) reports its worst excess if it has one. With
 * `noiseDbc` (the recording's noise floor per bin), bins within 3 dB of the floor are not judged.
 * @example checkMask(offsets, dbc, DEFAULT_MASK).pass //=> true for 5 ms raised-cosine edges at 20 wpm
 */
export function checkMask(offsetHz: ArrayLike<number>, dbc: ArrayLike<number>, mask: SpectralMask, noiseDbc?: ArrayLike<number>): MaskVerdict {
  const pts = mask.points;
  const noiseLimited = new Set<number>();
  const worst: Array<MaskViolation | null> = pts.map(() => null);
  let worstExcess: number | null = null;
  let reach = 0;
  let judged = 0;
  for (let k = 0; k < dbc.length; k++) {
    const f = offsetHz[k]!;
    const d = Math.abs(f);
    reach = Math.max(reach, d);
    const limit = maskLimitDbc(mask, f);
    if (limit === null) continue;
    let i = 0;
    while (i + 1 < pts.length && d >= pts[i + 1]!.offsetHz) i++;
    // Within 3 dB of the noise floor the level is the recording's, not the transmitter's.
    if (noiseDbc && dbc[k]! < noiseDbc[k]! + 3) {
      if (limit < noiseDbc[k]! + 3) noiseLimited.add(pts[i]!.offsetHz);
      else judged++; // under the floor, and the floor is under the limit: clean
      continue;
    }
    judged++;
    const excess = dbc[k]! - limit;
    if (worstExcess === null || excess > worstExcess) worstExcess = excess;
    if (excess > 0 && (worst[i] === null || excess > worst[i]!.excessDb)) {
      worst[i] = { pointOffsetHz: pts[i]!.offsetHz, offsetHz: f, limitDbc: limit, measuredDbc: dbc[k]!, excessDb: excess };
    }
  }
  const violations = worst.filter((v): v is MaskViolation => v !== null);
  return {
    name: mask.name,
    pass: violations.length === 0,
    violations,
    worstExcessDb: worstExcess,
    uncheckedPointsHz: pts.filter((p) => p.offsetHz > reach).map((p) => p.offsetHz),
    noiseLimitedPointsHz: [...noiseLimited].sort((a, b) => a - b),
    judgedBins: judged,
  };
}
