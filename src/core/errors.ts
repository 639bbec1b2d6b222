/**
 * An error caused by the caller's input (bad option, unencodable text, unreadable file).
 * The CLI prints `keyform: <message>` and exits with `exitCode` (2 by default), never a stack trace.
 */
export class InputError extends Error {
  readonly exitCode: number;
  constructor(message: string, exitCode = 2) {
    super(message);
    this.name = 'InputError';
    this.exitCode = exitCode;
  }
}

/** Throws an InputError unless `value` is a finite number within [min, max]. */
export function checkRange(name: string, value: number, min: number, max: number, unit = ''): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new InputError(`${name} must be a number (got ${String(value)})`);
  }
  if (value < min || value > max) {
    const u = unit ? ` ${unit}` : '';
    throw new InputError(`${name} must be from ${min} to ${max}${u} (got ${value})`);
  }
  return value;
}
