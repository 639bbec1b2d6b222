/**
 * Makes the demo recordings in recordings/ from keyform's own planner and synthesizer.
 *
 * The scenario is invented: the hill-top beacon Q7ZKT/B of a radio club, before and after its keyer
 * got shaped edges; a hand-keyed contact between Q3ABC and Q9XYZ; the beacon heard weakly in noise;
 * and a test transmission through a fading path. Everything is seeded, so `npm run recordings`
 * writes byte-identical files on every machine.
 *
 * Usage: npx tsx scripts/make-recordings.ts [--out DIR] [--force]
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { planKeying } from '../src/core/timing/plan.js';
import { synthesizeTone } from '../src/core/signal/synth.js';
import { addNoise, gaussianSource, noiseSigmaForSnr, seededRandom } from '../src/core/signal/noise.js';
import type { EdgeKind } from '../src/core/signal/edges.js';
import type { Interval } from '../src/core/timeline.js';
import { encodeWav } from '../src/io/wav-write.js';
import { writeOutputFile } from '../src/io/files.js';

/** The beacon's message: its call, its locator square and the end-of-message prosign. */
export const BEACON_TEXT = 'VVV Q7ZKT/B JO01 <AR>';

export interface RecordingSpec {
  file: string;
  /** What the recording shows (for the README and the app's file list). */
  about: string;
  text: string;
  sampleRate: number;
  toneHz: number;
  wpm: number;
  edge: EdgeKind;
  riseMs: number;
  /** Key-down SNR in 2500 Hz [dB]; null for none. */
  snrDb: number | null;
  seed: number;
  hand?: { startWpm: number; endWpm: number; dahDitRatio: number; jitterPct: number; wordGapUnits: number };
  fading?: { periodS: number; depthDb: number };
}

export const RECORDINGS: readonly RecordingSpec[] = [
  {
    file: 'beacon-before-fix.wav',
    about: 'the club beacon with its old keyer: hard keying, wide key clicks (24 kHz sampling so the clicks fit in the band)',
    text: BEACON_TEXT, sampleRate: 24000, toneHz: 700, wpm: 18, edge: 'hard', riseMs: 0, snrDb: 50, seed: 101,
  },
  {
    file: 'beacon-after-fix.wav',
    about: 'the same beacon after the fix: raised-cosine edges, 5 ms 10–90 % rise and fall',
    text: BEACON_TEXT, sampleRate: 16000, toneHz: 700, wpm: 18, edge: 'raised-cosine', riseMs: 5, snrDb: 50, seed: 102,
  },
  {
    file: 'contact-hand-keyed.wav',
    about: 'a hand-keyed contact: speed drifting from 16 to 21 wpm, heavy dashes (3.4 dots), 12 % timing jitter',
    text: 'Q9XYZ DE Q3ABC GM UR 579 NAME ANN <KN>', sampleRate: 8000, toneHz: 620, wpm: 16, edge: 'raised-cosine', riseMs: 4,
    snrDb: 25, seed: 103, hand: { startWpm: 16, endWpm: 21, dahDitRatio: 3.4, jitterPct: 12, wordGapUnits: 7 },
  },
  {
    file: 'beacon-weak.wav',
    about: 'the beacon heard far away: −3 dB SNR in 2500 Hz (key-down power)',
    text: 'Q7ZKT/B Q7ZKT/B', sampleRate: 8000, toneHz: 700, wpm: 18, edge: 'raised-cosine', riseMs: 5, snrDb: -3, seed: 104,
  },
  {
    file: 'test-fading.wav',
    about: 'a test transmission through a fading path: 12 dB slow fades every 4 s, 20 dB SNR at the peaks',
    text: 'TEST DE Q7ZKT Q7ZKT <AR>', sampleRate: 8000, toneHz: 750, wpm: 20, edge: 'raised-cosine', riseMs: 5, snrDb: 20, seed: 105,
    fading: { periodS: 4, depthDb: 12 },
  },
];

const LEVEL_DB = -6;

/**
 * Peak level of the keyed tone [dBFS]: −6 dBFS, or lower where the added noise would otherwise clip
 * (tone peak plus four noise standard deviations kept below 0.95 of full scale).
 */
function levelDbFor(spec: RecordingSpec): number {
  if (spec.snrDb === null) return LEVEL_DB;
  const sigmaPerAmplitude = noiseSigmaForSnr(1, spec.sampleRate, spec.snrDb);
  return Math.min(LEVEL_DB, 20 * Math.log10(0.95 / (1 + 4 * sigmaPerAmplitude)));
}

