/**
 * The pivot type of keyform: key-down intervals plus the settings that produced or describe them.
 * The planner produces one from text, the receiver recovers one from audio, and the analysers
 * compare and measure them.
 */

/** A key-down interval `[startMs, endMs]`, in milliseconds. */
export type Interval = [startMs: number, endMs: number];

export interface Timeline {
  /** The message (normalised: upper case, single spaces, prosigns as `<AR>`). */
  text: string;
  /** Character speed [words per minute, PARIS]. */
  wpm: number;
  /** Overall (Farnsworth) speed [wpm], or null when the spacing is standard. */
  farnsworthWpm: number | null;
  /** Unit (dot) length [ms]. */
  unitMs: number;
  /** End of the last mark [ms]. */
  totalMs: number;
  /** Key-down intervals, in time order, not overlapping. */
  marks: Interval[];
}

/** Sum of key-down time [ms]. */
export function keyDownMs(marks: readonly Interval[]): number {
  let sum = 0;
  for (const [a, b] of marks) sum += b - a;
  return sum;
}
