/**
 * Throughput benchmark: how fast keyform reads and decodes long recordings, how much memory it
 * needs, and how batch work scales over worker threads. Prints a table.
 *
 *   npm run bench:throughput                      one hour at 48 kHz and at 8 kHz (the issue's case)
 *   npx tsx bench/throughput.ts --minutes 10      shorter, for a quick look
 *   options: --minutes M  --repeats R  --batch 6x10,6x60,12x60,24x60,6x60@48 (folders of N files × M minutes, 8 kHz
 *            unless @48 says 48 kHz)  --batch-repeats R (default 5)  --dir DIR  --keep
 *
 * Test audio (deterministic, seeded): traffic of 20–25 WPM between invented stations, 5 ms raised-cosine
 * edges, 700 Hz tone, white Gaussian noise at +5 dB SNR (key-down carrier power over noise power in
 * 2500 Hz, as noiseSigmaForSnr defines it), written to disk message by message (never the whole hour in memory).
 *
 * Each measurement runs in a child process so its peak resident memory (process.resourceUsage().maxRSS)
 * is its own: "read" = read the file through the streaming path and convert to float (the floor),
 * "decode" = the same plus the streaming receiver. Batch speed-up runs the built CLI (dist/) with
 * --jobs 1 and --jobs 2 over the same files, for a folder of short files and four of long ones (6, 12
 * and 24 one-hour files, and six at 48 kHz, as a sound card records): each worker thread compiles the code for itself (the
 * engine's optimising compiler) before it runs at full speed, a cost per worker that a short batch
 * does not hide. Rounds alternate which of the two runs first; the summary gives the median round.
 * Each folder is read once before its rounds (into the operating system's cache), and one-worker runs
 * that used under 90 % of a core — they waited, on a machine whose cache cannot hold the folder, for
 * the disk — are counted under the table.
 */
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, readSync, readdirSync, renameSync, rmSync, statSync, writeFileSync, writeSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { addNoise, noiseSigmaForSnr, seededRandom } from '../src/core/signal/noise.js';
import { synthesizeTone } from '../src/core/signal/synth.js';
import { planKeying } from '../src/core/timing/plan.js';
import { StreamDecoder } from '../src/core/receive/index.js';
import { openAudio } from '../src/io/audio-source.js';
import { median } from '../src/core/measure/timing-stats.js';

const SNR_DB = 5;
const LEVEL_DB = -20; // low enough that +5 dB SNR noise at 48 kHz stays far from clipping in 16 bits
const TONE_HZ = 700;
const SEED = 7;
const WORDS = ['CQ', 'DE', 'Q7ZKT', 'Q3ABC', 'Q9XYZ', 'Q5MLP', 'TEST', 'BEACON', 'RST', '599', '579', 'QTH', 'JO01', 'NAME', 'ANN', 'BOB', 'TNX', 'FB', 'PSE', 'K', 'KN', '73', 'WX', 'CLOUDY', 'RIG', 'QRP', '5W', 'ANT', 'DIPOLE', 'HR', 'UR', 'OM', '<BT>', '<AR>'];

// ---------------------------------------------------------------- child mode
if (process.argv[2] === '--child') {
  await child(process.argv[3] as 'read' | 'decode', process.argv[4]!);
  process.exit(0);
}

async function child(mode: 'read' | 'decode', path: string): Promise<void> {
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const audio = await openAudio(path, { streamAboveBytes: 0, reuseChunks: true }); // as `keyform decode` reads a long file
  const decoder = mode === 'decode' ? new StreamDecoder(audio.sampleRate) : null;
  let frames = 0;
  let checksum = 0;
  for await (const [ch] of audio.chunks()) {
    frames += ch!.length;
    if (decoder) decoder.push(ch!);
    else checksum += ch![0]!; // touch the data so the read cannot be optimised away
  }
  const result = decoder?.finish();
  const wallS = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  process.stdout.write(
    JSON.stringify({
      audioS: frames / audio.sampleRate,
      wallS,
      cpuS: (cpu.user + cpu.system) / 1e6,
      maxRssMB: process.resourceUsage().maxRSS / 1024,
      characters: result ? result.characters.length : null,
      wpm: result?.wpm ?? null,
      snrDb: result?.snrDb ?? null,
      checksum,
    }),
  );
}

// ---------------------------------------------------------------- generation
function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(name);
  return i > 0 ? Number(process.argv[i + 1]) : fallback;
}

