/**
 * Timing statistics of a keying timeline: speed, weighting, dash/dot ratio, gap classes, jitter,
 * speed drift and a histogram of mark and gap lengths. Pure: plain data in, plain data out.
 *
 * Definitions used throughout (the same as the planner's, src/core/timing/plan.ts):
 * - unit: half the period of a dot plus the element gap after it, (dit + element gap) / 2, from the
 *   typical (20 % trimmed mean) length of each class. Weighting and keying compensation move time
 *   from the gap to the mark and leave this period unchanged.
 * - weight: the dot's share of dot + following element gap, in %; 50 % is standard.
 * - dash/dot ratio: dah length / dit length (3 at standard timing and 50 % weight, ITU-R M.1677-1 §2).
 * - gap classes: after correcting a gap for the mark lengthening, below 2 units is an element gap,
 *   2…5 units a letter gap, above 5 units a word gap (cut-offs near 2 and 5 units are common practice);
 *   longer gaps that fall into two clear groups (Farnsworth spacing, hand-sent word gaps) are split
 *   between letter and word at the best two-class split instead.
 */
import { textForPattern } from '../morse/alphabet.js';
import type { Interval } from '../timeline.js';
import { checkRange, InputError } from '../errors.js';
import { fitLine, median, splitTwoClasses, standardDeviation, trimmedMean } from './timing-stats.js';

/** Typical length of a class of intervals: the 20 % trimmed mean (see trimmedMean). */
const typicalOf = (values: readonly number[]): number => trimmedMean(values, 0.2);

export type ElementKind = 'dit' | 'dah';
export type GapClass = 'element' | 'letter' | 'word';

export interface TimingOptions {
  /**
   * A first guess of the unit [ms], 1…2000, e.g. from the intended plan. Only seeds the
   * classification (which decides whether a message of all-equal marks is dots or dashes); the
   * reported unit is always measured.
   */
  unitMsHint?: number;
  /**
   * Boundary between letter and word gaps [units], 2…1000, used when the longer gaps do not fall
   * into two clear groups (then they are split where they separate best); e.g. the geometric mean
   * of the intended plan's letter and word gaps, which keeps the Farnsworth letter gaps of a
   * one-word message letter gaps. Default 5 (cut-offs near 2 and 5 units are common practice).
   */
  wordSplitUnits?: number;
  /** Histogram bin width [units], 0.05…2; default 0.25. */
  histogramBinUnits?: number;
  /** Centre of the last histogram bin [units], 2…200; longer intervals are counted in `marksOver`/`gapsOver`. Default 10. */
  histogramMaxUnits?: number;
}

/** Summary of one class of intervals, in units. */
export interface ClassStats {
  count: number;
  /** Median length [units]. */
  median: number;
  /** Standard deviation of the length [units]. */
  spread: number;
}

/** Counts of mark and gap lengths in bins of `binUnits`, from 0 to `maxUnits`. */
export interface TimingHistogram {
  binUnits: number;
  maxUnits: number;
  /** Count per bin; bin k is centred on k·binUnits and holds lengths in [(k − ½)·binUnits, (k + ½)·binUnits). */
  marks: number[];
  gaps: number[];
  /** Lengths beyond the last bin (centred on `maxUnits`). */
  marksOver: number;
  gapsOver: number;
}

/** One observed mark with its class and the class of the gap after it. */
export interface MeasuredElement {
  startMs: number;
  endMs: number;
  kind: ElementKind;
  /** Class of the gap after this mark; null for the last mark. */
  gapAfter: GapClass | null;
}

export interface TimingReport {
  markCount: number;
  /** First key-down to last key-up [ms]. */
  durationMs: number;
  /** Character speed [wpm, PARIS] = 1200 / unitMs. */
  wpm: number;
  /** Overall speed [wpm]: the speed at which standard spacing would fill the same time. */
  effectiveWpm: number;
  unitMs: number;
  /** Weighting [%], dot share of dot + element gap; null without a dot followed by an element gap or a dash to compare with. */
  weightPct: number | null;
  /** Typical dah / typical dit (20 % trimmed means); null unless both occur. */
  dahDitRatio: number | null;
  /** Typical dit and dah lengths [ms] (20 % trimmed means); null when absent. */
  ditMs: number | null;
  dahMs: number | null;
  markUnits: { dit: ClassStats | null; dah: ClassStats | null };
  gapUnits: { element: ClassStats | null; letter: ClassStats | null; word: ClassStats | null };
  /**
   * Edge jitter: RMS deviation of the edges from a grid fitted to each character (class lengths at
   * the word's own speed, the character's offset removed), in % of a unit; null without edges to compare.
   */
  jitterPct: number | null;
  /** Speed change from the first to the last word along a straight line fitted to the word speeds [wpm]; null with fewer than two words. */
  driftWpm: number | null;
  /** Speed of each word [wpm]. */
  wordWpm: number[];
  histogram: TimingHistogram;
  /** The marks read as text (`*` for a pattern not in the table). */
  text: string;
  elements: MeasuredElement[];
  warnings: string[];
}

