import { existsSync } from 'node:fs';
import type { Command } from 'commander';
import { InputError } from '../../core/errors.js';
import type { CommandContext } from '../io.js';

/**
 * Opens the interactive app (Ink + React, loaded only here) on a recording, a folder of recordings,
 * or by default the bundled `recordings/` folder. Needs a terminal on stdin and stdout.
 */
export async function runUi(ctx: CommandContext, target: string | undefined): Promise<number> {
  if (!ctx.io.stdout.isTTY || !ctx.io.stdin.isTTY) {
    throw new InputError('the interactive app needs a terminal; for scripts use encode, decode, timing or shape (see keyform --help)');
  }
  if (target !== undefined && !existsSync(target)) throw new InputError(`${target}: no such file or folder`);
  const { startApp } = await loadAppOnTerminal();
  return startApp({
    target,
    stdout: ctx.io.stdout as NodeJS.WriteStream,
    stdin: ctx.io.stdin as NodeJS.ReadStream,
    stderr: ctx.io.stderr as NodeJS.WriteStream,
    env: ctx.io.env,
  });
}

/**
 * Loads the app. Ink draws only a final frame when it sees a CI variable (CI, CONTINUOUS_INTEGRATION)
 * at load time; here stdin and stdout are a terminal, so it must draw every frame: the variables are
 * hidden from it while it loads, then put back.
 */
async function loadAppOnTerminal(): Promise<typeof import('../../tui/run.js')> {
  const names = ['CI', 'CONTINUOUS_INTEGRATION'] as const;
  const saved = names.map((n) => process.env[n]);
  for (const n of names) delete process.env[n];
  try {
    return await import('../../tui/run.js');
  } finally {
    names.forEach((n, i) => {
      if (saved[i] !== undefined) process.env[n] = saved[i];
    });
  }
}

export function registerUi(program: Command, ctx: CommandContext): void {
  program
    .command('ui [target]')
    .summary('open the interactive app (plan, read back, shape)')
    .description(
      [
        'Open the interactive app in this terminal: plan a message, read back a',
        'recording, check the keying shape. TARGET is a WAV recording (opened at once)',
        'or a folder of them; by default ./recordings, or the demo recordings bundled',
        'with keyform when there is no such folder. Every figure the app shows is also',
        'available from encode, decode, timing and shape (with --json). Keys are shown',
        'in the footer; ? lists them all; q or Ctrl-C leaves.',
      ].join('\n'),
    )
    .addHelpText(
      'after',
      `
Examples:
  keyform ui                                    the app on ./recordings (or the bundled ones)
  keyform ui recordings/beacon-after-fix.wav    open a recording in Read back

Transmitting needs a licence and must follow your local regulations; isolate keying lines.`,
    )
    .action(async (target?: string) => {
      ctx.setExitCode(await runUi(ctx, target));
    });
}
