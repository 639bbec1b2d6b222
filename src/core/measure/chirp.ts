/**
 * Chirp: how far the tone is pulled from its settled frequency during the first milliseconds of each
 * mark, from the instantaneous phase of the analytic signal (complex baseband).
 */
import { checkRange } from '../errors.js';
import type { Baseband } from './shape-analytic.js';
import type { MarkShape } from './edges.js';

/**
 * Mean frequency [Hz, relative to the baseband's 0 Hz] over samples [i0, i1): the angle of
 * Σ z[n]·conj(z[n−1]), which weights each phase step by the signal's power.
 */
export function meanFrequencyHz(bb: Baseband, sampleRate: number, i0: number, i1: number): number | null {
  const { re, im } = bb;
  let sr = 0;
  let si = 0;
  const a = Math.max(1, Math.floor(i0));
  const b = Math.min(re.length, Math.ceil(i1));
  for (let n = a; n < b; n++) {
    // z[n] · conj(z[n−1])
    sr += re[n]! * re[n - 1]! + im[n]! * im[n - 1]!;
    si += im[n]! * re[n - 1]! - re[n]! * im[n - 1]!;
  }
  if (sr === 0 && si === 0) return null;
  return (Math.atan2(si, sr) * sampleRate) / (2 * Math.PI);
}

export interface ChirpOptions {
  /** How long after the 50 % key-down point to look [ms], 0.5…200; default 10. */
  windowMs?: number;
  /** Length of each frequency average [ms], 0.1…10; default 1. */
  averageMs?: number;
  /**
   * The envelope's own 10–90 % response to a hard step [ms]. An edge not much slower than that has
   * sidebands reaching past the analysis band (and the tone's mirror image), which shows as a false
   * phase swing; for such marks the search starts once the edge has settled (90 % point + 2× this).
   */
  resolutionMs?: number;
}

export interface MarkChirp {
  /** 50 % key-down time [ms]. */
  startMs: number;
  /** Settled tone of this mark, relative to the analysis tone [Hz]. */
  settledOffsetHz: number;
  /** Deviation from the settled tone at `atMs` [Hz], with its sign. */
  chirpHz: number;
  /** When, after the 50 % key-down point [ms]: where the average over all marks deviates most. */
  atMs: number;
}

/**
 * Measures each mark's chirp. The settled tone is the power-weighted mean frequency over the mark's
 * later part; the deviation from it is tracked in `averageMs` averages every averageMs/2 from the 50 %
 * key-down point (later for near-hard edges, see `resolutionMs`) to `windowMs` after it. The instant
 * is chosen where the track averaged over all marks deviates most, and each mark reports its own
 * deviation there — so noise does not inflate the figure the way a per-mark maximum would.
 * @param bb - Complex baseband of the recording (see complexBaseband).
 * @param sampleRate - Sample rate [Hz].
 * @param marks - Marks from measureEdges; only marks with a measured rise and fall are used.
 * @returns One entry per usable mark.
 * @example measureChirp(bb, 48000, edges.marks)[0].chirpHz //=> ≈ 30 for a 30 Hz pull at key-down
 */
export function measureChirp(bb: Baseband, sampleRate: number, marks: readonly MarkShape[], options: ChirpOptions = {}): MarkChirp[] {
  return chirpFromTracks(chirpTracks(bb, sampleRate, marks, options), options);
}

/** One mark's frequency track after key-down: deviation from its settled tone every averageMs/2 [Hz], null where not looked at. */
export interface ChirpTrack {
  startMs: number;
  settled: number;
  d: Array<number | null>;
}

/**
 * The per-mark tracks measureChirp chooses its instant from; tracks of several stretches of a long
 * recording can be joined (with `offsetMs` putting their times on the recording's clock) and passed
 * to chirpFromTracks together.
 * @example chirpTracks(bb, 48000, edges.marks).length //=> the number of marks with a measured rise and fall
 */
export function chirpTracks(bb: Baseband, sampleRate: number, marks: readonly MarkShape[], options: ChirpOptions = {}, offsetMs = 0): ChirpTrack[] {
  const windowMs = checkRange('chirp window', options.windowMs ?? 10, 0.5, 200, 'ms');
  const averageMs = checkRange('chirp average', options.averageMs ?? 1, 0.1, 10, 'ms');
  const perMs = sampleRate / 1000;
  const stepMs = averageMs / 2;
  const steps = Math.floor(windowMs / stepMs) + 1;
  const tracks: ChirpTrack[] = [];
  for (const m of marks) {
    if (!m.rise || !m.fall) continue;
    const a = m.rise.at50Ms;
    const b = m.fall.at50Ms;
    const D = b - a;
    const settled = meanFrequencyHz(bb, sampleRate, (a + 0.5 * D) * perMs, (b - 0.2 * D) * perMs);
    if (settled === null) continue;
    const res = options.resolutionMs ?? 0;
    const hardish = res > 0 && m.rise.rise10to90Ms < 3 * res;
    const fromMs = hardish ? m.rise.levelTimesMs.p90 - m.rise.levelTimesMs.p50 + 2 * res : 0;
    const toMs = Math.min(windowMs, 0.5 * D);
    const d: Array<number | null> = [];
    for (let j = 0; j < steps; j++) {
      const t = j * stepMs;
      if (t < fromMs - 1e-9 || t > toMs + 1e-9) {
        d.push(null);
        continue;
      }
      const c = (a + t) * perMs;
      const f = meanFrequencyHz(bb, sampleRate, c - (averageMs / 2) * perMs, c + (averageMs / 2) * perMs);
      d.push(f === null ? null : f - settled);
    }
    tracks.push({ startMs: a + offsetMs, settled, d });
  }
  return tracks;
}

/**
 * Chooses the instant where the mean track deviates most and reports each mark's deviation there.
 * @example chirpFromTracks(chirpTracks(bb, 48000, marks))[0].chirpHz //=> ≈ 30 for a 30 Hz pull at key-down
 */
export function chirpFromTracks(tracks: readonly ChirpTrack[], options: Pick<ChirpOptions, 'windowMs' | 'averageMs'> = {}): MarkChirp[] {
  const windowMs = options.windowMs ?? 10;
  const stepMs = (options.averageMs ?? 1) / 2;
  const steps = Math.floor(windowMs / stepMs) + 1;
  let bestJ = -1;
  let bestAbs = -1;
  for (let j = 0; j < steps; j++) {
    let sum = 0;
    let n = 0;
    for (const t of tracks) {
      const v = t.d[j];
      if (v !== null && v !== undefined) {
        sum += v;
        n++;
      }
    }
    if (n > 0 && Math.abs(sum / n) > bestAbs) {
      bestAbs = Math.abs(sum / n);
      bestJ = j;
    }
  }
  if (bestJ < 0) return [];
  const out: MarkChirp[] = [];
  for (const t of tracks) {
    // A mark without a value at the chosen instant uses its nearest one.
    let v: number | null = null;
    for (let r = 0; r < steps && v === null; r++) v = t.d[bestJ + r] ?? t.d[bestJ - r] ?? null;
    if (v !== null) out.push({ startMs: t.startMs, settledOffsetHz: t.settled, chirpHz: v, atMs: bestJ * stepMs });
  }
  return out;
}