/** Nominal lengths in units at standard timing (ITU-R M.1677-1 §2). */
const NOMINAL_UNITS = { dit: 1, dah: 3, element: 1, letter: 3, word: 7 } as const;

function stats(lengthsMs: readonly number[], unit: number): ClassStats | null {
  if (lengthsMs.length === 0) return null;
  const u = divided(lengthsMs, unit);
  return { count: u.length, median: median(u), spread: standardDeviation(u) };
}

// Loops over the marks are written as loops in module-level functions rather than as callbacks
// made inside measureTiming: a callback is a new function at every call, whose compiled code the
// engine does not keep from one recording to the next, so a batch of many files would compile
// them again for each file (on background threads that the other workers need).

/** values[i] / d for each i. */
function divided(values: readonly number[], d: number): number[] {
  const out = new Array<number>(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i]! / d;
  return out;
}

/** The values whose flag equals `want`. */
function where(values: readonly number[], flags: readonly boolean[], want: boolean): number[] {
  const out: number[] = [];
  for (let i = 0; i < values.length; i++) if (flags[i] === want) out.push(values[i]!);
  return out;
}

/** The gaps of one class. */
function ofClass(gaps: readonly number[], classes: readonly GapClass[], c: GapClass): number[] {
  const out: number[] = [];
  for (let i = 0; i < gaps.length; i++) if (classes[i] === c) out.push(gaps[i]!);
  return out;
}

/** Checks marks: finite, each positive in length, in time order and not overlapping. */
export function checkMarks(marks: readonly Interval[]): void {
  if (marks.length === 0) throw new InputError('no key-down marks to measure');
  let prevEnd = -Infinity;
  for (let i = 0; i < marks.length; i++) {
    const [a, b] = marks[i]!;
    if (!Number.isFinite(a) || !Number.isFinite(b)) throw new InputError(`mark ${i + 1}: times must be numbers (got ${a}, ${b})`);
    if (b <= a) throw new InputError(`mark ${i + 1}: ends at ${b} ms, not after its start ${a} ms`);
    if (a < prevEnd) throw new InputError(`mark ${i + 1}: starts at ${a} ms, before the previous mark ends (${prevEnd} ms)`);
    prevEnd = b;
  }
}

interface Classification {
  isDah: boolean[];
  gapClass: GapClass[];
  unitMs: number;
}

/** Classifies marks (dit/dah) and gaps (element/letter/word) and estimates the unit. */
function classify(
  lens: readonly number[],
  gaps: readonly number[],
  hint: number | undefined,
  wordSplitUnits: number | undefined,
  warnings: string[],
): Classification {
  const split = splitTwoClasses(lens);
  const twoKinds = split !== null && split.highMean / split.lowMean >= 1.7;
  const isDah = new Array<boolean>(lens.length);
  if (twoKinds) markLongerThan(lens, split.threshold, isDah);
  else {
    const allDahs = hint !== undefined && median(lens) > 2 * hint;
    isDah.fill(allDahs);
    if (hint === undefined && lens.length > 1) warnings.push('all marks have about the same length: read as dots (give the intended message to decide)');
  }
  const dits = where(lens, isDah, false);
  const dahs = where(lens, isDah, true);

  let unit: number;
  if (hint !== undefined) unit = hint;
  else if (dits.length > 0) {
    // The shortest dot periods (dot + element gap) are 2 units whatever the weighting.
    const periods = dotPeriods(lens, gaps, isDah);
    unit = median(dits);
    if (periods.length > 0) {
      const u0 = median(nearShortest(periods, 1.45)) / 2;
      const ditShare = median(dits) / u0;
      if (ditShare >= 0.4 && ditShare <= 1.6) unit = u0;
    }
  } else unit = median(dahs) / 3;

  const gapClass = new Array<GapClass>(gaps.length).fill('letter');
  for (let iter = 0; iter < 4; iter++) {
    const extra = dits.length > 0 ? typicalOf(dits) - unit : typicalOf(dahs) - 3 * unit;
    const s = splitTwoClasses(shiftedAtLeast(gaps, extra, 2 * unit));
    const boundary = s !== null && s.highMean / s.lowMean >= 1.6 && s.highMean >= 4 * unit ? s.threshold : (wordSplitUnits ?? 5) * unit;
    classifyGaps(gaps, extra, 2 * unit, boundary, gapClass);
    const el = ofClass(gaps, gapClass, 'element');
    let next: number;
    if (dits.length > 0 && el.length > 0) next = (typicalOf(dits) + typicalOf(el)) / 2;
    else if (dahs.length > 0 && el.length > 0) next = (typicalOf(dahs) + typicalOf(el)) / 4;
    else if (dits.length > 0 && dahs.length > 0) next = (typicalOf(dahs) - typicalOf(dits)) / 2;
    else if (dits.length > 0) next = typicalOf(dits);
    else next = typicalOf(dahs) / 3;
    if (Math.abs(next - unit) < 1e-9 * unit) {
      unit = next;
      break;
    }
    unit = next;
  }
  return { isDah, gapClass, unitMs: unit };
}

