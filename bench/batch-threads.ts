/**
 * Where a batch's CPU time goes, thread by thread (Linux: /proc/PID/task/TID/stat, sampled every
 * 50 ms until the process ends): the process's main thread, the worker threads (the `jobs` busiest
 * other threads) and the engine's background threads (compiler and garbage collector), for --jobs 1
 * and --jobs 2 over the same folder. Shows whether the workers themselves scale, and how much CPU
 * the background threads take from the second core. (With as many workers as cores, `batch` has the
 * engine compile on the worker threads, so the compiler's time then shows in the worker column.)
 *
 *   npx tsx bench/batch-threads.ts FOLDER [--rounds R] [--node-flags "--some-v8-flag ..."]
 *   (FOLDER: e.g. the throughput bench's batch-6x60min, kept with `npm run bench:throughput -- --keep --dir DIR`)
 */
import { spawn } from 'node:child_process';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const folder = process.argv[2];
if (!folder || !existsSync(folder)) {
  process.stderr.write('usage: npx tsx bench/batch-threads.ts FOLDER [--rounds R]\n');
  process.exit(2);
}
const rounds = process.argv.includes('--rounds') ? Number(process.argv[process.argv.indexOf('--rounds') + 1]) : 2;
/** Extra flags for node/V8 (e.g. --node-flags "--single-threaded-gc"), to compare engine settings. */
const nodeFlags = process.argv.includes('--node-flags') ? process.argv[process.argv.indexOf('--node-flags') + 1]!.split(' ').filter(Boolean) : [];
const bin = fileURLToPath(new URL('../dist/cli/bin.js', import.meta.url));
const TICK_S = 0.01; // USER_HZ = 100 on Linux

/** utime + stime of each thread of `pid` [ticks]. */
function threadTicks(pid: number): Map<number, number> {
  const out = new Map<number, number>();
  let tids: string[];
  try {
    tids = readdirSync(`/proc/${pid}/task`);
  } catch {
    return out;
  }
  for (const tid of tids) {
    try {
      const stat = readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8');
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      out.set(Number(tid), Number(fields[11]) + Number(fields[12]));
    } catch {
      // the thread ended between listing and reading
    }
  }
  return out;
}

async function run(jobs: number): Promise<{ wallS: number; mainS: number; workersS: number[]; backgroundS: number }> {
  const t0 = performance.now();
  const child = spawn(process.execPath, [...nodeFlags, bin, 'batch', folder!, '--jobs', String(jobs), '--json'], { stdio: ['ignore', 'ignore', 'ignore'] });
  const last = new Map<number, number>();
  const timer = setInterval(() => {
    for (const [tid, t] of threadTicks(child.pid!)) last.set(tid, t);
  }, 50);
  await new Promise((resolve) => child.on('exit', resolve));
  clearInterval(timer);
  const wallS = (performance.now() - t0) / 1000;
  const mainS = (last.get(child.pid!) ?? 0) * TICK_S;
  const others = [...last].filter(([tid]) => tid !== child.pid).map(([, t]) => t * TICK_S).sort((a, b) => b - a);
  return { wallS, mainS, workersS: others.slice(0, jobs), backgroundS: others.slice(jobs).reduce((a, b) => a + b, 0) };
}

process.stdout.write(`batch over ${folder}: CPU seconds by thread (sampled every 50 ms, so the last 50 ms of a thread may be missing)\n`);
process.stdout.write('| jobs | wall | main thread | worker threads | background (compiler, GC) | all |\n|---|---|---|---|---|---|\n');
for (let r = 0; r < rounds; r++) {
  for (const jobs of [1, 2]) {
    const x = await run(jobs);
    const workers = x.workersS.reduce((a, b) => a + b, 0);
    process.stdout.write(
      `| ${jobs} | ${x.wallS.toFixed(2)} s | ${x.mainS.toFixed(2)} s | ${x.workersS.map((w) => w.toFixed(2)).join(' + ')} = ${workers.toFixed(2)} s | ${x.backgroundS.toFixed(2)} s | ${(x.mainS + workers + x.backgroundS).toFixed(2)} s |\n`,
    );
  }
}
