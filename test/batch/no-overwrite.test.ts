/**
 * Every command that writes a file refuses to replace an existing one without --force (exit 2, the
 * file untouched) and replaces it with --force.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import type { CliIo } from '../../src/cli/io.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-overwrite-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const recording = join(import.meta.dirname, '../../recordings/beacon-after-fix.wav');

async function run(args: string[]): Promise<{ code: number; err: string }> {
  let err = '';
  const io: CliIo = {
    stdout: { write: () => true, isTTY: false },
    stderr: { write: (s: string | Uint8Array) => ((err += String(s)), true), isTTY: false },
    stdin: process.stdin,
    env: { NO_COLOR: '1' },
  };
  return { code: await main(args, io), err };
}

const cases: [string, (path: string) => string[], string][] = [
  ['encode --out', (p) => ['encode', 'Q7ZKT TEST', '--out', p], 'plan.json'],
  ['encode --out (WAV)', (p) => ['encode', 'Q7ZKT TEST', '--out', p], 'plan.wav'],
  ['shape --plot', (p) => ['shape', recording, '--plot', p], 'shape.svg'],
  ['batch --out', (p) => ['batch', recording, '--out', p, '--no-shape'], 'report.csv'],
];

describe('no command replaces an output file without --force', () => {
  it.each(cases)('%s', async (_label, argsFor, name) => {
    const path = join(dir, name);
    writeFileSync(path, 'kept');
    const refused = await run(argsFor(path));
    expect(refused.code).toBe(2);
    expect(refused.err).toContain(`keyform: ${path}: already exists (use --force to replace it`);
    expect(readFileSync(path, 'utf8')).toBe('kept');
    const forced = await run([...argsFor(path), '--force']);
    expect(forced.code).toBe(0);
    expect(readFileSync(path, 'utf8')).not.toBe('kept');
  });
});
