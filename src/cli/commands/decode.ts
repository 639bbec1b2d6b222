import type { Command } from 'commander';
import type { CommandContext } from '../io.js';

/** Placeholder: the 'decode' command is being built. */
export function registerDecode(program: Command, ctx: CommandContext): void {
  program
    .command('decode')
    .description('(decode: not built yet)')
    .action(() => {
      ctx.warn('decode is not built yet');
      ctx.setExitCode(1);
    });
}
