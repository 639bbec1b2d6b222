/**
 * The command line loads only the module of the command it runs; help, version and unknown names
 * load them all. Checks that every command is still listed and reachable either way.
 */
import { describe, expect, it } from 'vitest';
import { runCli } from '../../testkit/cli.js';

const NAMES = ['encode', 'decode', 'timing', 'shape', 'batch', 'ui', 'demo'];

describe('command loading', () => {
  it('lists every command in the top-level help', async () => {
    const { code, stdout: out } = await runCli(['--help']);
    expect(code).toBe(0);
    for (const name of NAMES) expect(out).toMatch(new RegExp(`^  ${name}\\b`, 'm'));
  });

  it("gives each command's own help when only that command is loaded", async () => {
    for (const name of NAMES) {
      const { code, stdout: out } = await runCli([name, '--help']);
      expect(code).toBe(0);
      expect(out).toContain(`Usage: keyform ${name}`);
    }
  });

  it('suggests the nearest command for a misspelt one (all commands loaded), exit 2', async () => {
    const { code, stderr: err } = await runCli(['decod', 'x.wav']);
    expect(code).toBe(2);
    expect(err).toContain("unknown command 'decod'");
    expect(err).toContain('Did you mean decode?');
  });
});
