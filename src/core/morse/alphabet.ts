/**
 * The code table. Patterns use `.` for a dot and `-` for a dash.
 *
 * Typed from ITU-R M.1677-1 (10/2009) "International Morse code", Part I §1.1 (letters, figures,
 * punctuation and miscellaneous signs, procedural signals), re-checked against ../shared/REFERENCES.md;
 * the procedural-signal list is partly from memory of the Recommendation.
 */

/** ITU-R M.1677-1 §1.1.1 letters (and the accented E). */
export const LETTERS: Readonly<Record<string, string>> = {
  A: '.-', B: '-...', C: '-.-.', D: '-..', E: '.', F: '..-.', G: '--.', H: '....', I: '..', J: '.---',
  K: '-.-', L: '.-..', M: '--', N: '-.', O: '---', P: '.--.', Q: '--.-', R: '.-.', S: '...', T: '-',
  U: '..-', V: '...-', W: '.--', X: '-..-', Y: '-.--', Z: '--..', 'É': '..-..',
};

/** ITU-R M.1677-1 §1.1.2 figures. */
export const FIGURES: Readonly<Record<string, string>> = {
  '1': '.----', '2': '..---', '3': '...--', '4': '....-', '5': '.....',
  '6': '-....', '7': '--...', '8': '---..', '9': '----.', '0': '-----',
};

/** ITU-R M.1677-1 §1.1.3 punctuation marks and miscellaneous signs. */
export const SIGNS: Readonly<Record<string, string>> = {
  '.': '.-.-.-', // full stop
  ',': '--..--', // comma
  ':': '---...', // colon or division sign
  '?': '..--..', // question mark
  "'": '.----.', // apostrophe
  '-': '-....-', // hyphen or dash or subtraction sign
  '/': '-..-.', // fraction bar or division sign
  '(': '-.--.', // left-hand bracket
  ')': '-.--.-', // right-hand bracket
  '"': '.-..-.', // inverted commas
  '=': '-...-', // double hyphen
  '+': '.-.-.', // cross or addition sign
  '×': '-..-', // multiplication sign (sent as the letter X)
  '@': '.--.-.', // commercial at
};

/**
 * Procedural signals of ITU-R M.1677-1 §1.1.3 and the operators' two-letter names for them.
 * The two-letter names (AR, SK, BT, KN, AS, SN/VE, HH, CT/KA) are operating practice, not the
 * Recommendation's text; in text they are written `<AR>` and sent as one run without letter gaps.
 */
export const PROSIGNS: Readonly<Record<string, { pattern: string; meaning: string }>> = {
  AR: { pattern: '.-.-.', meaning: 'end of message (cross)' },
  SK: { pattern: '...-.-', meaning: 'end of work' },
  VA: { pattern: '...-.-', meaning: 'end of work' },
  BT: { pattern: '-...-', meaning: 'break (double hyphen)' },
  KN: { pattern: '-.--.', meaning: 'invitation to transmit for a named station' },
  AS: { pattern: '.-...', meaning: 'wait' },
  SN: { pattern: '...-.', meaning: 'understood' },
  VE: { pattern: '...-.', meaning: 'understood' },
  HH: { pattern: '........', meaning: 'error' },
  CT: { pattern: '-.-.-', meaning: 'starting signal' },
  KA: { pattern: '-.-.-', meaning: 'starting signal' },
};

/**
 * Characters outside ITU-R M.1677-1 that keyform sends only with `--substitute`.
 * These are common practice among operators, not part of the Recommendation.
 */
export const EXTENSIONS: Readonly<Record<string, string>> = {
  '!': '-.-.--',
  '&': '.-...',
  ';': '-.-.-.',
  _: '..--.-',
  $: '...-..-',
};

/** Every character the Recommendation defines, mapped to its pattern. */
export const ITU_TABLE: Readonly<Record<string, string>> = { ...LETTERS, ...FIGURES, ...SIGNS };

/**
 * The text a receiver prints for each pattern. Where one pattern stands for two things, the
 * operators' usual reading wins: `.-.-.` is printed `<AR>` (not `+`), `-.--.` is `<KN>` (not `(`),
 * `-..-` is `X` (not `×`), `-...-` is `=`. Extensions come last and never shadow the Recommendation.
 */
export const PATTERN_TO_TEXT: ReadonlyMap<string, string> = (() => {
  const map = new Map<string, string>();
  for (const [ch, p] of Object.entries(EXTENSIONS)) map.set(p, ch);
  for (const [ch, p] of Object.entries(SIGNS)) map.set(p, ch);
  for (const [ch, p] of Object.entries(FIGURES)) map.set(p, ch);
  for (const [ch, p] of Object.entries(LETTERS)) map.set(p, ch);
  // Preferred prosign spellings (first name of each pattern wins).
  for (const name of ['HH', 'CT', 'SN', 'AS', 'SK', 'KN', 'AR']) map.set(PROSIGNS[name]!.pattern, `<${name}>`);
  map.set('-...-', '=');
  return map;
})();

/** Decoded text for a pattern, or undefined when the pattern is not a known character. */
export function textForPattern(pattern: string): string | undefined {
  return PATTERN_TO_TEXT.get(pattern);
}

/** Pattern of a single (upper-case) character from the Recommendation, or undefined. */
export function patternForChar(ch: string): string | undefined {
  return ITU_TABLE[ch];
}

/**
 * Length of a pattern in units, without the following letter gap: 2·dots + 4·dashes − 1
 * (ITU-R M.1677-1 §2: dash = 3 dots, element gap = 1 dot).
 * @example patternUnits('.-') //=> 5
 */
export function patternUnits(pattern: string): number {
  let units = 0;
  for (const c of pattern) units += c === '-' ? 4 : 2;
  return Math.max(0, units - 1);
}
