import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { encodeWav } from '../../src/io/wav-write.js';
import { runCli } from '../../testkit/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-shape-'));

function writeRecording(name: string, edge: 'raised-cosine' | 'hard', riseMs: number, snrDb: number | null = null): string {
  const plan = planKeying('Q7ZKT TEST', { wpm: 20 });
  const t = synthesizeTone({ marks: plan.marks, sampleRate: 16_000, toneHz: 700, levelDb: -6, edge, riseMs, padMs: 300 });
  // keyform's SNR convention: key-down carrier over noise in 2500 Hz (src/core/signal/noise.ts).
  if (snrDb !== null) addNoise(t.samples, noiseSigmaForSnr(10 ** (-6 / 20), 16_000, snrDb), 8);
  const path = join(dir, name);
  writeFileSync(path, encodeWav({ sampleRate: 16_000, channels: [t.samples], encoding: 's16' }));
  return path;
}

describe('keyform shape', () => {
  const soft = writeRecording('soft.wav', 'raised-cosine', 5);
  const hard = writeRecording('hard.wav', 'hard', 0);

  it('reports a recording with the JSON field names of the issue', async () => {
    const r = await runCli(['shape', soft, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    for (const key of ['riseMs', 'fallMs', 'chirpHz', 'occupiedBandwidthHz', 'bandwidthAtDbcHz', 'necessaryBandwidthHz', 'designator', 'mask']) expect(j).toHaveProperty(key);
    expect(Object.keys(j.riseMs).sort()).toEqual(['median', 'p10', 'p90']);
    expect(Object.keys(j.bandwidthAtDbcHz).sort()).toEqual(['20', '40', '60']);
    expect(j.mask).toHaveProperty('pass', true);
    expect(j.mask).toHaveProperty('violations');
    expect(Math.abs(j.riseMs.median - 5)).toBeLessThan(0.15);
    // 20 wpm PARIS: B = 1/60 ms = 16.67 baud, K = 5 → 83.3 Hz, 83H3A1AAN (ITU-R SM.1138).
    expect(j.necessaryBandwidthHz).toBeCloseTo(83.33, 0);
    expect(j.designator).toBe('83H3A1AAN');
    expect(j.spectrum.offsetHz.length).toBe(j.spectrum.dbc.length);
    expect(j.spectrum.offsetHz.length).toBeLessThanOrEqual(2048);
  });

  it('a hard-keyed recording at 3 dB SNR: the mask is not judged (exit 0, not 1), figures left out', async () => {
    const noisy = writeRecording('hard-noisy.wav', 'hard', 0, 3);
    const r = await runCli(['shape', noisy]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/NOT JUDGED/);
    expect(r.stdout).not.toMatch(/FAIL|PASS/);
    const j = JSON.parse((await runCli(['shape', noisy, '--json'])).stdout);
    expect(j.mask.pass).toBeNull();
    expect([j.riseMs.median, j.occupiedBandwidthHz]).toEqual([null, null]);
    // 20 wpm from the receiver's timing: Bn = 83.3 Hz (ITU-R SM.1138, B = 1/60 ms, K = 5), within 5 %.
    expect(Math.abs(j.necessaryBandwidthHz / 83.33 - 1)).toBeLessThan(0.05);
  });

  it('prints a readable report with the cautions, and exits 1 when the mask is exceeded', async () => {
    const r = await runCli(['shape', hard]);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/FAIL/);
    expect(r.stdout).toMatch(/over by [\d.]+ dB at [+-]\d+ Hz/);
    expect(r.stdout).toMatch(/does not certify/);
    expect(r.stdout).toMatch(/wide filter/);
    expect(r.stdout).toMatch(/0\.8 × wpm/);
  });

  it('predicts without a recording and sweeps the rise time', async () => {
    const p = await runCli(['shape', '--predict', '--wpm', '25', '--rise', '5', '--json']);
    expect(p.code).toBe(0);
    const j = JSON.parse(p.stdout);
    expect(j.kind).toBe('predicted');
    expect(j.necessaryBandwidthHz).toBeCloseTo((25 / 1.2) * 5, 1);
    const s = await runCli(['shape', '--predict', '--sweep', '--wpm', '20']);
    expect(s.code).toBe(0);
    expect(s.stdout).toMatch(/shortest rise time that meets the mask: [\d.]+ ms/);
  });

  it('uses --k 3 and a mask file', async () => {
    const mask = join(dir, 'strict.csv');
    writeFileSync(mask, 'offset_hz,max_dbc\n100,-60\n');
    const r = await runCli(['shape', soft, '--k', '3', '--mask', mask, '--json']);
    const j = JSON.parse(r.stdout);
    expect(j.k).toBe(3);
    expect(j.necessaryBandwidthHz).toBeCloseTo(50, 0);
    expect(j.mask.pass).toBe(false);
    expect(r.code).toBe(1);
  });

  it('writes the SVG plot and will not overwrite it without --force', async () => {
    const svg = join(dir, 'plot.svg');
    const a = await runCli(['shape', soft, '--plot', svg]);
    expect(a.code).toBe(0);
    expect(existsSync(svg)).toBe(true);
    const text = readFileSync(svg, 'utf8');
    expect(text).toMatch(/^<\?xml/);
    expect(text).toMatch(/necessary bandwidth/);
    expect(text).toMatch(/10 %/);
    expect(text).toMatch(/90 %/);
    const b = await runCli(['shape', soft, '--plot', svg]);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/already exists/);
    const c = await runCli(['shape', soft, '--plot', svg, '--force']);
    expect(c.code).toBe(0);
  });

  it('answers bad input with one line and exit 2', async () => {
    for (const argv of [['shape'], ['shape', '--predict'], ['shape', join(dir, 'none.wav')], ['shape', soft, '--tone', '9000'], ['shape', '--predict', '--wpm', '500']]) {
      const r = await runCli(argv);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/^keyform: /);
      expect(r.stderr.trim().split('\n').length).toBe(1);
    }
  });
});

