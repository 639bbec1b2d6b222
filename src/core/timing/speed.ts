import { InputError, checkRange } from '../errors.js';

/** Units in the PARIS standard word, including its word gap. */
export const PARIS_UNITS = 50;

/**
 * Unit (dot) length of the PARIS standard word (50 units) at a given speed.
 * @param wpm - Words per minute, 1…100.
 * @returns Unit (dot) length [ms].
 * @example unitMs(20) //=> 60
 */
export function unitMs(wpm: number): number {
  checkRange('wpm', wpm, 1, 100, 'wpm');
  return 1200 / wpm;
}

/** Speed [wpm, PARIS] whose unit lasts `unitLengthMs`. @example wpmFromUnitMs(60) //=> 20 */
export function wpmFromUnitMs(unitLengthMs: number): number {
  return 1200 / unitLengthMs;
}

export interface FarnsworthGaps {
  /** Total spacing added to the 31 units of character time in one PARIS word [ms] (Bloom's ta). */
  addedDelayMs: number;
  /** Full gap between letters [ms] (Bloom's tc). */
  letterGapMs: number;
  /** Full gap between words [ms] (Bloom's tw). */
  wordGapMs: number;
}

/**
 * Farnsworth spacing after J. Bloom, "A Standard for Morse Timing Using the Farnsworth Technique",
 * QEX, April 1990: characters keep the unit of the character speed c, and the delay
 * ta = (60·c − 37.2·s) / (s·c) seconds per PARIS word is split 3:7 into letter gap tc = 3·ta/19
 * and word gap tw = 7·ta/19.
 * @param charWpm - Character speed c [wpm], 1…100.
 * @param overallWpm - Overall speed s [wpm], 1…c.
 * @example farnsworthGaps(20, 10).letterGapMs //=> 653.68…
 */
export function farnsworthGaps(charWpm: number, overallWpm: number): FarnsworthGaps {
  checkRange('wpm', charWpm, 1, 100, 'wpm');
  checkRange('Farnsworth speed', overallWpm, 1, 100, 'wpm');
  if (overallWpm > charWpm) {
    throw new InputError(`Farnsworth speed must be below the character speed ${charWpm} wpm (got ${overallWpm})`);
  }
  const c = charWpm;
  const s = overallWpm;
  const taS = (60 * c - 37.2 * s) / (s * c);
  return { addedDelayMs: taS * 1000, letterGapMs: (3 * taS * 1000) / 19, wordGapMs: (7 * taS * 1000) / 19 };
}

/**
 * Modulation rate of on-off keying: one unit element per baud.
 * @returns Baud (1 / unit length in seconds). @example modulationRateBaud(60) //=> 16.67
 */
export function modulationRateBaud(unitLengthMs: number): number {
  return 1000 / unitLengthMs;
}
