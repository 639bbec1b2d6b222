import { InputError } from '../core/errors.js';

/** Commander argument parser for a number in [min, max], with the option's name in the error. */
export function numberIn(flag: string, min: number, max: number, opts: { integer?: boolean } = {}) {
  return (value: string): number => {
    const x = Number(value);
    if (value.trim() === '' || !Number.isFinite(x)) throw new InputError(`${flag} must be a number (got '${value}')`);
    if (opts.integer && !Number.isInteger(x)) throw new InputError(`${flag} must be a whole number (got ${value})`);
    if (x < min || x > max) throw new InputError(`${flag} must be from ${min} to ${max} (got ${value})`);
    return x;
  };
}

/** Commander parser for one of a fixed set of words. */
export function oneOf<T extends string>(flag: string, values: readonly T[]) {
  return (value: string): T => {
    if ((values as readonly string[]).includes(value)) return value as T;
    throw new InputError(`${flag} must be one of ${values.join(', ')} (got '${value}')`);
  };
}
