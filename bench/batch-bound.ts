/**
 * How fast two workers can be at best on this machine, with these files: the batch's own worker
 * (dist/cli/batch-worker.js, the same analysis and the same scheduling as `keyform batch`) run with
 * workers that are already warm — each has analysed the whole folder before the clock starts, so
 * its engine has compiled keyform's code — against the same with workers that start cold, as
 * `keyform batch` does. Warm workers are what an implementation would give whose workers needed no
 * compiling of their own (all of it ahead of time, or shared between threads): the speed-up they
 * reach is the bound that the files' unequal lengths of work (the last file leaves a core idle) and
 * the machine's two cores (two busy threads slow each other) leave, whatever keyform's code does.
 *
 *   npx tsx bench/batch-bound.ts FOLDER [--rounds R] [--warm-passes W] [--passes P]
 *   (defaults 4, 2, 2: two warm-up passes, as with two workers each sees half the folder per pass;
 *   FOLDER: e.g. the throughput bench's batch-6x60min, kept with `npm run bench:throughput -- --keep --dir DIR`)
 *
 * Each measurement runs in a fresh child process (one pool of 1 or 2 workers). Rounds alternate
 * which of the two worker counts runs first. Prints a table per round and the medians.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { collectInputs, compileOnWorkerThreadsWhenBusy, workerPath, workOrder } from '../src/cli/commands/batch.js';
import { median } from '../src/core/measure/timing-stats.js';

interface ChildOut {
  /** Wall time of each timed pass over the folder [s]. */
  passS: number[];
  /** Wall time of the warm-up passes [s] (the first is a cold batch, as `keyform batch` runs). */
  warmS: number[];
}

// ---------------------------------------------------------------- child: one pool, warm-up, timed passes
if (process.argv[2] === '--child') {
  const [jobsArg, folder, warmArg, passesArg] = process.argv.slice(3);
  const jobs = Number(jobsArg);
  // The files, their order and the engine's settings as `keyform batch` has them.
  const files = collectInputs([folder!]);
  const queue = workOrder(files, files.map((f) => statSync(f).size), jobs);
  compileOnWorkerThreadsWhenBusy(jobs);
  const { Piscina } = await import('piscina');
  // execArgv: [] so that the workers do not inherit this process's TypeScript loader (the CLI's do not have one).
  const pool = new Piscina({ filename: workerPath(), minThreads: jobs, maxThreads: jobs, idleTimeout: 60_000, execArgv: [] });
  const options = { shapeSeconds: 60, skipShape: false };
  const pass = async (): Promise<number> => {
    const t0 = performance.now();
    let next = 0;
    const lane = async (): Promise<void> => {
      while (next < queue.length) {
        const path = queue[next++]!;
        const row = (await pool.run({ path, options })) as { verdict: string };
        if (row.verdict === 'error') throw new Error(`${path}: error row`);
      }
    };
    await Promise.all(Array.from({ length: jobs }, lane));
    return (performance.now() - t0) / 1000;
  };
  const out: ChildOut = { passS: [], warmS: [] };
  for (let i = 0; i < Number(warmArg); i++) out.warmS.push(await pass());
  for (let i = 0; i < Number(passesArg); i++) out.passS.push(await pass());
  await pool.destroy();
  process.stdout.write(`${JSON.stringify(out)}\n`);
  process.exit(0);
}

// ---------------------------------------------------------------- main
const folder = process.argv[2];
if (!folder || !existsSync(folder)) {
  process.stderr.write('usage: npx tsx bench/batch-bound.ts FOLDER [--rounds R] [--warm-passes W] [--passes P]\n');
  process.exit(2);
}
workerPath(); // says to run npm run build when the worker is not built
const numberArg = (name: string, fallback: number): number => (process.argv.includes(name) ? Number(process.argv[process.argv.indexOf(name) + 1]) : fallback);
const rounds = numberArg('--rounds', 4);
const warmPasses = numberArg('--warm-passes', 2);
const passes = numberArg('--passes', 2);
const self = fileURLToPath(import.meta.url);

function runChild(jobs: number): ChildOut {
  const r = spawnSync(process.execPath, ['--import', 'tsx', self, '--child', String(jobs), folder!, String(warmPasses), String(passes)], { encoding: 'utf8', maxBuffer: 1 << 20 });
  if (r.status !== 0) throw new Error(`child (${jobs} workers) failed: ${r.stderr.trim().split('\n').slice(-3).join(' / ')}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as ChildOut;
}

process.stdout.write(`batch bound: ${folder}, ${rounds} rounds; cold = a pool's first pass over the folder (as keyform batch), warm = the fastest of ${passes} passes after ${warmPasses} warm-up passes\n`);
process.stdout.write('| round | cold 1 | cold 2 | cold speed-up | warm 1 | warm 2 | warm speed-up |\n|---|---|---|---|---|---|---|\n');
const cold: number[] = [];
const warm: number[] = [];
for (let i = 0; i < rounds; i++) {
  let one: ChildOut;
  let two: ChildOut;
  if (i % 2 === 0) {
    one = runChild(1);
    two = runChild(2);
  } else {
    two = runChild(2);
    one = runChild(1);
  }
  const [cold1, cold2] = [one.warmS[0]!, two.warmS[0]!];
  const [warm1, warm2] = [Math.min(...one.passS), Math.min(...two.passS)];
  cold.push(cold1 / cold2);
  warm.push(warm1 / warm2);
  process.stdout.write(
    `| ${i + 1} | ${cold1.toFixed(2)} s | ${cold2.toFixed(2)} s | ${(cold1 / cold2).toFixed(2)}× | ${warm1.toFixed(2)} s | ${warm2.toFixed(2)} s | ${(warm1 / warm2).toFixed(2)}× |\n`,
  );
}
process.stdout.write(`medians: cold ${median(cold).toFixed(2)}×, warm ${median(warm).toFixed(2)}× (warm at 1.7× or more in ${warm.filter((x) => x >= 1.7).length} of ${rounds} rounds)\n`);
