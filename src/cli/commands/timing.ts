import type { Command } from 'commander';
import type { CommandContext } from '../io.js';

/** Placeholder: the 'timing' command is being built. */
export function registerTiming(program: Command, ctx: CommandContext): void {
  program
    .command('timing')
    .description('(timing: not built yet)')
    .action(() => {
      ctx.warn('timing is not built yet');
      ctx.setExitCode(1);
    });
}
