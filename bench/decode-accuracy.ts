/**
 * Decoder accuracy benchmark: character error rate (edit distance / reference length) against SNR,
 * for machine-sent text at 20 and 35 wpm, hand-sent timing, and fading.
 *
 * SNR is key-down carrier power over noise power in a 2500 Hz bandwidth (noiseSigmaForSnr).
 * Everything is seeded, so the table is the same on every run.
 *
 *   npx tsx bench/decode-accuracy.ts            full table
 *   npx tsx bench/decode-accuracy.ts --quick    fewer characters per point
 *   npx tsx bench/decode-accuracy.ts --verbose  also print every message decoded with errors
 *   npx tsx bench/decode-accuracy.ts --only "35.*-6"  rows matching a regular expression (label and SNR)
 */
import { decodeSamples } from '../src/core/receive/index.js';
import { editDistance } from '../src/core/receive/edit-distance.js';
import { applyFading, handTiming, synthesizeDriftingTone, type FadingOptions } from '../src/core/signal/impair.js';
import { addNoise, noiseSigmaForSnr, seededRandom } from '../src/core/signal/noise.js';
import { synthesizeTone } from '../src/core/signal/synth.js';
import { planKeying } from '../src/core/timing/plan.js';
import type { Interval } from '../src/core/timeline.js';

const args = process.argv.slice(2);
const quick = args.includes('--quick');
const verbose = args.includes('--verbose');
const onlyIdx = args.indexOf('--only');
const only = onlyIdx >= 0 ? args[onlyIdx + 1] : undefined;
const CHARS_PER_POINT = quick ? 120 : 320;
const SAMPLE_RATE = 8000;
const TONE_HZ = 700;
const LEVEL_DB = -6;

/** Words of our invented scenario: Q-prefixed station identifiers, figures and plain words. */
const WORDS = [
  'TEST', 'DE', 'RST', '599', 'NAME', 'BEACON', 'KEYER', 'POWER', 'ANTENNA', 'SIGNAL', 'GOOD', 'THE',
  'AND', 'WEATHER', 'COLD', 'WIND', 'RAIN', 'FIVE', 'WATTS', 'LOOP', 'WIRE', 'QRM', 'QSB', 'TU', 'ES',
  'AGN', 'PSE', 'HR', 'UR', 'FB', '73', '5NN', '100W', 'QTH', 'NR', '1234', 'OK', 'CHECK', 'READY',
];

function callSign(rnd: () => number): string {
  const L = 'ABCDEFGHIJKLMNOPQRSTUVWXYZ';
  const n = 2 + Math.floor(rnd() * 2);
  let s = `Q${Math.floor(rnd() * 10)}`;
  for (let i = 0; i < n; i++) s += L[Math.floor(rnd() * 26)];
  return s;
}

function message(rnd: () => number, chars: number): string {
  const words: string[] = [];
  let len = 0;
  while (len < chars) {
    const w = rnd() < 0.25 ? callSign(rnd) : WORDS[Math.floor(rnd() * WORDS.length)]!;
    words.push(w);
    len += w.length + 1;
  }
  return words.join(' ');
}

interface Case {
  label: string;
  wpm: number;
  snrDb: number;
  hand?: { jitterPct: number; driftPct: number; dahRatio?: number; wordGapUnits?: number };
  fading?: FadingOptions;
  /** Tone offset [Hz] at t seconds from the start of each message's audio. */
  drift?: (seconds: number) => number;
  target?: number;
}

