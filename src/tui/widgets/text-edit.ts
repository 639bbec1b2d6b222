import { isPrintable, type KeyInfo } from '../keys.js';

/**
 * A one-line text field's edit step, pure: typing appends (pasted text arrives whole), Backspace
 * and Delete remove the last character, Ctrl-U clears. Returns the new value, or null when the key
 * is not an edit (Enter, Esc, arrows… are left to the caller).
 */
export function editText(value: string, input: string, k: KeyInfo, maxLength = 500): string | null {
  if (k.backspace || k.delete) return Array.from(value).slice(0, -1).join('');
  if (k.ctrl && input === 'u') return '';
  if (isPrintable(input, k)) {
    const clean = input.replace(/[\r\n\t]+/g, ' ');
    return Array.from(value + clean).slice(0, maxLength).join('');
  }
  return null;
}