/** Writes `seconds` of seeded traffic as a 16-bit mono WAV, message by message. Returns characters sent. */
function generate(path: string, sampleRate: number, seconds: number, seed: number): number {
  const totalFrames = Math.round(seconds * sampleRate);
  const header = Buffer.alloc(44);
  header.write('RIFF', 0, 'ascii');
  header.writeUInt32LE(36 + totalFrames * 2, 4);
  header.write('WAVEfmt ', 8, 'ascii');
  header.writeUInt32LE(16, 16);
  header.writeUInt16LE(1, 20);
  header.writeUInt16LE(1, 22);
  header.writeUInt32LE(sampleRate, 24);
  header.writeUInt32LE(sampleRate * 2, 28);
  header.writeUInt16LE(2, 32);
  header.writeUInt16LE(16, 34);
  header.write('data', 36, 'ascii');
  header.writeUInt32LE(totalFrames * 2, 40);
  const tmp = `${path}.tmp`;
  const fd = openSync(tmp, 'w');
  writeSync(fd, header);
  const random = seededRandom(seed);
  const amplitude = 10 ** (LEVEL_DB / 20);
  const sigma = noiseSigmaForSnr(amplitude, sampleRate, SNR_DB);
  let written = 0;
  let characters = 0;
  for (let m = 0; written < totalFrames; m++) {
    const words = Array.from({ length: 6 + Math.floor(random() * 8) }, () => WORDS[Math.floor(random() * WORDS.length)]!);
    const wpm = 20 + Math.round(random() * 10) / 2; // 20…25 WPM in 0.5 steps
    const plan = planKeying(words.join(' '), { wpm });
    characters += plan.characterCount;
    const tone = synthesizeTone({
      marks: plan.marks, sampleRate, toneHz: TONE_HZ, levelDb: LEVEL_DB, edge: 'raised-cosine', riseMs: 5,
      padMs: 500 + Math.floor(random() * 1500), // 0.5–2 s of noise only between messages
    });
    const samples = addNoise(tone.samples, sigma, seed * 100_003 + m);
    const n = Math.min(samples.length, totalFrames - written);
    const pcm = new Int16Array(n);
    for (let i = 0; i < n; i++) pcm[i] = Math.round(Math.max(-1, Math.min(1, samples[i]!)) * 32767);
    writeSync(fd, new Uint8Array(pcm.buffer));
    written += n;
  }
  closeSync(fd);
  renameSync(tmp, path);
  return characters;
}

interface ChildResult { audioS: number; wallS: number; cpuS: number; maxRssMB: number; characters: number | null; wpm: number | null; snrDb: number | null }

