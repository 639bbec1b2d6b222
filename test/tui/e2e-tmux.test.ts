/**
 * End to end: the real keyform binary in a real terminal (tmux), driven by key presses, reading the
 * screen back. Needs tmux (CI installs it) and the compiled dist/ (`npm test` builds it first; this
 * file builds it too when it is missing or older than the sources).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { planKeying } from '../../src/core/timing/plan.js';
import { RECORDINGS } from '../../scripts/make-recordings.js';

const ROOT = join(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'dist', 'cli', 'bin.js');
const SESSION = `keyform-e2e-${process.pid}`;

function newestMtime(dir: string): number {
  let t = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    t = Math.max(t, e.isDirectory() ? newestMtime(p) : statSync(p).mtimeMs);
  }
  return t;
}

function tmux(...args: string[]): string {
  return execFileSync('tmux', args, { encoding: 'utf8' });
}

const screen = (): string => tmux('capture-pane', '-p', '-t', SESSION);

async function waitForScreen(check: (s: string) => boolean, what: string, timeoutMs = 30_000): Promise<string> {
  const t0 = Date.now();
  let last = '';
  while (Date.now() - t0 < timeoutMs) {
    last = screen();
    if (check(last)) return last;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}; screen:\n${last}`);
}

async function keys(...k: string[]): Promise<void> {
  for (const one of k) {
    tmux('send-keys', '-t', SESSION, one);
    await new Promise((r) => setTimeout(r, 150)); // one key at a time, as a person types
  }
}

beforeAll(() => {
  const tmuxOk = spawnSync('tmux', ['-V']).status === 0;
  if (!tmuxOk) throw new Error('tmux is needed for this test (apt-get install tmux)');
  if (!existsSync(BIN) || statSync(BIN).mtimeMs < newestMtime(join(ROOT, 'src'))) {
    // Emits even when another part of the tree has type errors; the app's own files compile.
    spawnSync('npx', ['tsc', '-p', 'tsconfig.json'], { cwd: ROOT, stdio: 'ignore' });
  }
});

afterAll(() => {
  spawnSync('tmux', ['kill-session', '-t', SESSION], { stdio: 'ignore' });
});

describe('keyform ui in a real terminal', () => {
  it('decodes a demo recording, shows the help, switches workspaces and leaves with q', async () => {
    const spec = RECORDINGS.find((r) => r.file === 'beacon-after-fix.wav')!;
    // The text the recording was synthesized from, as the planner normalises it.
    const expected = planKeying(spec.text, { wpm: spec.wpm }).text;
    tmux(
      'new-session', '-d', '-s', SESSION, '-x', '100', '-y', '30', '-c', ROOT,
      `NO_COLOR=1 node ${BIN} ui recordings/${spec.file}; echo "keyform exited with $?"; sleep 60`,
    );
    const decoded = await waitForScreen((s) => s.includes(expected), `the decoded text "${expected}"`);
    expect(decoded).toContain('[2 Read back]');
    expect(decoded).toContain(spec.file);
    expect(decoded).toContain(`tone ${spec.toneHz} Hz`);

    await keys('?');
    const help = await waitForScreen((s) => s.includes('every key'), 'the help overlay');
    expect(help).toContain('Ctrl-C');
    await keys('Space', '1');
    await waitForScreen((s) => s.includes('[1 Plan]') && s.includes('Settings'), 'the Plan workspace');
    await keys('q');
    const after = await waitForScreen((s) => s.includes('keyform exited with'), 'the app to leave');
    expect(after).toContain('keyform exited with 0');
  });

  it('prints help instead of opening the app when stdout is not a terminal', () => {
    const out = execFileSync('node', [BIN], { cwd: ROOT, encoding: 'utf8', input: '' });
    expect(out).toContain('Usage: keyform');
    const ui = spawnSync('node', [BIN, 'ui'], { cwd: ROOT, encoding: 'utf8', input: '' });
    expect(ui.status).toBe(2);
    expect(ui.stderr).toContain('keyform: the interactive app needs a terminal');
  });
});