// The loops of classify, as leaf functions: classify runs once per recording, and with its loops
// inside it the engine would compile it (and all it calls) on stack for a batch worker's first
// recordings and then again as a whole; the leaves are small and compiled once.

/** out[i] = lens[i] > threshold. */
function markLongerThan(lens: readonly number[], threshold: number, out: boolean[]): void {
  for (let i = 0; i < lens.length; i++) out[i] = lens[i]! > threshold;
}

/** The values below `factor` times the smallest one, in order. */
function nearShortest(values: readonly number[], factor: number): number[] {
  let shortest = Infinity;
  for (const v of values) shortest = Math.min(shortest, v);
  const near: number[] = [];
  for (const v of values) if (v < factor * shortest) near.push(v);
  return near;
}

function histogramOf(lensUnits: readonly number[], binUnits: number, maxUnits: number): { counts: number[]; over: number } {
  const bins = Math.floor(maxUnits / binUnits + 1e-9) + 1;
  const counts = new Array<number>(bins).fill(0);
  let over = 0;
  for (const x of lensUnits) {
    const k = Math.round(x / binUnits);
    if (k >= bins) over++;
    else counts[Math.max(0, k)]!++;
  }
  return { counts, over };
}

/**
 * Measures how a timeline was keyed.
 *
 * @param timeline - Key-down intervals `marks` [ms], in time order, not overlapping (a Timeline or
 *   anything with `marks`).
 * @param options - Unit hint and histogram layout, see {@link TimingOptions}.
 * @returns Speed, unit, weighting, dash/dot ratio, gap classes in units (median, spread), edge jitter
 *   in % of a unit, speed drift across words, a histogram, and each mark's class.
 * @throws InputError for an empty or malformed list of marks.
 * @example measureTiming({ marks: planKeying('PARIS', { wpm: 20 }).marks }).unitMs //=> 60
 */
