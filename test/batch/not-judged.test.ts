import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { analyzeRecording } from '../../src/cli/analyze-recording.js';
import { MIN_EDGE_SNR_DB } from '../../src/core/measure/shape-snr.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { encodeWav } from '../../src/io/wav-write.js';

const root = mkdtempSync(join(tmpdir(), 'keyform-not-judged-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Q7ZKT's beacon at 18 wpm with 5 ms raised-cosine edges, with noise for `snrDb` (keyform's convention: carrier over noise in 2500 Hz), or none. */
function beacon(name: string, snrDb: number | null): string {
  const fs = 8000;
  const plan = planKeying('VVV Q7ZKT/B', { wpm: 18 });
  const tone = synthesizeTone({ marks: plan.marks, sampleRate: fs, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }).samples;
  if (snrDb !== null) addNoise(tone, noiseSigmaForSnr(10 ** (-6 / 20), fs, snrDb), 21);
  const path = join(root, name);
  writeFileSync(path, encodeWav({ sampleRate: fs, channels: [tone] }));
  return path;
}

describe('batch row of a recording too noisy for the shape analysis', () => {
  it('at 5 dB: decoded, rise and occupied bandwidth empty, verdict "not judged" with the reason among the warnings', async () => {
    const row = await analyzeRecording(beacon('weak.wav', 5));
    expect(row.text.trim()).toBe('VVV Q7ZKT/B');
    expect(row.riseMs).toBeNull();
    expect(row.occupiedBandwidthHz).toBeNull();
    expect(row.verdict).toBe('not judged');
    expect(row.warnings.join('\n')).toMatch(new RegExp(`shape: the recording is too noisy.*below the ${MIN_EDGE_SNR_DB} dB`));
  });

  it('without noise: rise (5 ms as synthesized, within 5 %) and bandwidth filled in, verdict ok', async () => {
    const row = await analyzeRecording(beacon('clean.wav', null));
    expect(Math.abs(row.riseMs! / 5 - 1)).toBeLessThan(0.05);
    expect(row.occupiedBandwidthHz).not.toBeNull();
    expect(row.verdict).toBe('ok');
  });
});
