/**
 * What a batch worker compiles, and for which part of keyform: the files of a folder analysed one
 * after another in one fresh Node process, as one worker thread does them (decode, timing report,
 * shape analysis of the first 60 s), with the optimising compiler on the thread itself as `batch`
 * runs a worker per core (--no-concurrent-recompilation) and V8's --trace-opt on. Each compilation's
 * time is summed per file and per module: the module is found by looking the compiled function's
 * name up among the functions and methods that the built modules a worker loads (dist/, less the
 * commands and the app) and fft.js define; a name
 * defined in several modules counts for all of them, shown as "a | b". Every worker thread pays this
 * compiling for itself (a WebAssembly module's machine code, by contrast, is shared by the threads).
 *
 *   npx tsx bench/worker-compile.ts FOLDER [--files N] [--top N]   (runs the built code in dist/: npm run build)
 *   (FOLDER: e.g. the throughput bench's batch-6x60min, kept with `npm run bench:throughput -- --keep --dir DIR`)
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

const folder = process.argv[2];
if (!folder || !existsSync(folder)) {
  process.stderr.write('usage: npx tsx bench/worker-compile.ts FOLDER [--files N] [--top N]\n');
  process.exit(2);
}
const argAfter = (name: string, fallback: number): number =>
  process.argv.includes(name) ? Number(process.argv[process.argv.indexOf(name) + 1]) : fallback;
const count = argAfter('--files', 3);
const top = argAfter('--top', 15);
const files = readdirSync(folder)
  .filter((f) => f.toLowerCase().endsWith('.wav'))
  .sort()
  .slice(0, count)
  .map((f) => join(folder, f));
const root = fileURLToPath(new URL('../', import.meta.url));
const dist = join(root, 'dist');
if (!existsSync(join(dist, 'cli/analyze-recording.js'))) {
  process.stderr.write('dist/ is not built: npm run build\n');
  process.exit(2);
}

// A marker line between files, so that each compilation is counted for the file it happened in.
const child = `
const { analyzeRecording } = await import(${JSON.stringify(join(dist, 'cli/analyze-recording.js'))});
for (const file of ${JSON.stringify(files)}) {
  const t = performance.now();
  await analyzeRecording(file, {});
  console.log('@@file ' + JSON.stringify({ file, ms: performance.now() - t }));
}`;
const r = spawnSync(process.execPath, ['--no-concurrent-recompilation', '--trace-opt', '--input-type=module', '-e', child], {
  encoding: 'utf8',
  maxBuffer: 1 << 28,
});
if (r.status !== 0) {
  process.stderr.write(`child failed: ${r.stderr.trim().split('\n').slice(-3).join(' / ')}\n`);
  process.exit(1);
}

/** Function and method names defined in each JavaScript file under `dir`. */
function definitions(dir: string, into: Map<string, Set<string>>): void {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    // The commands' modules and the app are not loaded by a worker (dist/cli/batch-worker.js).
    if (entry.isDirectory() && !['commands', 'tui'].includes(entry.name)) definitions(path, into);
    else if (entry.name.endsWith('.js')) {
      const text = readFileSync(path, 'utf8');
      const module = relative(root, path);
      // `function name(`, `name = function (`, and class methods / getters at the start of a line.
      const patterns = [/function\*?\s+([\w$]+)\s*\(/g, /([\w$]+)\s*=\s*function\b/g, /^\s+(?:static\s+|async\s+|get\s+|set\s+)*([\w$]+)\s*\([^)]*\)\s*\{/gm];
      for (const re of patterns) {
        for (const m of text.matchAll(re)) {
          const name = m[1]!;
          if (['if', 'for', 'while', 'switch', 'catch', 'function', 'return'].includes(name)) continue;
          if (!into.has(name)) into.set(name, new Set());
          into.get(name)!.add(module);
        }
      }
    }
  }
}
const where = new Map<string, Set<string>>();
definitions(dist, where);
definitions(dirname(createRequire(import.meta.url).resolve('fft.js')), where);

interface FileSums {
  file: string;
  ms: number;
  compileMs: number;
  compilations: number;
}
const perFile: FileSums[] = [];
const perModule = new Map<string, number>();
const perFunction = new Map<string, { ms: number; n: number }>();
let current: FileSums = { file: '', ms: 0, compileMs: 0, compilations: 0 };
// e.g. [completed optimizing 0x… <JSFunction commit (sfi = 0x…)> (target TURBOFAN) - took 0.180, 12.504, 0.090 ms]
const done = /completed (?:optimizing|compiling) .*?<JSFunction (\S*) .*?took ([\d.]+), ([\d.]+), ([\d.]+) ms/;
for (const line of r.stdout.split('\n')) {
  if (line.startsWith('@@file ')) {
    const { file, ms } = JSON.parse(line.slice(7)) as { file: string; ms: number };
    perFile.push({ ...current, file, ms });
    current = { file: '', ms: 0, compileMs: 0, compilations: 0 };
    continue;
  }
  const m = done.exec(line);
  if (!m) continue;
  const ms = Number(m[2]) + Number(m[3]) + Number(m[4]);
  const name = m[1]!;
  current.compileMs += ms;
  current.compilations++;
  const f = perFunction.get(name) ?? { ms: 0, n: 0 };
  perFunction.set(name, { ms: f.ms + ms, n: f.n + 1 });
  const modules = where.get(name);
  const key = modules ? [...modules].sort().join(' | ') : `(${name || 'anonymous'}: not found)`;
  perModule.set(key, (perModule.get(key) ?? 0) + ms);
}

const total = perFile.reduce((s, f) => s + f.compileMs, 0);
const n = perFile.reduce((s, f) => s + f.compilations, 0);
process.stdout.write(`${files.length} files of ${folder}, analysed one after another in one fresh process, compiler on the thread\n\n`);
process.stdout.write('| file | analysis | compiling | compilations |\n|---|---|---|---|\n');
for (const f of perFile) {
  process.stdout.write(`| ${f.file.split('/').pop()} | ${Math.round(f.ms)} ms | ${Math.round(f.compileMs)} ms | ${f.compilations} |\n`);
}
process.stdout.write(`| all | ${Math.round(perFile.reduce((s, f) => s + f.ms, 0))} ms | ${Math.round(total)} ms | ${n} |\n`);
process.stdout.write(`\ncompiling by module (top ${top})\n| module | compiling | share |\n|---|---|---|\n`);
for (const [module, ms] of [...perModule].sort((a, b) => b[1] - a[1]).slice(0, top)) {
  process.stdout.write(`| ${module} | ${ms.toFixed(1)} ms | ${((100 * ms) / total).toFixed(0)} % |\n`);
}
process.stdout.write(`\ncompiling by function (top ${top})\n| function | compiling | compilations |\n|---|---|---|\n`);
for (const [name, f] of [...perFunction].sort((a, b) => b[1].ms - a[1].ms).slice(0, top)) {
  process.stdout.write(`| ${name || '(anonymous)'} | ${f.ms.toFixed(1)} ms | ${f.n} |\n`);
}
