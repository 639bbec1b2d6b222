import { Command, CommanderError } from 'commander';
import { InputError } from '../core/errors.js';
import type { CliIo, CommandContext } from './io.js';
import { registerUi, runUi } from './commands/ui.js';

export const VERSION = '0.1.0';

type Register = (program: Command, ctx: CommandContext) => void;

/**
 * The commands, in the order help lists them, each loaded when needed: a command's module brings
 * the signal code it runs (up to 0.1 s to load), so `keyform batch …` loads batch alone rather
 * than the decoder, timing and shape code too. Help and unknown names load them all.
 */
const COMMANDS: Record<string, () => Promise<Register>> = {
  encode: async () => (await import('./commands/encode.js')).registerEncode,
  decode: async () => (await import('./commands/decode.js')).registerDecode,
  timing: async () => (await import('./commands/timing.js')).registerTiming,
  shape: async () => (await import('./commands/shape.js')).registerShape,
  batch: async () => (await import('./commands/batch.js')).registerBatch,
  ui: async () => registerUi,
  demo: async () => (await import('./commands/demo.js')).registerDemo,
};

/**
 * Runs the keyform command line. Never calls process.exit: returns the exit code
 * (0 ok, 1 a check did not pass, 2 bad usage or input, 130 interrupted).
 */
export async function main(argv: string[], io: CliIo): Promise<number> {
  let exitCode = 0;
  const debug = argv.includes('--debug');
  argv = argv.filter((a) => a !== '--debug');
  const ctx: CommandContext = {
    io,
    setExitCode: (code) => {
      exitCode = Math.max(exitCode, code);
    },
    warn: (message) => {
      io.stderr.write(`keyform: ${message}\n`);
    },
    color: Boolean(io.stdout.isTTY) && io.env.NO_COLOR === undefined,
  };

  const program = new Command('keyform')
    .description('Plan, read back and check the shape of on-off keyed (Morse/CW) transmissions.')
    .version(VERSION, '-V, --version')
    .showSuggestionAfterError(true)
    .configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
      outputError: (s, write) => write(s.replace(/^error: /, 'keyform: ')),
    })
    .exitOverride()
    .addHelpText(
      'after',
      `
Try:
  keyform encode "Q7ZKT TEST" --wpm 20           keying plan as JSON
  keyform encode "Q7ZKT BEACON" --out beacon.wav  shaped-edge audio
  keyform decode recordings/beacon-after-fix.wav  read a recording back
  keyform                                         the interactive app (in a terminal)

Transmitting needs a licence and must follow your local regulations; isolate keying lines.`,
    );

  const named = argv[0] !== undefined && Object.hasOwn(COMMANDS, argv[0]) ? [argv[0]] : Object.keys(COMMANDS);
  for (const register of await Promise.all(named.map((name) => COMMANDS[name]!()))) register(program, ctx);
  for (const cmd of program.commands) cmd.exitOverride().configureOutput(program.configureOutput());

  try {
    if (argv.length === 0) {
      if (io.stdout.isTTY && io.stdin.isTTY) return await runUi(ctx, undefined);
      program.outputHelp();
      return 0;
    }
    await program.parseAsync(argv, { from: 'user' });
    return exitCode;
  } catch (err) {
    if (err instanceof CommanderError) {
      if (err.code === 'commander.helpDisplayed' || err.code === 'commander.version' || err.code === 'commander.help') return 0;
      if (err.exitCode === 0) return 0;
      return 2;
    }
    if (err instanceof InputError) {
      io.stderr.write(`keyform: ${err.message}\n`);
      return err.exitCode;
    }
    const e = err as Error;
    io.stderr.write(`keyform: ${e?.message ?? String(err)}\n`);
    if (debug && e?.stack) io.stderr.write(`${e.stack}\n`);
    return 1;
  }
}
