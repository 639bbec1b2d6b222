/**
 * The app's slow jobs read recordings the way the commands do: Read back streams through the receiver
 * (the same text and marks as decoding the samples whole), multichannel files are decoded on the
 * channel with the keyed tone, and Shape analyses a bounded stretch of a long recording.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeSamples } from '../../src/core/receive/index.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { encodeWav } from '../../src/io/wav-write.js';
import { decodeRecording, runShapeTask } from '../../src/tui/tasks.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-tasks-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const RATE = 8000;
const plan = planKeying('Q7ZKT DE Q3ABC TEST', { wpm: 22 });
const keyed = synthesizeTone({ marks: plan.marks, sampleRate: RATE, toneHz: 650, levelDb: -10, edge: 'raised-cosine', riseMs: 5, padMs: 300 }).samples;
addNoise(keyed, noiseSigmaForSnr(10 ** (-10 / 20), RATE, 12), 5);

describe('the app reads recordings as the commands do', () => {
  it('Read back: streamed, the same text and marks as the receiver over the whole samples, envelope kept', async () => {
    const path = join(dir, 'mono.wav');
    writeFileSync(path, encodeWav({ sampleRate: RATE, channels: [keyed], encoding: 'f32' }));
    const r = await decodeRecording(path, () => {});
    const whole = decodeSamples(keyed, RATE);
    expect(r.decode.text).toBe(whole.text);
    expect(r.decode.text).toBe('Q7ZKT DE Q3ABC TEST');
    expect(r.decode.marks).toEqual(whole.marks);
    expect(r.decode.envelope!.values.length).toBeGreaterThan(100);
    expect(r.channelNote).toBeNull();
    expect(r.timing).not.toBeNull();
  });

  it('Read back of a two-channel file: the keyed channel is found and named', async () => {
    const path = join(dir, 'stereo.wav');
    const quiet = new Float32Array(keyed.length);
    addNoise(quiet, 0.02, 9);
    writeFileSync(path, encodeWav({ sampleRate: RATE, channels: [quiet, keyed], encoding: 's16' }));
    const r = await decodeRecording(path, () => {});
    expect(r.decode.text).toBe('Q7ZKT DE Q3ABC TEST');
    expect(r.channelNote).toMatch(/channel 2/);
  });

  it('Shape of a recording longer than the default stretch: the first 300 s, and the report says so', async () => {
    // 310 s at 8 kHz: the keyed message, then silence with a little noise.
    const long = new Float32Array(310 * RATE);
    long.set(keyed);
    addNoise(long.subarray(keyed.length), 1e-4, 11);
    const path = join(dir, 'long.wav');
    writeFileSync(path, encodeWav({ sampleRate: RATE, channels: [long], encoding: 's16' }));
    const report = (await runShapeTask({ kind: 'measure', path }, () => {})) as { durationMs: number; warnings: string[] };
    expect(report.durationMs).toBe(300_000);
    expect(report.warnings.some((w) => w.startsWith("analysed 0–300 s of the recording's 310 s"))).toBe(true);
  });
});
