import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import WavDecoder from 'wav-decoder';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../testkit/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-encode-'));

// ITU-R M.1677-1 patterns of the test message, typed here from the Recommendation.
const PATTERNS: Record<string, string> = { Q: '--.-', '7': '--...', Z: '--..', K: '-.-', T: '-', E: '.', S: '...' };

/** Marks of a message built straight from M.1677-1 §2 spacing (units), independent of the planner. */
function expectedMarks(text: string, unit: number): Array<[number, number]> {
  const marks: Array<[number, number]> = [];
  let t = 0;
  text.split(' ').forEach((word, w) => {
    if (w > 0) t += 7 - 3; // word gap 7 replaces the letter gap 3 added after the last letter
    for (const ch of word) {
      for (const sym of PATTERNS[ch]!) {
        const len = sym === '-' ? 3 : 1;
        marks.push([t * unit, (t + len) * unit]);
        t += len + 1;
      }
      t += 2; // letter gap 3 = element gap 1 already added + 2
    }
  });
  return marks;
}

describe('keyform encode', () => {
  it('prints PARIS-timed marks as JSON', async () => {
    const run = await runCli(['encode', 'Q7ZKT TEST', '--wpm', '20', '--format', 'json']);
    expect(run.code).toBe(0);
    const json = JSON.parse(run.stdout);
    expect(json.text).toBe('Q7ZKT TEST');
    expect(json.unitMs).toBe(60); // 1200 / 20 wpm
    expect(json.marks).toEqual(expectedMarks('Q7ZKT TEST', 60));
    expect(json.totalMs).toBe(json.marks.at(-1)[1]);
    expect(json.characterCount).toBe(9);
  });

  it('documents every option with its unit and default', async () => {
    const run = await runCli(['encode', '--help']);
    expect(run.code).toBe(0);
    for (const flag of ['--wpm', '--farnsworth', '--weight', '--compensation', '--ptt-lead', '--ptt-tail', '--repeat', '--every', '--format', '--out', '--force', '--tick-hz', '--name', '--rate', '--tone', '--level', '--edge', '--rise', '--substitute', '--in']) {
      expect(run.stdout).toContain(flag);
    }
    expect(run.stdout).toContain('(default: 20)');
    expect(run.stdout).toContain('(ms, 0–50');
    expect(run.stdout).toMatch(/licence/);
  });

  it.each([
    [['encode', 'E', '--wpm', '0'], 'keyform: --wpm must be from 1 to 100 (got 0)'],
    [['encode', 'E', '--wpm', '20', '--farnsworth', '20'], 'keyform: Farnsworth speed must be below the character speed 20 wpm (got 20)'],
    [['encode', 'E', '--format', 'mp3'], "keyform: option '-f, --format <format>' argument 'mp3' is invalid"],
    [['encode', 'Q7ZKT #1'], "keyform: cannot encode '#' at position 7"],
    [['encode', 'E', '--rise', 'abc'], "keyform: --rise must be a number (got 'abc')"],
    [['encode'], 'keyform: no message: give TEXT or --in FILE'],
  ])('exits 2 with one line for %j', async (argv, message) => {
    const run = await runCli(argv);
    expect(run.code).toBe(2);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toContain(message);
    expect(run.stdout).toBe('');
  });

  it('writes CSV rows of state, start and duration', async () => {
    const run = await runCli(['encode', 'ET', '--format', 'csv', '--ptt-lead', '40', '--ptt-tail', '100']);
    expect(run.stdout).toBe('state,startMs,durationMs\nptt,-40,560\ndown,0,60\nup,60,180\ndown,240,180\n');
  });

  it('writes files atomically and refuses to overwrite without --force', async () => {
    const out = join(dir, 'plan.json');
    expect((await runCli(['encode', 'E', '--out', out])).code).toBe(0);
    const before = readFileSync(out, 'utf8');
    const again = await runCli(['encode', 'T', '--out', out]);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain('already exists (use --force to replace it)');
    expect(readFileSync(out, 'utf8')).toBe(before);
    expect((await runCli(['encode', 'T', '--out', out, '--force'])).code).toBe(0);
    expect(JSON.parse(readFileSync(out, 'utf8')).text).toBe('T');
  });

  it('says in words why an output file cannot be written (one line, exit 2, and batch reports the same)', async () => {
    const noFolder = join(dir, 'no-such-folder', 'plan.json');
    const r1 = await runCli(['encode', 'E', '--out', noFolder]);
    expect(r1.code).toBe(2);
    expect(r1.stderr).toBe(`keyform: ${noFolder}: cannot write: no folder '${join(dir, 'no-such-folder')}'\n`);
    const notFolder = join(dir, 'plain-file');
    writeFileSync(notFolder, 'x');
    const r2 = await runCli(['encode', 'E', '--out', join(notFolder, 'plan.json')]);
    expect(r2.stderr).toBe(`keyform: ${join(notFolder, 'plan.json')}: cannot write: '${notFolder}' is not a folder\n`);
    const r3 = await runCli(['encode', 'E', '--out', dir, '--force']);
    expect(r3.stderr).toBe(`keyform: ${dir}: cannot write: it is a folder\n`);
    const r4 = await runCli(['batch', 'recordings/beacon-weak.wav', '--out', join(dir, 'nowhere', 'report.csv')]);
    expect(r4.code).toBe(2);
    expect(r4.stderr).toBe(`keyform: ${join(dir, 'nowhere', 'report.csv')}: cannot write: no folder '${join(dir, 'nowhere')}'\n`);
  });

  it('reads the message from a file', async () => {
    const src = join(dir, 'msg.txt');
    writeFileSync(src, 'q7zkt\ntest\n');
    const run = await runCli(['encode', '--in', src]);
    expect(JSON.parse(run.stdout).text).toBe('Q7ZKT TEST');
  });
});

