/**
 * How the keying-shape figures degrade with noise: the measurements behind MIN_EDGE_SNR_DB and
 * MIN_SPECTRUM_SNR_DB (src/core/measure/shape-snr.ts). Not a test (vitest does not pick it up):
 *   npx tsx bench/shape-snr-thresholds.ts [SNRs, e.g. 5,10,15,20,25]
 * Signals from keyform's synthesizer with seeded white noise at keyform's SNR (key-down carrier over
 * noise in 2500 Hz, noiseSigmaForSnr); the reference is the true 10–90 % rise (what the synthesizer
 * was asked for; hard keying: the envelope's own step) and the noise-free occupied bandwidth.
 */
import { measureShape } from '../src/core/measure/shape.js';
import { addNoise, noiseSigmaForSnr } from '../src/core/signal/noise.js';
import { synthesizeTone } from '../src/core/signal/synth.js';
import { planKeying } from '../src/core/timing/plan.js';

const CASES = [
  { fs: 8000, wpm: 18, edge: 'raised-cosine', riseMs: 5, toneHz: 700 },
  { fs: 48000, wpm: 25, edge: 'raised-cosine', riseMs: 5, toneHz: 700 },
  { fs: 16000, wpm: 20, edge: 'linear', riseMs: 2.5, toneHz: 1000 },
  { fs: 24000, wpm: 18, edge: 'hard', riseMs: 0, toneHz: 700 },
] as const;
const SEEDS = [1, 2, 3];
const snrs = (process.argv[2] ?? '5,10,15,18,20,22,24,26,30,40').split(',').map(Number);
const ungated = { edges: -1000, spectrum: -1000 };

const pct = (x: number | null, ref: number): number => (x === null ? NaN : (100 * (x - ref)) / ref);
const range = (xs: number[]): string => {
  if (xs.some((x) => Number.isNaN(x))) return 'not found';
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  const f = (x: number): string => `${x >= 0 ? '+' : ''}${x.toFixed(Math.abs(x) < 10 ? 1 : 0)}`;
  return `${f(lo)} … ${f(hi)} %`;
};

console.log('SNR dB | SNR read (dB) | rise error, smooth edges | rise error, hard | occupied bw error (all four)');
console.log('---|---|---|---|---');
const prepared = CASES.map((c) => {
  const plan = planKeying('VVV Q7ZKT/B JO01', { wpm: c.wpm });
  const clean = synthesizeTone({ marks: plan.marks, sampleRate: c.fs, toneHz: c.toneHz, levelDb: -6, edge: c.edge, riseMs: c.riseMs, padMs: 400 }).samples;
  const ref = measureShape(clean, c.fs, { toneHz: c.toneHz, findShortestRise: false });
  return { c, clean, trueRiseMs: c.edge === 'hard' ? ref.riseMs.median! : c.riseMs, obwHz: ref.occupiedBandwidthHz! };
});
for (const snrDb of snrs) {
  const read: number[] = [];
  const riseSmooth: number[] = [];
  const riseHard: number[] = [];
  const obw: number[] = [];
  for (const p of prepared) {
    for (const seed of SEEDS) {
      const x = addNoise(Float32Array.from(p.clean), noiseSigmaForSnr(10 ** (-6 / 20), p.c.fs, snrDb), seed);
      const r = measureShape(x, p.c.fs, { toneHz: p.c.toneHz, findShortestRise: false, snrThresholdsDb: ungated });
      read.push(r.measurable.snrDb ?? NaN);
      (p.c.edge === 'hard' ? riseHard : riseSmooth).push(pct(r.riseMs.median, p.trueRiseMs));
      obw.push(pct(r.occupiedBandwidthHz, p.obwHz));
    }
  }
  console.log(`${snrDb} | ${Math.min(...read).toFixed(1)} … ${Math.max(...read).toFixed(1)} | ${range(riseSmooth)} | ${range(riseHard)} | ${range(obw)}`);
}
