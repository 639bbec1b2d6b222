/**
 * Test generator of keyed marks built straight from the definitions, independent of keyform's
 * planner: patterns typed from ITU-R M.1677-1 and explicit mark and gap lengths in ms.
 */
import { gaussianSource, seededRandom } from '../src/core/signal/noise.js';

/** ITU-R M.1677-1 patterns of the letters and figures the tests send (typed from the Recommendation). */
export const M1677: Record<string, string> = {
  A: '.-', B: '-...', C: '-.-.', D: '-..', E: '.', H: '....', I: '..', K: '-.-', M: '--', N: '-.', O: '---', P: '.--.',
  Q: '--.-', R: '.-.', S: '...', T: '-', V: '...-', Z: '--..', '3': '...--', '7': '--...',
};

export interface KeyedLengths {
  ditMs: number;
  dahMs: number;
  elementGapMs: number;
  letterGapMs: number;
  wordGapMs: number;
  /** Standard deviation of independent Gaussian jitter added to every edge [ms]. */
  edgeJitterMs?: number;
  seed?: number;
  /** Start of the first mark [ms]. */
  startMs?: number;
}

/** Standard lengths (ITU-R M.1677-1 §2: dash 3, element gap 1, letter gap 3, word gap 7 units). */
export function standardLengths(unitMs: number): KeyedLengths {
  return { ditMs: unitMs, dahMs: 3 * unitMs, elementGapMs: unitMs, letterGapMs: 3 * unitMs, wordGapMs: 7 * unitMs };
}

/** Marks of `text` (words separated by single spaces) with the given lengths. */
export function keyedMarks(text: string, l: KeyedLengths): Array<[number, number]> {
  const g = gaussianSource(seededRandom(l.seed ?? 1));
  const j = (): number => (l.edgeJitterMs ? l.edgeJitterMs * g() : 0);
  const marks: Array<[number, number]> = [];
  let t = l.startMs ?? 0;
  text.split(' ').forEach((word, w) => {
    if (w > 0) t += l.wordGapMs;
    Array.from(word).forEach((ch, c) => {
      if (c > 0) t += l.letterGapMs;
      const pattern = M1677[ch];
      if (!pattern) throw new Error(`test generator has no pattern for ${ch}`);
      Array.from(pattern).forEach((sym, e) => {
        if (e > 0) t += l.elementGapMs;
        const len = sym === '-' ? l.dahMs : l.ditMs;
        marks.push([t + j(), t + len + j()]);
        t += len;
      });
    });
  });
  return marks;
}

/** Counts of dots and dashes in `text` from the patterns above. */
export function symbolCounts(text: string): { dits: number; dahs: number } {
  const p = Array.from(text.replace(/ /g, '')).map((c) => M1677[c]!).join('');
  return { dits: (p.match(/\./g) ?? []).length, dahs: (p.match(/-/g) ?? []).length };
}
