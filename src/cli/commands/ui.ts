import type { Command } from 'commander';
import type { CommandContext } from '../io.js';

/** Opens the interactive app (placeholder until the app is built). */
export async function runUi(ctx: CommandContext, _target: string | undefined): Promise<number> {
  ctx.warn('the interactive app is not built yet; see keyform --help');
  return 1;
}

export function registerUi(program: Command, ctx: CommandContext): void {
  program
    .command('ui [target]')
    .description('open the interactive app on a recording or folder')
    .action(async (target?: string) => {
      ctx.setExitCode(await runUi(ctx, target));
    });
}
