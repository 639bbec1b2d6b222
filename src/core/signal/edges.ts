import { InputError } from '../errors.js';
import type { Interval } from '../timeline.js';

export type EdgeKind = 'raised-cosine' | 'linear' | 'hard' | 'exponential';
export const EDGE_KINDS: readonly EdgeKind[] = ['raised-cosine', 'linear', 'hard', 'exponential'];

/**
 * 10–90 % time of each edge shape as a fraction of its full transition length T (analytic):
 * raised cosine 0.5·(1 − cos(π·t/T)) crosses 10 % at T·acos(0.8)/π and 90 % at T·acos(−0.8)/π,
 * so 0.5903·T; a linear ramp 0.8·T. For the single-pole (RC) edge, 10–90 % = τ·ln 9 = 2.197·τ.
 */
export const RISE_FRACTION = {
  'raised-cosine': (Math.acos(-0.8) - Math.acos(0.8)) / Math.PI,
  linear: 0.8,
} as const;

/** Full transition length T [ms] of a ramp with the given 10–90 % rise time. */
export function rampLengthMs(edge: EdgeKind, rise10to90Ms: number): number {
  switch (edge) {
    case 'raised-cosine':
      return rise10to90Ms / RISE_FRACTION['raised-cosine'];
    case 'linear':
      return rise10to90Ms / RISE_FRACTION.linear;
    case 'exponential':
      return rise10to90Ms / Math.log(9); // time constant τ
    case 'hard':
      return 0;
  }
}

export function parseEdgeKind(value: string): EdgeKind {
  if ((EDGE_KINDS as readonly string[]).includes(value)) return value as EdgeKind;
  throw new InputError(`edge must be one of ${EDGE_KINDS.join(', ')} (got '${value}')`);
}

export interface EnvelopeOptions {
  /** Key-down intervals [ms], relative to `startMs`. */
  marks: readonly Interval[];
  /** Sample rate [Hz]. */
  sampleRate: number;
  /** Edge shape. */
  edge: EdgeKind;
  /** 10–90 % rise and fall time [ms] (ignored for `hard`). */
  riseMs: number;
  /** Time of the first sample [ms] (may be negative, to include silence before the first mark). */
  startMs: number;
  /** Number of samples. */
  lengthSamples: number;
}

/** Ramp value 0…1 at `x` ms into a transition of full length T (raised cosine or linear). */
function ramp(edge: EdgeKind, x: number, T: number): number {
  if (x <= 0) return 0;
  if (x >= T) return 1;
  const u = x / T;
  return edge === 'linear' ? u : 0.5 * (1 - Math.cos(Math.PI * u));
}

/**
 * Keying envelope 0…1 for a list of marks. Each edge is centred on the mark boundary (its 50 %
 * point falls on the planned time), so the key-down length measured at half amplitude equals the
 * plan. `exponential` is a single-pole low-pass of the key signal, advanced by τ·ln 2 for the same reason.
 */
export function keyingEnvelope(options: EnvelopeOptions): Float32Array {
  const { marks, sampleRate, edge, riseMs, startMs, lengthSamples } = options;
  const env = new Float32Array(lengthSamples);
  const msPerSample = 1000 / sampleRate;
  const T = rampLengthMs(edge, riseMs);
  if (edge === 'exponential') {
    const tau = T;
    const shift = tau * Math.log(2);
    const a = Math.exp(-msPerSample / tau);
    let y = 0;
    let m = 0;
    for (let i = 0; i < lengthSamples; i++) {
      const t = startMs + i * msPerSample + shift;
      while (m < marks.length && marks[m]![1] <= t) m++;
      const on = m < marks.length && marks[m]![0] <= t ? 1 : 0;
      y = on + (y - on) * a;
      env[i] = y;
    }
    return env;
  }
  const half = T / 2;
  for (const [a, b] of marks) {
    const i0 = Math.max(0, Math.floor((a - half - startMs) / msPerSample));
    const i1 = Math.min(lengthSamples - 1, Math.ceil((b + half - startMs) / msPerSample));
    for (let i = i0; i <= i1; i++) {
      const t = startMs + i * msPerSample;
      let v: number;
      if (edge === 'hard') v = t >= a && t < b ? 1 : 0;
      else v = Math.min(ramp(edge, t - (a - half), T), 1 - ramp(edge, t - (b - half), T));
      if (v > env[i]!) env[i] = v;
    }
  }
  return env;
}
