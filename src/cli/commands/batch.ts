import type { Command } from 'commander';
import type { CommandContext } from '../io.js';

/** Placeholder: the 'batch' command is being built. */
export function registerBatch(program: Command, ctx: CommandContext): void {
  program
    .command('batch')
    .description('(batch: not built yet)')
    .action(() => {
      ctx.warn('batch is not built yet');
      ctx.setExitCode(1);
    });
}
