import { InputError } from '../errors.js';
import { EXTENSIONS, LETTERS, FIGURES, patternForChar } from './alphabet.js';

/** One sendable character (or prosign) of a message. */
export interface MessageChar {
  /** As printed: `A`, `7`, `?`, `<AR>`. */
  text: string;
  /** Dots and dashes, e.g. `.-`. */
  pattern: string;
  /** 1-based position of the character in the input text. */
  position: number;
}

export interface ParsedMessage {
  /** Normalised text: upper case, single spaces between words, prosigns as `<AR>`. */
  text: string;
  /** Words, each a list of characters. */
  words: MessageChar[][];
  /** What `substitute` changed or dropped, one line each. */
  warnings: string[];
}

export interface ParseOptions {
  /** Map characters outside the Recommendation to a documented fallback, or drop them with a warning. */
  substitute?: boolean;
}

/** Fallbacks used with `substitute`: typographic variants of characters in the table. */
const LOOKALIKES: Readonly<Record<string, string>> = {
  '\u2018': "'", '\u2019': "'", '\u201C': '"', '\u201D': '"', '\u2013': '-', '\u2014': '-',
  '[': '(', ']': ')', '{': '(', '}': ')', '*': '×',
};

/** Upper-cases one character, keeping É and × as they are. */
function upper(ch: string): string {
  if (ch === 'é') return 'É';
  return ch.toUpperCase();
}

/**
 * Splits a message into words of sendable characters.
 *
 * Case-insensitive; runs of white space become one word gap. `<AR>` (any letters or figures inside
 * angle brackets) is one run of their patterns without letter gaps. `%` and `‰` follow the text rules
 * of ITU-R M.1677-1 §3 (sent as `0/0` and `0/00`, joined to a preceding figure by a hyphen).
 *
 * @throws InputError naming the first character that cannot be sent and its 1-based position,
 *   unless `substitute` is set.
 * @example parseMessage('q7zkt  test').text //=> 'Q7ZKT TEST'
 */
export function parseMessage(input: string, options: ParseOptions = {}): ParsedMessage {
  const words: MessageChar[][] = [];
  const warnings: string[] = [];
  let word: MessageChar[] = [];
  const chars = Array.from(input);
  const endWord = (): void => {
    if (word.length > 0) words.push(word);
    word = [];
  };
  const push = (text: string, pattern: string, position: number): void => {
    word.push({ text, pattern, position });
  };

  for (let i = 0; i < chars.length; i++) {
    const raw = chars[i]!;
    const position = i + 1;
    if (/\s/u.test(raw)) {
      endWord();
      continue;
    }
    if (raw === '<') {
      const close = chars.indexOf('>', i + 1);
      const inner = close > i ? chars.slice(i + 1, close).map(upper) : [];
      if (close > i + 1 && inner.every((c) => LETTERS[c] !== undefined || FIGURES[c] !== undefined)) {
        push(`<${inner.join('')}>`, inner.map((c) => patternForChar(c)).join(''), position);
        i = close;
        continue;
      }
      if (!options.substitute) throw new InputError(`cannot encode '<' at position ${position} (a prosign is written like <AR>)`);
      warnings.push(`dropped '<' at position ${position}`);
      continue;
    }
    if (raw === '%' || raw === '‰') {
      // ITU-R M.1677-1 §3: per cent sent as 0/0, per mille as 0/00, joined to a number by a hyphen.
      const prev = word[word.length - 1];
      if (prev && /^[0-9]$/.test(prev.text)) push('-', patternForChar('-')!, position);
      for (const c of raw === '%' ? '0/0' : '0/00') push(c, patternForChar(c)!, position);
      continue;
    }
    const ch = upper(raw);
    const pattern = patternForChar(ch);
    if (pattern !== undefined) {
      push(ch, pattern, position);
      continue;
    }
    if (!options.substitute) throw new InputError(`cannot encode '${raw}' at position ${position}`);
    const look = LOOKALIKES[raw];
    if (look !== undefined) {
      push(look, patternForChar(look)!, position);
      warnings.push(`sent '${raw}' at position ${position} as '${look}'`);
      continue;
    }
    const ext = EXTENSIONS[raw];
    if (ext !== undefined) {
      push(raw, ext, position);
      warnings.push(`sent '${raw}' at position ${position} as ${ext} (common practice, not in ITU-R M.1677-1)`);
      continue;
    }
    const base = upper(raw.normalize('NFD').replace(/\p{M}/gu, ''));
    const basePattern = base.length === 1 ? patternForChar(base) : undefined;
    if (basePattern !== undefined) {
      push(base, basePattern, position);
      warnings.push(`sent '${raw}' at position ${position} as '${base}'`);
      continue;
    }
    warnings.push(`dropped '${raw}' at position ${position}`);
  }
  endWord();
  const text = words.map((w) => w.map((c) => c.text).join('')).join(' ');
  return { text, words, warnings };
}
