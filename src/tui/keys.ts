/**
 * The part of a key press the app looks at. Ink's `Key` satisfies it; tests build it with `key()`.
 */
export interface KeyInfo {
  upArrow?: boolean;
  downArrow?: boolean;
  leftArrow?: boolean;
  rightArrow?: boolean;
  pageUp?: boolean;
  pageDown?: boolean;
  home?: boolean;
  end?: boolean;
  return?: boolean;
  escape?: boolean;
  ctrl?: boolean;
  shift?: boolean;
  tab?: boolean;
  backspace?: boolean;
  delete?: boolean;
  meta?: boolean;
}

/** A key press with the given flags set (for key-map tests). */
export function key(flags: Partial<KeyInfo> = {}): KeyInfo {
  return { ...flags };
}

/** True for printable input (not a control key, not an escape sequence). */
export function isPrintable(input: string, k: KeyInfo): boolean {
  if (k.ctrl || k.meta || k.escape || k.return || k.tab || k.backspace || k.delete) return false;
  if (k.upArrow || k.downArrow || k.leftArrow || k.rightArrow || k.pageUp || k.pageDown) return false;
  return input.length > 0 && !/[\u0000-\u001f\u007f]/.test(input);
}

/** One line of the help overlay and footer: which key, what it does. */
export interface KeyHelp {
  keys: string;
  does: string;
}
