/**
 * Colour and symbols. Colour always comes with a symbol or a word, so the screen reads the same
 * without it (colour-blind users, NO_COLOR, monochrome terminals).
 */
export interface Theme {
  color: boolean;
}

export type Tone = 'good' | 'bad' | 'warn' | 'accent' | 'dim' | 'plain';

const COLORS: Record<Tone, string | undefined> = {
  good: 'green',
  bad: 'red',
  warn: 'yellow',
  accent: 'cyan',
  dim: 'gray',
  plain: undefined,
};

/** Ink `color` prop for a tone, or undefined when colour is off. */
export function colorFor(theme: Theme, tone: Tone): string | undefined {
  return theme.color ? COLORS[tone] : undefined;
}

export const SYMBOLS = {
  pass: '✓',
  fail: '✗',
  warn: '!',
  doubt: '?',
  busy: '…',
  pointer: '›',
} as const;

/** Whether colour may be used: a TTY and no NO_COLOR in the environment (https://no-color.org). */
export function colorAllowed(env: Record<string, string | undefined>, isTTY: boolean | undefined): boolean {
  return Boolean(isTTY) && env.NO_COLOR === undefined;
}