describe('keyform shape on a stretch of a recording (--from, --seconds)', () => {
  // The transmitter before and after its fix in one file: hard keying, then 5 ms raised-cosine edges.
  const plan = planKeying('Q7ZKT TEST', { wpm: 20 });
  const part = (edge: 'raised-cosine' | 'hard', riseMs: number): Float32Array =>
    synthesizeTone({ marks: plan.marks, sampleRate: 16_000, toneHz: 700, levelDb: -6, edge, riseMs, padMs: 300 }).samples;
  const hardPart = part('hard', 0);
  const softPart = part('raised-cosine', 5);
  const both = new Float32Array(hardPart.length + softPart.length);
  both.set(hardPart);
  both.set(softPart, hardPart.length);
  const path = join(dir, 'before-and-after.wav');
  writeFileSync(path, encodeWav({ sampleRate: 16_000, channels: [both], encoding: 's16' }));
  const splitS = hardPart.length / 16_000;
  const totalS = both.length / 16_000;

  it('measures only the stretch asked for: the 5 ms edges after the split, the hard ones before it', async () => {
    const after = JSON.parse((await runCli(['shape', path, '--from', String(splitS), '--json'])).stdout);
    // The synthesizer's 5 ms raised-cosine edges, within 3 % (as for a whole recording of them).
    expect(Math.abs(after.riseMs.median / 5 - 1)).toBeLessThan(0.03);
    expect(after.mask.pass).toBe(true);
    expect(after.stretch).toEqual({ fromS: Math.round(splitS * 1000) / 1000, toS: Math.round(totalS * 1000) / 1000, totalS: Math.round(totalS * 1000) / 1000 });
    expect(after.durationMs / 1000).toBeCloseTo(totalS - splitS, 3);
    const before = await runCli(['shape', path, '--seconds', String(splitS)]);
    expect(before.code).toBe(1); // the hard keying fails the mask
    expect(before.stdout).toMatch(/FAIL/);
    expect(before.stdout).toContain(`warning: analysed 0–${Math.round(splitS * 1000) / 1000} s of the recording's ${Math.round(totalS * 1000) / 1000} s`);
    const j = JSON.parse((await runCli(['shape', path, '--seconds', String(splitS), '--json'])).stdout);
    expect(j.riseMs.median).toBeLessThan(1);
  });

  it('the whole of a short recording is read as before: no stretch in the report', async () => {
    const j = JSON.parse((await runCli(['shape', path, '--json'])).stdout);
    expect(j).not.toHaveProperty('stretch');
    expect(j.durationMs / 1000).toBeCloseTo(totalS, 3);
  });

  it('a start past the end: one line, exit 2', async () => {
    const r = await runCli(['shape', path, '--from', '999']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(`keyform: ${path}: --from 999 s is past the end of the recording (${totalS.toFixed(1)} s)`);
  });
});