export function measureTiming(timeline: { marks: readonly Interval[] }, options: TimingOptions = {}): TimingReport {
  const marks = timeline.marks;
  checkMarks(marks);
  const hint = options.unitMsHint === undefined ? undefined : checkRange('unit hint', options.unitMsHint, 1, 2000, 'ms');
  const binUnits = checkRange('histogram bin', options.histogramBinUnits ?? 0.25, 0.05, 2, 'units');
  const maxUnits = checkRange('histogram range', options.histogramMaxUnits ?? 10, 2, 200, 'units');
  const warnings: string[] = [];

  const { lens, gaps } = lengthsAndGaps(marks);
  const split = options.wordSplitUnits === undefined ? undefined : checkRange('letter/word boundary', options.wordSplitUnits, 2, 1000, 'units');
  const { isDah, gapClass, unitMs: unit } = classify(lens, gaps, hint, split, warnings);

  const dits = where(lens, isDah, false);
  const dahs = where(lens, isDah, true);
  const el = ofClass(gaps, gapClass, 'element');
  const ditMs = dits.length > 0 ? typicalOf(dits) : null;
  const dahMs = dahs.length > 0 ? typicalOf(dahs) : null;

  let weightPct: number | null = null;
  if (ditMs !== null && el.length > 0) weightPct = (100 * ditMs) / (ditMs + typicalOf(el));
  else if (ditMs !== null && dahMs !== null) weightPct = (100 * ditMs) / (2 * unit);
  else if (dahMs !== null && el.length > 0) weightPct = (100 * (dahMs - 2 * unit)) / (2 * unit);
  if (el.length === 0) warnings.push('no gaps inside characters: the unit and weighting assume a dash/dot ratio of 3');

  const durationMs = marks[marks.length - 1]![1] - marks[0]![0];
  let nominalUnits = 0;
  nominalUnits += nominalUnitsOf(isDah, gapClass);

  // Typical length of each class [ms], the "fitted grid" for jitter and word speeds.
  const typical = {
    dit: ditMs ?? unit,
    dah: dahMs ?? 3 * unit,
    element: el.length > 0 ? typicalOf(el) : 2 * unit - (ditMs ?? unit),
  };

  // Word speeds and the class lengths with the drift taken out (see fitWordSpeeds).
  const wordOf = wordIndex(marks.length, gapClass);
  const words = wordOf.length > 0 ? wordOf[wordOf.length - 1]! + 1 : 1;
  const { factor, shape } = fitWordSpeeds(lens, gaps, isDah, gapClass, wordOf, words, typical);
  // The unit of the de-drifted shape, by the same rule as the whole-recording unit.
  const shapeUnit = dits.length > 0 && el.length > 0 ? (shape.dit + shape.element) / 2 : dits.length > 0 ? shape.dit : shape.dah / 3;
  const wordWpm = Array.from(factor, (k) => 1200 / (k * shapeUnit));
  const scale = Float64Array.from(wordOf, (w) => factor[w]!);

  // Edge jitter: within each character, the edges against the class lengths laid end to end (at
  // the word's own speed, so drift is not counted as jitter), with the character's own offset
  // removed. Degrees of freedom: edges − 1 per character − 1 per word (its fitted speed).
  const chars = characterRuns(marks.length, gapClass);
  const ssr = jitterSsr(marks, chars, isDah, shape, scale);
  const dof = edgeDof(chars) - wordWpm.length;
  const jitterPct = dof > 0 ? (100 * Math.sqrt(ssr / dof)) / unit : null;

  let driftWpm: number | null = null;
  if (wordWpm.length >= 2) {
    const { slope } = fitLine(wordWpm.map((_, k) => k), wordWpm);
    driftWpm = slope * (wordWpm.length - 1);
  }

  const markHist = histogramOf(divided(lens, unit), binUnits, maxUnits);
  const gapHist = histogramOf(divided(gaps, unit), binUnits, maxUnits);

  let text = '';
  for (const ch of chars) {
    let pattern = '';
    for (const i of ch) pattern += isDah[i] ? '-' : '.';
    text += textForPattern(pattern) ?? '*';
    const last = ch[ch.length - 1]!;
    if (gapClass[last] === 'word') text += ' ';
  }

  return {
    markCount: marks.length,
    durationMs,
    wpm: 1200 / unit,
    effectiveWpm: (1200 * nominalUnits) / durationMs,
    unitMs: unit,
    weightPct,
    dahDitRatio: ditMs !== null && dahMs !== null ? dahMs / ditMs : null,
    ditMs,
    dahMs,
    markUnits: { dit: stats(dits, unit), dah: stats(dahs, unit) },
    gapUnits: { element: stats(el, unit), letter: stats(ofClass(gaps, gapClass, 'letter'), unit), word: stats(ofClass(gaps, gapClass, 'word'), unit) },
    jitterPct,
    driftWpm,
    wordWpm,
    histogram: { binUnits, maxUnits, marks: markHist.counts, gaps: gapHist.counts, marksOver: markHist.over, gapsOver: gapHist.over },
    text,
    elements: measuredElements(marks, isDah, gapClass),
    warnings,
  };
}

function measuredElements(marks: readonly Interval[], isDah: readonly boolean[], gapClass: readonly GapClass[]): MeasuredElement[] {
  const out = new Array<MeasuredElement>(marks.length);
  for (let i = 0; i < marks.length; i++) {
    out[i] = { startMs: marks[i]![0], endMs: marks[i]![1], kind: isDah[i] ? 'dah' : 'dit', gapAfter: i < gapClass.length ? gapClass[i]! : null };
  }
  return out;
}