describe('C header for keyer firmware', () => {
  it('compiles with the system cc and its ticks sum to the plan within one tick', async () => {
    for (const [wpm, farn, tickHz] of [[13, 7, 1000], [20, null, 32768], [47, null, 1000], [5, null, 1_000_000]] as const) {
      const h = join(dir, `beacon-${wpm}-${tickHz}.h`);
      const planArgv = ['encode', 'VVV Q7ZKT/B JO01 <AR>', '--wpm', String(wpm), '--ptt-lead', '30', ...(farn ? ['--farnsworth', String(farn)] : [])];
      const argv = [...planArgv, '--tick-hz', String(tickHz), '--name', 'hill beacon', '--out', h];
      const run = await runCli(argv);
      expect(run.code).toBe(0);
      execFileSync('cc', ['-fsyntax-only', '-Wall', '-Wextra', '-Werror', '-Wno-unused-const-variable', '-x', 'c', h]);
      // A tiny program prints the cumulative tick time of every edge.
      const c = join(dir, `sum-${wpm}-${tickHz}.c`);
      writeFileSync(c, `#include <stdio.h>\n#include "${h}"\nint main(void){unsigned long t=0;for(unsigned i=0;i<HILL_BEACON_STEP_COUNT;i++){t+=hill_beacon_steps[i];printf("%lu\\n",t);}return t==HILL_BEACON_TOTAL_TICKS?0:1;}\n`);
      const exe = join(dir, `sum-${wpm}-${tickHz}`);
      execFileSync('cc', ['-o', exe, c]);
      const sums = execFileSync(exe).toString().trim().split('\n').map(Number);
      const plan = JSON.parse((await runCli(planArgv)).stdout);
      const edges: number[] = plan.marks.flat();
      expect(sums).toHaveLength(edges.length - 1);
      sums.forEach((ticks, i) => expect(Math.abs(ticks - (edges[i + 1]! * tickHz) / 1000)).toBeLessThan(1));
      const text = readFileSync(h, 'utf8');
      expect(text).toContain('#ifndef KEYFORM_HILL_BEACON_H');
      // uint16_t while every step fits in 16 bits, uint32_t beyond.
      const steps = sums.map((s, i) => s - (i > 0 ? sums[i - 1]! : 0));
      expect(text).toContain(Math.max(...steps) > 65535 ? 'static const uint32_t' : 'static const uint16_t');
      expect(text).toMatch(/largest per-element\n \* rounding error 0\.\d{3} ticks/);
      expect(text).toContain('HILL_BEACON_PTT_LEAD_TICKS');
      expect(text).toContain('isolation');
    }
  });
});

