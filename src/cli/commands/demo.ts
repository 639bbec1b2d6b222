import { existsSync, readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Command } from 'commander';
import { planKeying } from '../../core/timing/plan.js';
import { analyzeRecording } from '../analyze-recording.js';
import { planToJson } from '../../io/export.js';
import { formatJson } from '../../io/json.js';
import type { CommandContext } from '../io.js';
import { runUi } from './ui.js';

/** The demo beacon message of our invented club station. */
export const DEMO_BEACON = 'VVV Q7ZKT/B JO01 <AR>';

/** The bundled demo recordings: ./recordings if present, else the folder shipped with keyform. */
export function demoFolder(): string {
  if (existsSync('recordings')) return 'recordings';
  return resolve(dirname(fileURLToPath(import.meta.url)), '../../../recordings');
}

function wavFiles(folder: string): string[] {
  return readdirSync(folder).filter((f) => f.toLowerCase().endsWith('.wav')).sort();
}

/**
 * The tour `npm start` runs: on a terminal, the interactive app on the demo recordings; elsewhere
 * (a pipe, CI) a plain summary — the demo beacon's plan, then each demo recording read back.
 */
export async function runDemo(ctx: CommandContext, options: { json?: boolean } = {}): Promise<number> {
  const folder = demoFolder();
  if (options.json) {
    const plan = planKeying(DEMO_BEACON, { wpm: 18 });
    const rows = [];
    for (const f of wavFiles(folder)) rows.push(await analyzeRecording(join(folder, f), {}));
    ctx.io.stdout.write(formatJson({ plan: planToJson(plan), recordings: rows }));
    return 0;
  }
  if (ctx.io.stdout.isTTY && ctx.io.stdin.isTTY) return runUi(ctx, folder);
  const out = (s: string): void => void ctx.io.stdout.write(s + '\n');
  const plan = planKeying(DEMO_BEACON, { wpm: 18 });
  out(`Plan: "${plan.text}" at ${plan.wpm} wpm: unit ${plan.unitMs.toFixed(1)} ms, ${plan.characterCount} characters, ` +
    `${plan.marks.length} marks, ${(plan.totalMs / 1000).toFixed(2)} s  (keyform encode "${DEMO_BEACON}" --wpm 18)`);
  out('');
  out(`Read back and shape of the demo recordings in ${folder}/ (keyform batch ${folder}):`);
  for (const f of wavFiles(folder)) {
    const row = await analyzeRecording(join(folder, f), {});
    const figures = [
      row.wpm !== null ? `${row.wpm.toFixed(1)} wpm` : null,
      row.toneHz !== null ? `${Math.round(row.toneHz)} Hz` : null,
      row.snrDb !== null ? `SNR ${row.snrDb.toFixed(1)} dB` : null,
      row.riseMs !== null ? `rise ${row.riseMs.toFixed(1)} ms` : null,
      row.occupiedBandwidthHz !== null ? `occupied ${Math.round(row.occupiedBandwidthHz)} Hz` : null,
      row.verdict,
    ].filter((x) => x !== null);
    out(`  ${f}`);
    out(`    ${row.error ?? (row.text || '(no keyed signal)')}`);
    out(`    ${figures.join(' · ')}`);
  }
  out('');
  out('In a terminal, `keyform` opens the interactive app. Transmitting needs a licence; follow your local regulations.');
  return 0;
}

export function registerDemo(program: Command, ctx: CommandContext): void {
  program
    .command('demo')
    .description('the tour: the interactive app on the demo recordings (a plain summary when not on a terminal)')
    .option('--json', 'print the demo plan and the read-back rows as JSON (never opens the app)')
    .action(async (o: { json?: boolean }) => {
      ctx.setExitCode(await runDemo(ctx, o));
    });
}
