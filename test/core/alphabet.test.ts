import { describe, expect, it } from 'vitest';
import { ITU_TABLE, PROSIGNS, patternUnits, textForPattern, EXTENSIONS } from '../../src/core/morse/alphabet.js';
import { parseMessage } from '../../src/core/morse/message.js';

// The code table of ITU-R M.1677-1 (10/2009), Part I §1.1.1–1.1.3, typed again here independently of
// src/core/morse/alphabet.ts (from the Recommendation's table as summarised in ../shared/REFERENCES.md;
// letters and figures from memory of the same table).
const M1677: Array<[string, string]> = [
  ['A', '.-'], ['B', '-...'], ['C', '-.-.'], ['D', '-..'], ['E', '.'], ['É', '..-..'], ['F', '..-.'],
  ['G', '--.'], ['H', '....'], ['I', '..'], ['J', '.---'], ['K', '-.-'], ['L', '.-..'], ['M', '--'],
  ['N', '-.'], ['O', '---'], ['P', '.--.'], ['Q', '--.-'], ['R', '.-.'], ['S', '...'], ['T', '-'],
  ['U', '..-'], ['V', '...-'], ['W', '.--'], ['X', '-..-'], ['Y', '-.--'], ['Z', '--..'],
  ['1', '.----'], ['2', '..---'], ['3', '...--'], ['4', '....-'], ['5', '.....'],
  ['6', '-....'], ['7', '--...'], ['8', '---..'], ['9', '----.'], ['0', '-----'],
  ['.', '.-.-.-'], [',', '--..--'], [':', '---...'], ['?', '..--..'], ["'", '.----.'], ['-', '-....-'],
  ['/', '-..-.'], ['(', '-.--.'], [')', '-.--.-'], ['"', '.-..-.'], ['=', '-...-'], ['+', '.-.-.'],
  ['×', '-..-'], ['@', '.--.-.'],
];

// ITU-R M.1677-1 §1.1.3 procedural signals, under the operators' two-letter names (common practice).
const M1677_SIGNALS: Array<[string, string, string]> = [
  ['SN', '...-.', 'understood'],
  ['VE', '...-.', 'understood'],
  ['HH', '........', 'error (eight dots)'],
  ['K', '-.-', 'invitation to transmit'],
  ['KN', '-.--.', 'invitation to transmit for a named station'],
  ['AS', '.-...', 'wait'],
  ['SK', '...-.-', 'end of work'],
  ['CT', '-.-.-', 'starting signal'],
  ['KA', '-.-.-', 'starting signal'],
  ['AR', '.-.-.', 'end of message / cross'],
  ['BT', '-...-', 'double hyphen'],
];

describe('the code table against ITU-R M.1677-1', () => {
  it.each(M1677)('encodes %s as %s', (ch, pattern) => {
    expect(ITU_TABLE[ch]).toBe(pattern);
    const parsed = parseMessage(ch.toLowerCase());
    expect(parsed.words[0]![0]!.pattern).toBe(pattern);
  });

  it('has exactly the Recommendation characters and no others', () => {
    expect(Object.keys(ITU_TABLE).sort()).toEqual(M1677.map(([c]) => c).sort());
  });

  it.each(M1677_SIGNALS)('sends <%s> as one run %s (%s)', (name, pattern) => {
    const parsed = parseMessage(`<${name}>`);
    expect(parsed.words).toHaveLength(1);
    expect(parsed.words[0]).toHaveLength(1);
    expect(parsed.words[0]![0]!.pattern).toBe(pattern);
    if (PROSIGNS[name]) expect(PROSIGNS[name]!.pattern).toBe(pattern);
  });

  it('keeps the characters the Recommendation lacks out of the table', () => {
    for (const ch of ['!', '&', ';', '_', '$']) {
      expect(ITU_TABLE[ch]).toBeUndefined();
      expect(EXTENSIONS[ch]).toBeDefined();
    }
  });

  // A character with d dots and D dashes lasts 2d + 4D − 1 units (ITU-R M.1677-1 §2 spacing;
  // E. N. Gilbert, Information and Control 14 (1969) 559).
  it.each(M1677)('gives %s the length 2d + 4D − 1 units', (_ch, pattern) => {
    const d = pattern.split('').filter((c) => c === '.').length;
    const D = pattern.length - d;
    expect(patternUnits(pattern)).toBe(2 * d + 4 * D - 1);
  });
});

describe('round trips text → pattern → text', () => {
  it('reads back every character through its pattern (preferred spellings)', () => {
    for (const [ch, pattern] of M1677) {
      const back = textForPattern(pattern);
      // Where one pattern has two meanings the receiver prints the operators' usual reading (common practice).
      const expected: Record<string, string> = { '+': '<AR>', '(': '<KN>', '×': 'X' };
      expect(back).toBe(expected[ch] ?? ch);
    }
  });

  it('reads back a whole message', () => {
    const text = 'Q7ZKT DE Q3ABC = RST 599 5NN? 73 <SK>';
    const parsed = parseMessage(text);
    const back = parsed.words.map((w) => w.map((c) => textForPattern(c.pattern)).join('')).join(' ');
    expect(back).toBe(text.toUpperCase());
  });
});

describe('normalisation', () => {
  it('is case-insensitive and folds white space into one word gap', () => {
    expect(parseMessage('  q7zkt \n\n  test\t<ar> ').text).toBe('Q7ZKT TEST <AR>');
  });

  it('names the character it cannot send and its position', () => {
    expect(() => parseMessage('Q7ZKT T#ST')).toThrow("cannot encode '#' at position 8");
  });

  // ITU-R M.1677-1 §3: per cent is sent as 0/0, joined to a preceding number by a hyphen.
  it('sends per cent as 0/0 joined to the number by a hyphen', () => {
    expect(parseMessage('2%').text).toBe('2-0/0');
    expect(parseMessage('5‰').text).toBe('5-0/00');
  });

  it('substitutes look-alikes and drops what has none, with warnings', () => {
    const parsed = parseMessage('Ça va! #1', { substitute: true });
    expect(parsed.text).toBe('CA VA! 1');
    expect(parsed.warnings).toEqual([
      "sent 'Ç' at position 1 as 'C'",
      "sent '!' at position 6 as -.-.-- (common practice, not in ITU-R M.1677-1)",
      "dropped '#' at position 8",
    ]);
  });
});