/** Word number of each mark: a new word after each word gap. */
function wordIndex(markCount: number, gapClass: readonly GapClass[]): Int32Array {
  const wordOf = new Int32Array(markCount);
  let words = 0;
  for (let i = 0; i < markCount; i++) {
    wordOf[i] = words;
    if (i < markCount - 1 && gapClass[i] === 'word') words++;
  }
  return wordOf;
}

interface ClassLengths {
  dit: number;
  dah: number;
  element: number;
}

/**
 * Word speeds: each word's element-level time (marks and element gaps) over the same intervals at
 * the typical class lengths gives its speed factor. The class lengths are then re-estimated from the
 * lengths with each word's factor divided out, so that a speed change across the recording does not
 * distort the class shape (ten rounds; it settles in a few).
 */
function fitWordSpeeds(
  lens: readonly number[],
  gaps: readonly number[],
  isDah: readonly boolean[],
  gapClass: readonly GapClass[],
  wordOf: Int32Array,
  words: number,
  typical: ClassLengths,
): { factor: Float64Array; shape: ClassLengths } {
  // (Written out rather than spread, as the receiver's withLevels is: spreading an object with
  // fractional fields makes its shape's fields general ones.)
  let shape: ClassLengths = { dit: typical.dit, dah: typical.dah, element: typical.element };
  const factor = new Float64Array(words).fill(1);
  // (The loops over the marks are leaf functions: this one runs once per recording.)
  for (let round = 0; round < 10; round++) {
    const obs = new Float64Array(words);
    const exp = new Float64Array(words);
    addWordTimes(lens, gaps, isDah, gapClass, wordOf, shape, obs, exp);
    const change = updateFactors(obs, exp, factor);
    if (round > 0 && change < 1e-12) break;
    const { d, D, e } = undrifted(lens, gaps, isDah, gapClass, wordOf, factor);
    shape = {
      dit: d.length > 0 ? typicalOf(d) : shape.dit,
      dah: D.length > 0 ? typicalOf(D) : shape.dah,
      element: e.length > 0 ? typicalOf(e) : shape.element,
    };
  }
  return { factor, shape };
}

/** Adds each word's observed element-level time (marks and element gaps) to obs, and the same at the class lengths `shape` to exp. */
function addWordTimes(
  lens: readonly number[],
  gaps: readonly number[],
  isDah: readonly boolean[],
  gapClass: readonly GapClass[],
  wordOf: Int32Array,
  shape: ClassLengths,
  obs: Float64Array,
  exp: Float64Array,
): void {
  for (let i = 0; i < lens.length; i++) {
    const w = wordOf[i]!;
    obs[w] += lens[i]!;
    exp[w] += isDah[i] ? shape.dah : shape.dit;
    if (i < gaps.length && gapClass[i] === 'element') {
      obs[w] += gaps[i]!;
      exp[w] += shape.element;
    }
  }
}

/** factor[w] = obs[w] / exp[w]; returns the largest change. */
function updateFactors(obs: Float64Array, exp: Float64Array, factor: Float64Array): number {
  let change = 0;
  for (let w = 0; w < factor.length; w++) {
    const k = obs[w]! / exp[w]!;
    change = Math.max(change, Math.abs(k - factor[w]!));
    factor[w] = k;
  }
  return change;
}

/** Dot, dash and element-gap lengths with each word's speed factor divided out. */
function undrifted(
  lens: readonly number[],
  gaps: readonly number[],
  isDah: readonly boolean[],
  gapClass: readonly GapClass[],
  wordOf: Int32Array,
  factor: Float64Array,
): { d: number[]; D: number[]; e: number[] } {
  const d: number[] = [];
  const D: number[] = [];
  const e: number[] = [];
  for (let i = 0; i < lens.length; i++) {
    const k = factor[wordOf[i]!]!;
    (isDah[i] ? D : d).push(lens[i]! / k);
    if (i < gaps.length && gapClass[i] === 'element') e.push(gaps[i]! / k);
  }
  return { d, D, e };
}

/** Marks grouped into characters (runs joined by element gaps), as lists of mark indices. */
function characterRuns(markCount: number, gapClass: readonly GapClass[]): number[][] {
  const chars: number[][] = [];
  let current: number[] = [];
  for (let i = 0; i < markCount; i++) {
    current.push(i);
    if (i === markCount - 1 || gapClass[i] !== 'element') {
      chars.push(current);
      current = [];
    }
  }
  return chars;
}

