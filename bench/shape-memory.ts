/**
 * Peak memory and time of measureShape on a synthesized recording of a given length (40 dB SNR,
 * 18 wpm, 5 ms raised-cosine edges, 700 Hz). Not a test (vitest does not pick it up):
 *   node --expose-gc --import tsx bench/shape-memory.ts SECONDS [SAMPLE_RATE]
 * Peak RSS is sampled at every progress callback and at the end.
 */
import { measureShape } from '../src/core/measure/shape.js';
import { addNoise, noiseSigmaForSnr } from '../src/core/signal/noise.js';
import { synthesizeTone } from '../src/core/signal/synth.js';
import { planKeying } from '../src/core/timing/plan.js';

const seconds = Number(process.argv[2] ?? 158);
const fs = Number(process.argv[3] ?? 48000);
const text = Array.from({ length: Math.ceil(seconds / 14) }, () => 'VVV Q7ZKT/B JO01').join(' ');
const marks = planKeying(text, { wpm: 18 }).marks.filter(([, b]) => b < seconds * 1000 - 1000);
const x = synthesizeTone({ marks, sampleRate: fs, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 500 }).samples;
addNoise(x, noiseSigmaForSnr(0.5, fs, 40), 7);
(globalThis as { gc?: () => void }).gc?.();
const base = process.memoryUsage().rss;
let peak = base;
const probe = (): void => {
  peak = Math.max(peak, process.memoryUsage().rss);
};
const t0 = Date.now();
const r = measureShape(x, fs, { onProgress: probe });
probe();
const MB = (b: number): string => (b / 2 ** 20).toFixed(0);
console.log(
  `${(x.length / fs).toFixed(0)} s at ${fs} Hz (samples ${MB(x.byteLength)} MB): peak rss ${MB(peak)} MB (+${MB(peak - base)} MB during the analysis), ` +
    `${((Date.now() - t0) / 1000).toFixed(1)} s; rise ${r.riseMs.median} ms, occupied ${r.occupiedBandwidthHz} Hz, ${r.marks.found} marks`,
);
