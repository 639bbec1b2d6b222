import { chmodSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.js';
import { openAudio, readAllAudio } from '../../src/io/audio-source.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-badpath-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Opens and reads all of `path`; returns the error thrown. */
async function failure(path: string, streamAboveBytes?: number): Promise<InputError> {
  try {
    const audio = await openAudio(path, { streamAboveBytes });
    await readAllAudio(audio);
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return err as InputError;
  }
  throw new Error(`${path} was read without an error`);
}

const textWav = join(dir, 'notes.wav');
writeFileSync(textWav, 'Q7ZKT beacon log\nchecked keying line, all fine\n');
const empty = join(dir, 'empty.wav');
writeFileSync(empty, '');
const folder = join(dir, 'captures.wav');
mkdirSync(folder);
const locked = join(dir, 'locked.wav');
writeFileSync(locked, 'RIFF');
chmodSync(locked, 0o000);

// Both paths: whole file (default) and streaming (every file over 0 bytes streams).
for (const [label, threshold] of [['whole-file', undefined], ['streaming', 0]] as const) {
  describe(`bad inputs on the ${label} path: one-line errors naming the file, exit code 2`, () => {
    it.each([
      ['a nonexistent path', join(dir, 'missing.wav'), /missing\.wav: no such file$/],
      ['a folder given as a file', folder, /captures\.wav: is a folder, not a file$/],
      ['an empty file', empty, /empty\.wav: empty file$/],
      ['a text file named .wav', textWav, /notes\.wav: not a WAV file \(no RIFF\/WAVE header\)$/],
    ])('%s', async (_what, path, message) => {
      const err = await failure(path, threshold);
      expect(err.message).toMatch(message);
      expect(err.message).not.toContain('\n');
      expect(err.exitCode).toBe(2);
    });

    it('an unreadable file', async () => {
      const err = await failure(locked, threshold);
      // Root reads files whatever their mode: then the 4 bytes it reads are not a WAV header.
      const root = process.getuid?.() === 0;
      expect(err.message).toMatch(root ? /locked\.wav: not a WAV file/ : /locked\.wav: cannot read \(permission denied\)$/);
      expect(err.exitCode).toBe(2);
    });
  });
}

describe('bad inputs through the command line: `keyform: <file>: <why>` on stderr, exit 2', () => {
  async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
    const { main } = await import('../../src/cli/main.js');
    let out = '';
    let err = '';
    const io = {
      stdout: { write: (s: string | Uint8Array) => ((out += String(s)), true), isTTY: false },
      stderr: { write: (s: string | Uint8Array) => ((err += String(s)), true), isTTY: false },
      stdin: process.stdin,
      env: { NO_COLOR: '1' },
    };
    const code = await main(args, io);
    return { code, out, err };
  }

  it.each([
    ['a nonexistent path', join(dir, 'missing.wav'), 'no such file'],
    ['a folder given as a file', folder, 'is a folder, not a file'],
    ['an empty file', empty, 'empty file'],
    ['a text file named .wav', textWav, 'not a WAV file (no RIFF/WAVE header)'],
  ])('keyform decode, timing and shape with %s', async (_what, path, why) => {
    for (const command of ['decode', 'timing', 'shape']) {
      const r = await cli([command, path]);
      expect(r.code).toBe(2);
      expect(r.out).toBe('');
      expect(r.err).toBe(`keyform: ${path}: ${why}\n`);
    }
  });
});