/**
 * Re-times a plan as a hand-sent message: the speed glides linearly from `startWpm` to `endWpm`,
 * dashes last `dahDitRatio` units, word gaps `wordGapUnits`, and every mark and gap gets seeded
 * Gaussian jitter of `jitterPct` % of the local unit.
 */
function handSent(plan: ReturnType<typeof planKeying>, hand: NonNullable<RecordingSpec['hand']>, seed: number): Interval[] {
  const gauss = gaussianSource(seededRandom(seed));
  const n = plan.elements.length;
  const marks: Interval[] = [];
  let t = 0;
  plan.elements.forEach((el, i) => {
    const wpm = hand.startWpm + ((hand.endWpm - hand.startWpm) * i) / Math.max(1, n - 1);
    const unit = 1200 / wpm;
    const jitter = (): number => (hand.jitterPct / 100) * unit * Math.max(-2.5, Math.min(2.5, gauss()));
    if (i > 0) {
      const plannedGapUnits = (el.startMs - plan.elements[i - 1]!.endMs) / plan.unitMs;
      const gapUnits = plannedGapUnits > 5 ? hand.wordGapUnits : plannedGapUnits > 2 ? 3 : 1;
      t += Math.max(0.4 * unit, gapUnits * unit + jitter());
    }
    const len = Math.max(0.5 * unit, (el.kind === 'dah' ? hand.dahDitRatio : 1) * unit + jitter());
    marks.push([t, t + len]);
    t += len;
  });
  return marks;
}

/** Slow fading: gain swings between 0 dB and −depthDb with the given period (raised-cosine in dB). */
function applyFading(samples: Float32Array, sampleRate: number, fading: NonNullable<RecordingSpec['fading']>): void {
  for (let i = 0; i < samples.length; i++) {
    const phase = (2 * Math.PI * i) / (fading.periodS * sampleRate);
    const db = -fading.depthDb * 0.5 * (1 - Math.cos(phase));
    samples[i] = samples[i]! * 10 ** (db / 20);
  }
}

/** Synthesizes one recording's samples (deterministic for its seed). */
export function makeRecording(spec: RecordingSpec): Float32Array {
  const plan = planKeying(spec.text, { wpm: spec.wpm });
  const marks = spec.hand ? handSent(plan, spec.hand, spec.seed) : plan.marks;
  const tone = synthesizeTone({
    marks,
    sampleRate: spec.sampleRate,
    toneHz: spec.toneHz,
    levelDb: levelDbFor(spec),
    edge: spec.edge,
    riseMs: spec.riseMs,
    padMs: 600,
  });
  const samples = tone.samples;
  if (spec.fading) applyFading(samples, spec.sampleRate, spec.fading);
  if (spec.snrDb !== null) addNoise(samples, noiseSigmaForSnr(10 ** (levelDbFor(spec) / 20), spec.sampleRate, spec.snrDb), spec.seed);
  for (let i = 0; i < samples.length; i++) samples[i] = Math.max(-1, Math.min(1, samples[i]!));
  return samples;
}

async function run(argv: string[]): Promise<void> {
  const outIndex = argv.indexOf('--out');
  const dir = outIndex >= 0 ? argv[outIndex + 1]! : 'recordings';
  const force = argv.includes('--force') || outIndex < 0;
  mkdirSync(dir, { recursive: true });
  let total = 0;
  for (const spec of RECORDINGS) {
    const samples = makeRecording(spec);
    const wav = encodeWav({ sampleRate: spec.sampleRate, channels: [samples], encoding: 's16' });
    await writeOutputFile(join(dir, spec.file), wav, { force });
    total += wav.length;
    process.stdout.write(`${join(dir, spec.file)}  ${(samples.length / spec.sampleRate).toFixed(2)} s  ${spec.sampleRate} Hz  ${(wav.length / 1024).toFixed(0)} KiB  ${spec.about}\n`);
  }
  process.stdout.write(`total ${(total / 1024).toFixed(0)} KiB\n`);
}

if (process.argv[1] && /make-recordings\.(ts|js)$/.test(process.argv[1])) {
  run(process.argv.slice(2)).catch((err: unknown) => {
    process.stderr.write(`make-recordings: ${(err as Error).message}\n`);
    process.exitCode = 1;
  });
}