function runChild(mode: 'read' | 'decode', path: string): ChildResult {
  const self = fileURLToPath(import.meta.url);
  const r = spawnSync(process.execPath, [...process.execArgv, self, '--child', mode, path], { encoding: 'utf8', maxBuffer: 1 << 20 });
  if (r.status !== 0) throw new Error(`child ${mode} failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as ChildResult;
}

/**
 * Reads every file of a folder once, block by block (1 MiB, nothing kept), so that the operating
 * system's cache holds them before the first round: otherwise whichever run comes first reads from the
 * disk and waits. Returns megabytes read and seconds taken.
 */
function readThrough(folder: string): { mb: number; s: number } {
  const t0 = performance.now();
  const block = new Uint8Array(1 << 20);
  let bytes = 0;
  for (const name of readdirSync(folder)) {
    const fd = openSync(join(folder, name), 'r');
    try {
      for (let n = readSync(fd, block); n > 0; n = readSync(fd, block)) bytes += n;
    } finally {
      closeSync(fd);
    }
  }
  return { mb: bytes / 1e6, s: (performance.now() - t0) / 1000 };
}

/** Runs the built CLI; with /usr/bin/time (GNU time) also its CPU seconds and peak RSS. */
function timeCli(args: string[]): { wallS: number; cpuS: number | null; maxRssMB: number | null; status: number | null; stderr: string } {
  const bin = fileURLToPath(new URL('../dist/cli/bin.js', import.meta.url));
  const gnuTime = existsSync('/usr/bin/time');
  const command = gnuTime ? '/usr/bin/time' : process.execPath;
  const argv = gnuTime ? ['-f', 'keyform-bench %U %S %M', process.execPath, bin, ...args] : [bin, ...args];
  const t0 = performance.now();
  const r = spawnSync(command, argv, { encoding: 'utf8', maxBuffer: 16 << 20 });
  const wallS = (performance.now() - t0) / 1000;
  const m = /keyform-bench ([\d.]+) ([\d.]+) (\d+)/.exec(r.stderr);
  return { wallS, cpuS: m ? Number(m[1]) + Number(m[2]) : null, maxRssMB: m ? Number(m[3]) / 1024 : null, status: r.status, stderr: r.stderr };
}

/**
 * Controls for the batch speed-up: the same fixed CPU work split over 1 and over 2 worker threads.
 * Their speed-up is what the machine can give right now; on an idle 2-core machine it is close to
 * 2, on a shared one less. Two kinds of work: `loop`, one dependent chain of square roots (the core
 * waits on each result, so a core shared with a neighbour loses little), and `array`, four
 * independent multiply-add chains over a 1 MiB array (beyond the first-level cache, as the
 * decoder's score ring is: the core's arithmetic units and caches are kept busy, as by real work).
 */
async function controlSpeedup(kind: 'loop' | 'array', tasks = 4): Promise<{ oneS: number; twoS: number }> {
  const { Worker } = await import('node:worker_threads');
  const code = `const { parentPort } = require('node:worker_threads');
    const a = new Float64Array(1 << 17).map((_, i) => 1 + i * 1e-9);
    const work = {
      loop: (n) => { let x = 0; for (let i = 0; i < n; i++) x += Math.sqrt(i); return x; },
      array: (n) => {
        let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        for (let j = 0; j < n / a.length; j++) {
          for (let i = 0; i < a.length; i += 4) { s0 += a[i] * 1.0000001; s1 += a[i + 1] * 0.9999999; s2 += a[i + 2] * 1.0000002; s3 += a[i + 3] * 0.9999998; }
        }
        return s0 + s1 + s2 + s3;
      },
    }[${JSON.stringify(kind)}];
    parentPort.on('message', (n) => parentPort.postMessage(work(n)));`;
  const run = async (threads: number): Promise<number> => {
    const workers = Array.from({ length: threads }, () => new Worker(code, { eval: true }));
    const t0 = performance.now();
    let next = 0;
    await Promise.all(
      workers.map(async (w) => {
        while (next < tasks) {
          next++;
          await new Promise((resolve) => {
            w.once('message', resolve);
            w.postMessage(kind === 'loop' ? 2e8 : 5e8);
          });
        }
      }),
    );
    const s = (performance.now() - t0) / 1000;
    await Promise.all(workers.map((w) => w.terminate()));
    return s;
  };
  const oneS = Math.min(await run(1), await run(1));
  const twoS = Math.min(await run(2), await run(2));
  return { oneS, twoS };
}

// ---------------------------------------------------------------- main
const minutes = arg('--minutes', 60);
const batchShapes = (process.argv.includes('--batch') ? process.argv[process.argv.indexOf('--batch') + 1]! : '6x10,6x60,12x60,24x60,6x60@48').split(',').map((spec) => {
  const m = /^(\d+)x(\d+(?:\.\d+)?)(?:@(8|16|44\.1|48))?$/.exec(spec.trim());
  if (!m) throw new Error(`--batch: expected N×M[@kHz] like 6x10 or 6x10@48 (got ${spec})`);
  return { files: Number(m[1]), minutes: Number(m[2]), sampleRate: Math.round(Number(m[3] ?? 8) * 1000) };
});
const dir = process.argv.includes('--dir') ? process.argv[process.argv.indexOf('--dir') + 1]! : join(tmpdir(), 'keyform-throughput');
mkdirSync(dir, { recursive: true });

const lines: string[] = [];
const say = (s: string): void => {
  process.stdout.write(`${s}\n`);
  lines.push(s);
};
const load = (): string => loadavg().map((x) => x.toFixed(2)).join(' ');
say(`keyform throughput benchmark — node ${process.version}, ${availableParallelism()} CPUs, load average ${load()} at start, files in ${dir}`);
say(`audio: ${minutes} min of 20–25 WPM traffic, 700 Hz, 5 ms raised-cosine edges, +${SNR_DB} dB SNR (key-down carrier / noise in 2500 Hz), 16-bit mono WAV, seed ${SEED}`);

const repeats = arg('--repeats', 2);
const rows: string[][] = [];
for (const sampleRate of [48_000, 8000]) {
  const path = join(dir, `traffic-${sampleRate}-${minutes}min-seed${SEED}.wav`);
  if (!existsSync(path)) {
    const t0 = performance.now();
    const chars = generate(path, sampleRate, minutes * 60, SEED);
    writeFileSync(`${path}.chars`, String(chars));
    process.stderr.write(`generated ${path} (${chars} characters, ${(statSync(path).size / 1e6).toFixed(0)} MB) in ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
  }
  // Fastest of `repeats` runs each (the run least disturbed by other load); peak memory of the largest.
  const fastest = (mode: 'read' | 'decode'): ChildResult => {
    const runs = Array.from({ length: repeats }, () => runChild(mode, path));
    const best = runs.reduce((a, b) => (b.wallS < a.wallS ? b : a));
    return { ...best, maxRssMB: Math.max(...runs.map((r) => r.maxRssMB)) };
  };
  const floor = fastest('read');
  const decode = fastest('decode');
  const rtf = (r: ChildResult): string => Math.round(r.audioS / r.wallS).toLocaleString('en-US');
  const rtfCpu = (r: ChildResult): string => Math.round(r.audioS / r.cpuS).toLocaleString('en-US');
  const sent = Number(readFileSync(`${path}.chars`, 'utf8'));
  rows.push([
    `${sampleRate / 1000} kHz`,
    `${(floor.audioS / 60).toFixed(0)} min`,
    `${(statSync(path).size / 1e6).toFixed(0)} MB`,
    `${floor.wallS.toFixed(2)} s`,
    `${rtf(floor)}×`,
    `${decode.wallS.toFixed(2)} s`,
    `${rtf(decode)}× (${rtfCpu(decode)}×)`,
    `${(decode.wallS / floor.wallS).toFixed(1)}×`,
    `${decode.maxRssMB.toFixed(0)} MB`,
    decode.wpm !== null ? `${decode.wpm.toFixed(1)} / ${decode.snrDb?.toFixed(1) ?? '–'} dB` : '–',
    `${sent} / ${decode.characters ?? '–'}`,
  ]);
}
function printTable(head: string[], rows: string[][]): void {
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (r: string[]): string => `| ${r.map((c, i) => c.padEnd(widths[i]!)).join(' | ')} |`;
  say(line(head));
  say(`|${widths.map((w) => '-'.repeat(w + 2)).join('|')}|`);
  for (const r of rows) say(line(r));
}
const head = ['audio', 'length', 'file', 'read+convert', 'floor RTF', 'decode', 'decode RTF wall (CPU)', 'decode/floor', 'peak RSS', 'wpm / SNR est.', 'chars sent / decoded'];
say('');
say(`Streaming read and decode, one core, fastest of ${repeats} runs (RTF = audio seconds per wall second, in brackets per CPU second; peak RSS of the decoding process)`);
printTable(head, rows);

