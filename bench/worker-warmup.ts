/**
 * What a batch worker's first files cost: the files of a folder analysed one after another in one
 * fresh Node process, as one worker thread does them, with the time of each stage per file (decode,
 * timing report, shape analysis of the first 60 s). Twice: with the engine's default (the optimising
 * compiler on background threads, as `batch` runs one worker) and with
 * --no-concurrent-recompilation (the compiler on the thread itself, as `batch` runs a worker per
 * core). The first files are slower than the rest by the engine's warm-up: code that runs slowly
 * until it is compiled, and the compiling. Every worker pays it, for the code it runs.
 *
 *   npx tsx bench/worker-warmup.ts FOLDER [--files N]   (runs the built code in dist/: npm run build)
 *   (FOLDER: e.g. the throughput bench's batch-6x60min, kept with `npm run bench:throughput -- --keep --dir DIR`)
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const folder = process.argv[2];
if (!folder || !existsSync(folder)) {
  process.stderr.write('usage: npx tsx bench/worker-warmup.ts FOLDER [--files N]\n');
  process.exit(2);
}
const count = process.argv.includes('--files') ? Number(process.argv[process.argv.indexOf('--files') + 1]) : 6;
const files = readdirSync(folder)
  .filter((f) => f.toLowerCase().endsWith('.wav'))
  .sort()
  .slice(0, count)
  .map((f) => join(folder, f));
const dist = fileURLToPath(new URL('../dist/', import.meta.url));
if (!existsSync(join(dist, 'cli/analyze-recording.js'))) {
  process.stderr.write('dist/ is not built: npm run build\n');
  process.exit(2);
}

// The stages of the batch analysis (src/cli/analyze-recording.ts, analyzeInto), timed one by one.
const child = `
const dist = ${JSON.stringify(dist)};
const { openAudio } = await import(dist + 'io/audio-source.js');
const { decodeAudioSource } = await import(dist + 'cli/analyze-recording.js');
const { measureTiming } = await import(dist + 'core/measure/timing.js');
const { measureShape } = await import(dist + 'core/measure/shape.js');
for (const file of ${JSON.stringify(files)}) {
  let t = performance.now();
  const audio = await openAudio(file, { streamAboveBytes: 0, reuseChunks: true });
  const { result, excerpt } = await decodeAudioSource(audio, { keepSeconds: 60 });
  const decodeMs = performance.now() - t;
  t = performance.now();
  if (result.marks.length >= 2) measureTiming(result);
  const timingMs = performance.now() - t;
  t = performance.now();
  if (excerpt.length > 0 && result.marks.length > 0) {
    measureShape(excerpt, audio.sampleRate, { toneHz: result.toneHz, unitMs: result.unitMs ?? undefined, timing: { marks: result.marks, unitMs: result.unitMs ?? null }, findShortestRise: false });
  }
  const shapeMs = performance.now() - t;
  console.log(JSON.stringify({ file, decodeMs, timingMs, shapeMs }));
}`;

interface Stage {
  file: string;
  decodeMs: number;
  timingMs: number;
  shapeMs: number;
}

function run(flags: string[]): Stage[] {
  const r = spawnSync(process.execPath, [...flags, '--input-type=module', '-e', child], { encoding: 'utf8', maxBuffer: 1 << 24 });
  if (r.status !== 0) throw new Error(`child failed: ${r.stderr.trim().split('\n').slice(-3).join(' / ')}`);
  return r.stdout.trim().split('\n').map((line) => JSON.parse(line) as Stage);
}

const ms = (x: number): string => `${Math.round(x)} ms`;
process.stdout.write(`${files.length} files of ${folder}, analysed one after another in one fresh process (as one batch worker)\n`);
for (const [label, flags] of [
  ['compiler on background threads (default; batch with fewer workers than cores)', []],
  ['compiler on the thread itself (--no-concurrent-recompilation; batch with a worker per core)', ['--no-concurrent-recompilation']],
] as const) {
  const stages = run([...flags]);
  process.stdout.write(`\n${label}\n| file | decode | timing | shape | all |\n|---|---|---|---|---|\n`);
  for (const s of stages) {
    process.stdout.write(`| ${s.file.split('/').pop()} | ${ms(s.decodeMs)} | ${ms(s.timingMs)} | ${ms(s.shapeMs)} | ${ms(s.decodeMs + s.timingMs + s.shapeMs)} |\n`);
  }
}
