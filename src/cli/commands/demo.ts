import type { Command } from 'commander';
import { planKeying } from '../../core/timing/plan.js';
import type { CommandContext } from '../io.js';

/** The demo beacon message of our invented club station. */
export const DEMO_BEACON = 'VVV Q7ZKT/B JO01 <AR>';

export function registerDemo(program: Command, ctx: CommandContext): void {
  program
    .command('demo')
    .description('a short tour: plan the demo beacon message and summarise it')
    .action(() => {
      const plan = planKeying(DEMO_BEACON, { wpm: 18 });
      ctx.io.stdout.write(
        `Demo beacon "${plan.text}" at ${plan.wpm} wpm: unit ${plan.unitMs.toFixed(1)} ms, ` +
          `${plan.characterCount} characters, ${plan.marks.length} marks, ${(plan.totalMs / 1000).toFixed(2)} s.\n`,
      );
    });
}
