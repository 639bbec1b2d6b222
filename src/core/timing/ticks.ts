import { InputError } from '../errors.js';
import type { Interval } from '../timeline.js';

export interface TickSteps {
  /** Alternating key-down and key-up durations in ticks, starting with key-down. */
  steps: number[];
  /** Largest difference between a step and its exact length [ticks]. */
  maxStepErrorTicks: number;
  /** Largest difference between an edge's tick time and its exact time [ticks] (< 0.5 by construction). */
  maxDriftTicks: number;
  /** Difference between the summed ticks and the exact total at the last edge [ticks]. */
  totalDriftTicks: number;
}

/**
 * Quantises a timeline to integer timer ticks with error diffusion: every edge time is rounded
 * (not every duration), so each step's rounding error is carried into the next step and the
 * accumulated drift never exceeds half a tick.
 * @param marks - Key-down intervals [ms], the first starting at 0.
 * @param tickHz - Timer tick rate [Hz].
 */
export function quantizeToTicks(marks: readonly Interval[], tickHz: number): TickSteps {
  const edges: number[] = [];
  for (const [a, b] of marks) edges.push(a, b);
  const exact = edges.map((ms) => (ms * tickHz) / 1000);
  const rounded = exact.map((x) => Math.round(x));
  const steps: number[] = [];
  let maxStepErrorTicks = 0;
  let maxDriftTicks = 0;
  for (let i = 1; i < rounded.length; i++) {
    const step = rounded[i]! - rounded[i - 1]!;
    if (step <= 0) {
      throw new InputError(`tick rate ${tickHz} Hz is too coarse: an element of ${((exact[i]! - exact[i - 1]!) * 1000 / tickHz).toFixed(3)} ms rounds to ${step} ticks`);
    }
    steps.push(step);
    maxStepErrorTicks = Math.max(maxStepErrorTicks, Math.abs(step - (exact[i]! - exact[i - 1]!)));
  }
  for (let i = 0; i < rounded.length; i++) maxDriftTicks = Math.max(maxDriftTicks, Math.abs(rounded[i]! - exact[i]!));
  const last = rounded.length - 1;
  const totalDriftTicks = last >= 0 ? rounded[last]! - rounded[0]! - (exact[last]! - exact[0]!) : 0;
  return { steps, maxStepErrorTicks, maxDriftTicks, totalDriftTicks };
}

/**
 * The timeline as one character per unit: `1` key down, `0` key up. Edges are rounded to the
 * nearest unit; `exact` is false when some edge was not on the unit grid (Farnsworth, weighting).
 */
export function toUnitBits(marks: readonly Interval[], unitLengthMs: number): { bits: string; exact: boolean } {
  let bits = '';
  let exact = true;
  let pos = 0;
  for (const [a, b] of marks) {
    const ua = Math.round(a / unitLengthMs);
    const ub = Math.round(b / unitLengthMs);
    if (Math.abs(ua * unitLengthMs - a) > 1e-6 || Math.abs(ub * unitLengthMs - b) > 1e-6) exact = false;
    bits += '0'.repeat(Math.max(0, ua - pos)) + '1'.repeat(Math.max(0, ub - Math.max(ua, pos)));
    pos = Math.max(pos, ub);
  }
  return { bits, exact };
}
