import { InputError, checkRange } from '../errors.js';
import { parseMessage, type MessageChar, type ParseOptions } from '../morse/message.js';
import type { Interval, Timeline } from '../timeline.js';
import { farnsworthGaps, unitMs as unitMsFor } from './speed.js';

export interface PlanOptions extends ParseOptions {
  /** Character speed [wpm, PARIS], 1…100. */
  wpm: number;
  /** Overall speed with Farnsworth spacing [wpm], below `wpm`; omit for standard spacing. */
  farnsworthWpm?: number | null;
  /**
   * Weighting [%], 10…90; 50 is standard. Defined as the dot's share of a dot plus the following
   * element gap: every mark is lengthened by (weightPct/50 − 1)·unit and the gap after it shortened
   * by the same amount, so the speed does not change.
   */
  weightPct?: number;
  /** Keying compensation [ms]: added to every mark and taken from the gap after it (relay/transmitter delay). */
  compensationMs?: number;
  /** PTT lead before the first mark of each transmission [ms], 0…10000. */
  pttLeadMs?: number;
  /** PTT tail after the last mark of each transmission [ms], 0…10000. */
  pttTailMs?: number;
  /** How many times to send the message (beacon), 1…10000. */
  repeat?: number;
  /** Start-to-start period of repeats [s]; by default repeats follow each other after a word gap. */
  everyS?: number | null;
}

/** One planned element (dot or dash). */
export interface PlannedElement {
  startMs: number;
  endMs: number;
  kind: 'dit' | 'dah';
  /** Index into `characters`. */
  charIndex: number;
}

/** One planned character with its key-down span. */
export interface PlannedCharacter {
  text: string;
  pattern: string;
  startMs: number;
  endMs: number;
  /** Which repeat of the message (0-based). */
  repeatIndex: number;
}

export interface KeyingPlan extends Timeline {
  weightPct: number;
  compensationMs: number;
  /** Gap lengths used [ms]. */
  gapsMs: { element: number; letter: number; word: number };
  /** Dot and dash key-down lengths after weighting and compensation [ms]. */
  ditMs: number;
  dahMs: number;
  /** Number of characters sent (all repeats). */
  characterCount: number;
  repeat: number;
  everyMs: number | null;
  /** Duration of one sending of the message, first mark start to last mark end [ms]. */
  messageMs: number;
  /** PTT (transmit enable) intervals [ms]; empty when no PTT times are set. May start before 0. */
  ptt: Interval[];
  pttLeadMs: number;
  pttTailMs: number;
  elements: PlannedElement[];
  characters: PlannedCharacter[];
  warnings: string[];
}

/**
 * Turns a message into an exact keying timeline.
 *
 * Timing per ITU-R M.1677-1 §2 (dash = 3 units, element gap 1, letter gap 3, word gap 7) with the
 * unit of the PARIS standard word, optional Farnsworth spacing (QEX 1990), weighting, keying
 * compensation, PTT lead/tail and beacon repeats. The first mark starts at 0 ms.
 *
 * @example planKeying('E E', { wpm: 20 }).marks //=> [[0, 60], [480, 540]]
 */