function runCase(c: Case, seedBase: number): { cer: number; chars: number; seconds: number; decodeMs: number } {
  const rnd = seededRandom(seedBase);
  let errors = 0;
  let total = 0;
  let seconds = 0;
  let decodeMs = 0;
  let k = 0;
  while (total < CHARS_PER_POINT) {
    const text = message(rnd, 40);
    const plan = planKeying(text, { wpm: c.wpm });
    let marks: Interval[] = plan.marks;
    if (c.hand) marks = handTiming(marks, { unitMs: plan.unitMs, seed: seedBase * 1000 + k, ...c.hand });
    const toneOptions = { marks, sampleRate: SAMPLE_RATE, toneHz: TONE_HZ, levelDb: LEVEL_DB, edge: 'raised-cosine', riseMs: 5, padMs: 500 } as const;
    const tone = c.drift ? synthesizeDriftingTone(toneOptions, c.drift) : synthesizeTone(toneOptions);
    if (c.fading) applyFading(tone.samples, SAMPLE_RATE, c.fading.kind === 'rayleigh' ? { ...c.fading, seed: c.fading.seed + k } : c.fading);
    addNoise(tone.samples, noiseSigmaForSnr(10 ** (LEVEL_DB / 20), SAMPLE_RATE, c.snrDb), seedBase * 7919 + k);
    const t0 = performance.now();
    const r = decodeSamples(tone.samples, SAMPLE_RATE);
    decodeMs += performance.now() - t0;
    seconds += tone.samples.length / SAMPLE_RATE;
    const e = editDistance(r.text, plan.text);
    if (verbose && e > 0) console.log(`  ${e} errors at ${r.wpm} wpm (${r.snrDb} dB): ${r.text}\n  ${' '.repeat(String(e).length)} sent at ${c.wpm} wpm:       ${plan.text}`);
    errors += e;
    total += plan.text.length;
    k++;
  }
  return { cer: errors / total, chars: total, seconds, decodeMs };
}

const cases: Case[] = [];
for (const wpm of [20, 35]) {
  for (let snr = -14; snr <= 10; snr += 2) {
    const target = wpm === 20 ? (snr === -8 ? 0.02 : snr === -10 ? 0.1 : undefined) : snr === -6 ? 0.05 : undefined;
    cases.push({ label: `${wpm} wpm machine`, wpm, snrDb: snr, target });
  }
}
for (const jitterPct of [10, 15, 20]) {
  cases.push({ label: `20 wpm hand, ${jitterPct} % jitter, drift +20 %, dash 3.5`, wpm: 20, snrDb: 10, hand: { jitterPct, driftPct: 20, dahRatio: 3.5, wordGapUnits: 8 }, target: jitterPct === 15 ? 0.03 : undefined });
}
cases.push({ label: '20 wpm hand, 15 % jitter, drift −15 %, dash 2.6', wpm: 20, snrDb: 10, hand: { jitterPct: 15, driftPct: -15, dahRatio: 2.6 }, target: 0.03 });
cases.push({ label: '20 wpm, 20 dB fades every 8 s', wpm: 20, snrDb: 10, fading: { kind: 'periodic', depthDb: 20, periodS: 8 }, target: 0.05 });
cases.push({ label: '20 wpm, Rayleigh fading 0.1 Hz', wpm: 20, snrDb: 10, fading: { kind: 'rayleigh', dopplerHz: 0.1, seed: 77 }, target: 0.05 });
cases.push({ label: '20 wpm, Rayleigh fading 0.5 Hz', wpm: 20, snrDb: 10, fading: { kind: 'rayleigh', dopplerHz: 0.5, seed: 78 } });
for (const snrDb of [10, -6]) cases.push({ label: '20 wpm, tone drifting 2 Hz/s (40 Hz in 20 s)', wpm: 20, snrDb, drift: (t) => 2 * t });
cases.push({ label: '20 wpm, tone warming up: 30 Hz, time constant 10 s', wpm: 20, snrDb: 0, drift: (t) => 30 * (1 - Math.exp(-t / 10)) });

const started = performance.now();
console.log(`keyform decode accuracy: CER = edit distance / reference length; ${CHARS_PER_POINT}+ characters per row`);
console.log(`SNR = key-down carrier power / noise power in 2500 Hz; ${SAMPLE_RATE} Hz, tone ${TONE_HZ} Hz, raised-cosine 5 ms edges, seeded noise\n`);
console.log('| case | SNR dB | chars | CER % | target | decode × real time |');
console.log('|---|---:|---:|---:|---|---:|');
let seed = 1;
for (const c of cases) {
  seed++;
  if (only && !new RegExp(only).test(`${c.label} ${c.snrDb}`)) continue;
  const r = runCase(c, seed);
  const target = c.target === undefined ? '' : `≤ ${(c.target * 100).toFixed(0)} % ${r.cer <= c.target ? 'met' : 'MISSED'}`;
  console.log(`| ${c.label} | ${c.snrDb} | ${r.chars} | ${(r.cer * 100).toFixed(1)} | ${target} | ${(r.seconds / (r.decodeMs / 1000)).toFixed(0)} |`);
}
console.log(`\n(${((performance.now() - started) / 1000).toFixed(0)} s)`);