/**
 * 10–90 % rise time of the first mark, measured on the decoded WAV: quadrature mixing with the known
 * tone and a moving average over exactly one tone period (which removes the 2f term), then linear
 * interpolation of the 10 % and 90 % crossings of the settled level.
 */
function measureFirstRiseMs(x: Float32Array, sampleRate: number, toneHz: number): number {
  const period = Math.round(sampleRate / toneHz);
  const env = new Float64Array(x.length);
  let si = 0;
  let sq = 0;
  const I = new Float64Array(x.length);
  const Q = new Float64Array(x.length);
  for (let n = 0; n < x.length; n++) {
    I[n] = x[n]! * Math.cos((2 * Math.PI * toneHz * n) / sampleRate);
    Q[n] = x[n]! * Math.sin((2 * Math.PI * toneHz * n) / sampleRate);
    si += I[n]!;
    sq += Q[n]!;
    if (n >= period) {
      si -= I[n - period]!;
      sq -= Q[n - period]!;
    }
    env[n] = (2 / period) * Math.hypot(si, sq);
  }
  const delay = (period - 1) / 2; // centre of the moving average
  let peak = 0;
  for (const v of env) peak = Math.max(peak, v);
  const start = env.findIndex((v) => v > 0.5 * peak);
  const settled = env[start + Math.round(0.02 * sampleRate)]!; // 20 ms into the mark
  const cross = (frac: number): number => {
    let n = start;
    while (n > 0 && env[n - 1]! >= frac * settled) n--;
    while (env[n]! < frac * settled) n++;
    const a = env[n - 1]!;
    const b = env[n]!;
    return n - 1 + (frac * settled - a) / (b - a) - delay;
  };
  return ((cross(0.9) - cross(0.1)) / sampleRate) * 1000;
}

describe('shaped-edge WAV', () => {
  it.each([
    ['raised-cosine', 5],
    ['raised-cosine', 2],
    ['linear', 5],
    ['linear', 8],
    ['exponential', 3],
    ['exponential', 5],
  ])('has the requested 10–90 %% rise time for %s edges of %s ms (within 2 %%)', async (edge, riseMs) => {
    const out = join(dir, `rise-${edge}-${riseMs}.wav`);
    const run = await runCli(['encode', 'T', '--wpm', '10', '--edge', edge as string, '--rise', String(riseMs), '--tone', '3000', '--rate', '48000', '--out', out]);
    expect(run.code).toBe(0);
    const audio = WavDecoder.decode.sync(readFileSync(out));
    expect(audio.sampleRate).toBe(48000);
    expect(audio.channelData).toHaveLength(1);
    const measured = measureFirstRiseMs(audio.channelData[0]!, 48000, 3000);
    expect(Math.abs(measured - (riseMs as number)) / (riseMs as number)).toBeLessThan(0.02);
  });

  it('keys hard edges within one tone period and at the requested level', async () => {
    const out = join(dir, 'hard.wav');
    await runCli(['encode', 'T', '--edge', 'hard', '--tone', '3000', '--level', '-6', '--out', out]);
    const audio = WavDecoder.decode.sync(readFileSync(out));
    const x = audio.channelData[0]!;
    expect(measureFirstRiseMs(x, 48000, 3000)).toBeLessThan(0.35);
    let peak = 0;
    for (const v of x) peak = Math.max(peak, Math.abs(v));
    expect(20 * Math.log10(peak)).toBeCloseTo(-6, 1); // −6 dBFS peak
    // 16-bit PCM mono, 48 kHz: 250 ms pad + 180 ms dash + 250 ms pad.
    expect(x.length).toBe(Math.ceil((0.25 + 0.18 + 0.25) * 48000));
    expect(existsSync(out)).toBe(true);
  });
});
