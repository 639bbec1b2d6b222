import { existsSync, statSync } from 'node:fs';
import { dirname } from 'node:path';
import { readFile } from 'node:fs/promises';
import writeFileAtomic from 'write-file-atomic';
import { InputError } from '../core/errors.js';

export interface WriteOptions {
  /** Replace an existing file. Without it, an existing file is an error and is left untouched. */
  force?: boolean;
}

/**
 * Writes a file atomically (temporary file, then rename), so a reader never sees it half-written.
 * Refuses to replace an existing file unless `force` is set.
 */
export async function writeOutputFile(path: string, data: string | Buffer, options: WriteOptions = {}): Promise<void> {
  if (!options.force && existsSync(path)) {
    throw new InputError(`${path}: already exists (use --force to replace it)`);
  }
  try {
    await writeFileAtomic(path, data);
  } catch (err) {
    throw cannotWrite(path, err);
  }
}

/**
 * The one-line error for an output file that could not be written, with the reason in words.
 * @example cannotWrite('out/plan.json', { code: 'ENOENT' }).message //=> "out/plan.json: cannot write: no folder 'out'"
 */
export function cannotWrite(path: string, err: unknown): InputError {
  const code = (err as NodeJS.ErrnoException)?.code;
  const why: Record<string, string> = {
    ENOENT: `no folder '${dirname(path)}'`,
    ENOTDIR: `'${dirname(path)}' is not a folder`,
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    EISDIR: 'it is a folder',
    EROFS: 'read-only file system',
    ENOSPC: 'no space left on the device',
  };
  return new InputError(`${path}: cannot write: ${(code && why[code]) ?? code ?? String((err as Error)?.message ?? err)}`);
}

/** Reads a whole input file, turning file-system failures into one-line input errors. */
export async function readInputFile(path: string): Promise<Buffer> {
  let st;
  try {
    st = statSync(path);
  } catch {
    throw new InputError(`${path}: no such file`);
  }
  if (st.isDirectory()) throw new InputError(`${path}: is a folder, not a file`);
  try {
    return await readFile(path);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    throw new InputError(`${path}: cannot read (${code === 'EACCES' ? 'permission denied' : (code ?? 'error')})`);
  }
}
