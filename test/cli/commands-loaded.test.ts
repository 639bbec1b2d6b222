/**
 * The command line loads only the module of the command it runs; help, version and unknown names
 * load them all. Checks that every command is still listed and reachable either way.
 */
import { describe, expect, it } from 'vitest';
import type { CliIo } from '../../src/cli/io.js';
import { main } from '../../src/cli/main.js';

const NAMES = ['encode', 'decode', 'timing', 'shape', 'batch', 'ui', 'demo'];

async function run(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const io: CliIo = {
    stdout: { write: (s: string | Uint8Array) => ((out += String(s)), true), isTTY: false },
    stderr: { write: (s: string | Uint8Array) => ((err += String(s)), true), isTTY: false },
    stdin: process.stdin,
    env: { NO_COLOR: '1' },
  };
  const code = await main(args, io);
  return { code, out, err };
}

describe('command loading', () => {
  it('lists every command in the top-level help', async () => {
    const { code, out } = await run(['--help']);
    expect(code).toBe(0);
    for (const name of NAMES) expect(out).toMatch(new RegExp(`^  ${name}\\b`, 'm'));
  });

  it("gives each command's own help when only that command is loaded", async () => {
    for (const name of NAMES) {
      const { code, out } = await run([name, '--help']);
      expect(code).toBe(0);
      expect(out).toContain(`Usage: keyform ${name}`);
    }
  });

  it('suggests the nearest command for a misspelt one (all commands loaded), exit 2', async () => {
    const { code, err } = await run(['decod', 'x.wav']);
    expect(code).toBe(2);
    expect(err).toContain("unknown command 'decod'");
    expect(err).toContain('Did you mean decode?');
  });
});
