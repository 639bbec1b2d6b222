import type { Command } from 'commander';
import type { CommandContext } from '../io.js';

/** Placeholder: the 'shape' command is being built. */
export function registerShape(program: Command, ctx: CommandContext): void {
  program
    .command('shape')
    .description('(shape: not built yet)')
    .action(() => {
      ctx.warn('shape is not built yet');
      ctx.setExitCode(1);
    });
}
