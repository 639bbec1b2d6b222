/**
 * Turns the plain plan object written by `keyform encode --format json` back into the planned
 * elements the alignment needs (the JSON carries marks and characters with their patterns, not
 * the element list). Pure: an already-parsed object in, plain data out.
 */
import { InputError } from '../errors.js';
import type { Interval } from '../timeline.js';
import type { PlannedElement } from '../timing/plan.js';
import type { PlanElements } from './align.js';

export interface PlanFromJson extends PlanElements {
  text: string;
  wpm: number;
  marks: Interval[];
  characters: { text: string; pattern: string }[];
  /** Full letter and word gaps [ms] as timed before weighting (from `gapsMs` + the mark lengthening), when the JSON has them. */
  letterWordGapsMs: { letter: number; word: number } | null;
}

const isNum = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/**
 * Rebuilds the planned elements from a plan object: each character's pattern claims the next
 * marks in order. Without a character list, marks longer than two units are read as dashes.
 * @param value - A parsed plan JSON object (fields `unitMs`, `marks`, optional `characters`, `text`, `wpm`).
 * @param name - File name for error messages.
 * @throws InputError when fields are missing or the characters' patterns do not match the marks.
 * @example planElementsFromJson({ unitMs: 60, marks: [[0, 60]], characters: [{ text: 'E', pattern: '.' }] }, 'p.json').elements[0].kind //=> 'dit'
 */
export function planElementsFromJson(value: unknown, name: string): PlanFromJson {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) throw new InputError(`${name}: not a keyform plan (expected a JSON object)`);
  const o = value as Record<string, unknown>;
  if (!isNum(o.unitMs) || o.unitMs <= 0) throw new InputError(`${name}: the plan has no positive unitMs`);
  if (!Array.isArray(o.marks) || o.marks.length === 0) throw new InputError(`${name}: the plan has no marks`);
  const marks: Interval[] = o.marks.map((m: unknown, i: number) => {
    if (!Array.isArray(m) || m.length !== 2 || !isNum(m[0]) || !isNum(m[1]) || m[1] <= m[0]) {
      throw new InputError(`${name}: marks[${i}] must be [startMs, endMs] with endMs after startMs`);
    }
    return [m[0], m[1]];
  });
  const unitMs = o.unitMs;
  const characters: { text: string; pattern: string }[] = [];
  const elements: PlannedElement[] = [];
  if (Array.isArray(o.characters) && o.characters.length > 0) {
    let k = 0;
    o.characters.forEach((c: unknown, ci: number) => {
      const ch = c as Record<string, unknown>;
      if (typeof ch?.pattern !== 'string' || !/^[.-]+$/.test(ch.pattern)) throw new InputError(`${name}: characters[${ci}] has no dot-dash pattern`);
      characters.push({ text: typeof ch.text === 'string' ? ch.text : '?', pattern: ch.pattern });
      for (const sym of ch.pattern) {
        const m = marks[k++];
        if (!m) throw new InputError(`${name}: the characters' patterns need more marks than the ${marks.length} in the plan`);
        elements.push({ startMs: m[0], endMs: m[1], kind: sym === '-' ? 'dah' : 'dit', charIndex: ci });
      }
    });
    if (k !== marks.length) throw new InputError(`${name}: the characters' patterns cover ${k} of the ${marks.length} marks`);
  } else {
    marks.forEach(([a, b]) => elements.push({ startMs: a, endMs: b, kind: b - a > 2 * unitMs ? 'dah' : 'dit', charIndex: -1 }));
  }
  let letterWordGapsMs: PlanFromJson['letterWordGapsMs'] = null;
  const g = o.gapsMs as Record<string, unknown> | undefined;
  if (g && isNum(g.letter) && isNum(g.word)) {
    const extra = isNum(o.ditMs) ? o.ditMs - unitMs : 0;
    letterWordGapsMs = { letter: g.letter + extra, word: g.word + extra };
  }
  return {
    letterWordGapsMs,
    text: typeof o.text === 'string' ? o.text : '',
    wpm: isNum(o.wpm) ? o.wpm : 1200 / unitMs,
    unitMs,
    marks,
    elements,
    characters,
  };
}