export function planKeying(message: string, options: PlanOptions): KeyingPlan {
  const unit = unitMsFor(options.wpm);
  const weightPct = checkRange('weight', options.weightPct ?? 50, 10, 90, '%');
  const compensationMs = checkRange('compensation', options.compensationMs ?? 0, -unit, unit, 'ms');
  const pttLeadMs = checkRange('PTT lead', options.pttLeadMs ?? 0, 0, 10_000, 'ms');
  const pttTailMs = checkRange('PTT tail', options.pttTailMs ?? 0, 0, 10_000, 'ms');
  const repeat = checkRange('repeat', options.repeat ?? 1, 1, 10_000);
  if (!Number.isInteger(repeat)) throw new InputError(`repeat must be a whole number (got ${repeat})`);
  const farnsworthWpm = options.farnsworthWpm ?? null;
  let letterGap = 3 * unit;
  let wordGap = 7 * unit;
  if (farnsworthWpm !== null) {
    if (farnsworthWpm >= options.wpm) {
      throw new InputError(`Farnsworth speed must be below the character speed ${options.wpm} wpm (got ${farnsworthWpm})`);
    }
    const g = farnsworthGaps(options.wpm, farnsworthWpm);
    letterGap = g.letterGapMs;
    wordGap = g.wordGapMs;
  }
  const extra = (weightPct / 50 - 1) * unit + compensationMs;
  const ditMs = unit + extra;
  const dahMs = 3 * unit + extra;
  const elementGap = unit - extra;
  if (ditMs <= 0 || elementGap <= 0) {
    throw new InputError(
      `weight ${weightPct}% with compensation ${compensationMs} ms leaves no ${ditMs <= 0 ? 'dot' : 'gap between elements'} at ${options.wpm} wpm`,
    );
  }

  const parsed = parseMessage(message, options);
  if (parsed.words.length === 0) throw new InputError('the message is empty');

  const elements: PlannedElement[] = [];
  const characters: PlannedCharacter[] = [];
  const marks: Interval[] = [];

  const sendOnce = (t0: number, repeatIndex: number): number => {
    let t = t0;
    parsed.words.forEach((word: MessageChar[], w) => {
      if (w > 0) t += wordGap - extra;
      word.forEach((ch, c) => {
        if (c > 0) t += letterGap - extra;
        const charIndex = characters.length;
        const charStart = t;
        Array.from(ch.pattern).forEach((sym, e) => {
          if (e > 0) t += elementGap;
          const len = sym === '-' ? dahMs : ditMs;
          elements.push({ startMs: t, endMs: t + len, kind: sym === '-' ? 'dah' : 'dit', charIndex });
          marks.push([t, t + len]);
          t += len;
        });
        characters.push({ text: ch.text, pattern: ch.pattern, startMs: charStart, endMs: t, repeatIndex });
      });
    });
    return t;
  };

  const messageMs = sendOnce(0, 0);
  const onAirMs = pttLeadMs + messageMs + pttTailMs;
  let everyMs: number | null = null;
  if (options.everyS !== undefined && options.everyS !== null) {
    everyMs = checkRange('every', options.everyS, 0.001, 86_400, 's') * 1000;
    if (repeat > 1 && onAirMs > everyMs) {
      throw new InputError(
        `the message lasts ${(onAirMs / 1000).toFixed(3)} s${pttLeadMs + pttTailMs > 0 ? ' with PTT lead and tail' : ''}, longer than the repeat period of ${options.everyS} s`,
      );
    }
  }
  const starts: number[] = [0];
  for (let k = 1; k < repeat; k++) {
    const start = everyMs !== null ? k * everyMs : starts[k - 1]! + messageMs + wordGap - extra + (pttLeadMs + pttTailMs);
    starts.push(start);
    sendOnce(start, k);
  }
  const ptt: Interval[] = [];
  if (pttLeadMs > 0 || pttTailMs > 0) {
    for (const s of starts) {
      const iv: Interval = [s - pttLeadMs, s + messageMs + pttTailMs];
      const last = ptt[ptt.length - 1];
      if (last && iv[0] <= last[1]) last[1] = iv[1];
      else ptt.push(iv);
    }
  }
  const last = marks[marks.length - 1]!;
  return {
    text: parsed.text,
    wpm: options.wpm,
    farnsworthWpm,
    unitMs: unit,
    totalMs: last[1],
    marks,
    weightPct,
    compensationMs,
    gapsMs: { element: elementGap, letter: letterGap - extra, word: wordGap - extra },
    ditMs,
    dahMs,
    characterCount: characters.length,
    repeat,
    everyMs,
    messageMs,
    ptt,
    pttLeadMs,
    pttTailMs,
    elements,
    characters,
    warnings: parsed.warnings,
  };
}