// Batch speed-up: the built CLI over N files on 1 and on 2 worker threads.
const bin = fileURLToPath(new URL('../dist/cli/bin.js', import.meta.url));
say('');
if (!existsSync(bin) || !existsSync(fileURLToPath(new URL('../dist/cli/batch-worker.js', import.meta.url)))) {
  say('batch: dist/ is not built (npm run build): skipped');
} else {
  for (const { files: batchFiles, minutes: batchMinutes, sampleRate: batchRate } of batchShapes) {
    const batchDir = join(dir, `batch-${batchFiles}x${batchMinutes}min${batchRate === 8000 ? '' : `-${batchRate / 1000}k`}`);
    mkdirSync(batchDir, { recursive: true });
    for (let i = 0; i < batchFiles; i++) {
      const p = join(batchDir, `q-traffic-${String(i + 1).padStart(2, '0')}.wav`);
      if (!existsSync(p)) generate(p, batchRate, batchMinutes * 60, SEED + 1 + i);
    }
    // Each round: the control (what the machine can give right now), then 1 and 2 workers, in turn
    // 1 then 2 and 2 then 1, so that a machine slowing down or speeding up over the minutes of the
    // run favours neither. On a shared machine the rounds differ; the control beside each shows why.
    const repeats = arg('--batch-repeats', 5);
    const warm = readThrough(batchDir);
    const rounds: { one: ReturnType<typeof timeCli>; two: ReturnType<typeof timeCli>; control: number; controlArray: number }[] = [];
    for (let i = 0; i < repeats; i++) {
      const c = await controlSpeedup('loop', 2);
      const ca = await controlSpeedup('array', 2);
      const runJobs = (jobs: number): ReturnType<typeof timeCli> => timeCli(['batch', batchDir, '--jobs', String(jobs), '--json']);
      let one: ReturnType<typeof timeCli>;
      let two: ReturnType<typeof timeCli>;
      if (i % 2 === 0) {
        one = runJobs(1);
        two = runJobs(2);
      } else {
        two = runJobs(2);
        one = runJobs(1);
      }
      rounds.push({ one, two, control: c.oneS / c.twoS, controlArray: ca.oneS / ca.twoS });
    }
    say(`Batch: ${batchFiles} files × ${batchMinutes} min at ${batchRate / 1000} kHz (decode + timing + shape per file), built CLI, ${repeats} rounds`);
    const cpu = (r: ReturnType<typeof timeCli>): string => (r.cpuS === null ? '–' : `${r.cpuS.toFixed(2)} s (${Math.round((100 * r.cpuS) / r.wallS)} %)`);
    const rss = (r: ReturnType<typeof timeCli>): string => (r.maxRssMB === null ? '–' : `${r.maxRssMB.toFixed(0)} MB`);
    // What two workers could reach in this round if together they needed no more CPU than one worker
    // did: one worker's CPU time (its own thread plus the engine's background threads on the other
    // core) done by two cores at the speed-up the control loop found for two busy cores.
    const ceiling = (r: (typeof rounds)[number]): number | null => (r.one.cpuS === null ? null : r.control / (r.one.cpuS / r.one.wallS));
    printTable(
      ['round', '1 worker', '2 workers', 'speed-up', 'ceiling', 'CPU 1 worker (use)', 'CPU 2 workers (use)', 'peak RSS 1 / 2', 'control loop / array'],
      rounds.map((r, i) => [
        String(i + 1),
        `${r.one.wallS.toFixed(2)} s`,
        `${r.two.wallS.toFixed(2)} s`,
        `${(r.one.wallS / r.two.wallS).toFixed(2)}×`,
        ceiling(r) === null ? '–' : `${ceiling(r)!.toFixed(2)}×`,
        cpu(r.one),
        cpu(r.two),
        `${rss(r.one)} / ${rss(r.two)}`,
        `${r.control.toFixed(2)}× / ${r.controlArray.toFixed(2)}×`,
      ]),
    );
    const one = rounds.reduce((a, r) => (r.one.wallS < a.wallS ? r.one : a), rounds[0]!.one);
    const two = rounds.reduce((a, r) => (r.two.wallS < a.wallS ? r.two : a), rounds[0]!.two);
    const speedups = rounds.map((r) => r.one.wallS / r.two.wallS);
    say(
      `fastest 1-worker run ${one.wallS.toFixed(2)} s, fastest 2-worker run ${two.wallS.toFixed(2)} s: ${(one.wallS / two.wallS).toFixed(2)}×; ` +
        `median of the rounds ${median(speedups).toFixed(2)}×, ${speedups.filter((x) => x >= 1.7).length} of ${rounds.length} rounds at 1.7× or more; ` +
        `controls' medians ${median(rounds.map((r) => r.control)).toFixed(2)}× (loop) and ${median(rounds.map((r) => r.controlArray)).toFixed(2)}× (array)`,
    );
    const ceilings = rounds.map(ceiling).filter((x): x is number => x !== null);
    if (ceilings.length > 0) {
      say(
        `ceiling (control loop ÷ one worker's use) median ${median(ceilings).toFixed(2)}×: ` +
          `the rounds' speed-ups were ${Math.round((100 * median(speedups)) / median(ceilings))} % of it at the median`,
      );
    }
    say(`(the folder's ${warm.mb.toFixed(0)} MB were read once before the rounds, in ${warm.s.toFixed(1)} s, so that the first run need not wait for the disk)`);
    // A run that used much less than a core waited for something (the disk, when the cache could not
    // hold the folder): its speed-up says more about the disk than about keyform.
    const waited = rounds.filter((r) => r.one.cpuS !== null && r.one.cpuS / r.one.wallS < 0.9).length;
    if (waited > 0) say(`(${waited} of ${rounds.length} one-worker runs used under 90 % of a core: they waited, most likely for the disk)`);
    if (one.status !== 0 || two.status !== 0) say(`(batch exit codes ${one.status} and ${two.status}: ${(one.stderr + two.stderr).trim().split('\n').slice(-2).join(' / ')})`);
    say('');
  }
  say('(controls: fixed work on 1 and on 2 threads just before the round, what the machine could give then: a loop of');
  say(' square roots, and multiply-adds over a 1 MiB array, which keeps the core and its caches busy as real work does;');
  say(' CPU time covers all threads: a use above 100 % with one worker is the engine compiling and collecting');
  say(' garbage on background threads, which two workers must share with each other; ceiling: the control loop\'s');
  say(' speed-up ÷ one worker\'s use, what two workers could reach if they needed no more CPU than one did)');
}
say(`load average ${load()} at the end (other processes on the machine slow the wall-clock figures)`);
if (!process.argv.includes('--keep')) rmSync(dir, { recursive: true, force: true });
else say(`(files kept in ${dir})`);