/**
 * Sum of squared edge residuals against the fitted grid, each character's offset removed. (Numbers
 * returned, not an object: the engine compiled this loop in mid-run at every recording, and an object
 * made after it, never made before, sent the compiled code back to slow code each time.)
 */
function jitterSsr(marks: readonly Interval[], chars: readonly number[][], isDah: readonly boolean[], shape: ClassLengths, scale: Float64Array): number {
  let ssr = 0;
  for (let c = 0; c < chars.length; c++) ssr += characterSsr(marks, chars[c]!, isDah, shape, scale);
  return ssr;
}

/** Degrees of freedom of jitterSsr's sum: edges − 1 per character. */
function edgeDof(chars: readonly number[][]): number {
  let dof = 0;
  for (let c = 0; c < chars.length; c++) dof += 2 * chars[c]!.length - 1;
  return dof;
}

/**
 * One character's sum of squared edge residuals, its own offset removed (see jitterSsr). Two passes
 * over the edges (their mean, then the squares about it), each working the residuals out afresh,
 * with the same operations in the same order both times: no array of residuals per character, whose
 * kind of numbers (small integers or fractions) varies from recording to recording and would make
 * the engine compile this again for each kind.
 */
function characterSsr(marks: readonly Interval[], ch: readonly number[], isDah: readonly boolean[], shape: ClassLengths, scale: Float64Array): number {
  let sum = 0;
  let t = 0;
  for (let k = 0; k < ch.length; k++) {
    const i = ch[k]!;
    if (k > 0) t += shape.element * scale[i]!;
    sum += marks[i]![0] - t;
    t += (isDah[i] ? shape.dah : shape.dit) * scale[i]!;
    sum += marks[i]![1] - t;
  }
  const m = sum / (2 * ch.length);
  let ssr = 0;
  t = 0;
  for (let k = 0; k < ch.length; k++) {
    const i = ch[k]!;
    if (k > 0) t += shape.element * scale[i]!;
    const r0 = marks[i]![0] - t;
    ssr += (r0 - m) * (r0 - m);
    t += (isDah[i] ? shape.dah : shape.dit) * scale[i]!;
    const r1 = marks[i]![1] - t;
    ssr += (r1 - m) * (r1 - m);
  }
  return ssr;
}

/** Dot + following gap of every dot that has a gap after it [ms]. */
function dotPeriods(lens: readonly number[], gaps: readonly number[], isDah: readonly boolean[]): number[] {
  const periods: number[] = [];
  for (let i = 0; i < lens.length && i < gaps.length; i++) if (!isDah[i]) periods.push(lens[i]! + gaps[i]!);
  return periods;
}

/** g + shift for each gap g with g + shift ≥ limit. */
function shiftedAtLeast(gaps: readonly number[], shift: number, limit: number): number[] {
  const out: number[] = [];
  for (const g of gaps) if (g + shift >= limit) out.push(g + shift);
  return out;
}

/** Classes of the gaps, each corrected by `extra`: element below `elementLimit`, letter below `wordBoundary`, else word. */
function classifyGaps(gaps: readonly number[], extra: number, elementLimit: number, wordBoundary: number, out: GapClass[]): void {
  for (let i = 0; i < gaps.length; i++) {
    const c = gaps[i]! + extra;
    out[i] = c < elementLimit ? 'element' : c < wordBoundary ? 'letter' : 'word';
  }
}

/** Mark lengths and the gaps between marks [ms]. */
function lengthsAndGaps(marks: readonly Interval[]): { lens: number[]; gaps: number[] } {
  const lens = new Array<number>(marks.length);
  const gaps = new Array<number>(Math.max(0, marks.length - 1));
  for (let i = 0; i < marks.length; i++) {
    lens[i] = marks[i]![1] - marks[i]![0];
    if (i > 0) gaps[i - 1] = marks[i]![0] - marks[i - 1]![1];
  }
  return { lens, gaps };
}

/** Length of the marks and gaps at standard timing [units] (ITU-R M.1677-1 §2). */
function nominalUnitsOf(isDah: readonly boolean[], gapClass: readonly GapClass[]): number {
  let units = 0;
  for (const d of isDah) units += d ? NOMINAL_UNITS.dah : NOMINAL_UNITS.dit;
  for (const c of gapClass) units += NOMINAL_UNITS[c];
  return units;
}
