/**
 * The envelope part of the keying-shape analysis, a stretch at a time: a long recording is cut (in
 * key-up gaps where it can be) into stretches of about STRETCH_MS, each analysed with a margin on both
 * sides, so the working arrays (complex envelope and its magnitude) stay the size of one stretch
 * however long the recording is. What is kept from each stretch is small: the marks, their chirp
 * tracks, a few edge snippets for the overlay and the SNR sums.
 */
import type { Interval } from '../timeline.js';
import { chirpTracks, type ChirpOptions, type ChirpTrack } from './chirp.js';
import { edgeSnippet, measureEdges, type EdgeAnalysis, type EdgeCounts, type EdgeSnippet, type MarkShape } from './edges.js';
import { complexBaseband, magnitude, type Baseband } from './shape-analytic.js';
import { addSnrSums, type SnrSums } from './shape-snr.js';

/** Length of one stretch [ms]; recordings up to 1.5× this are analysed in one piece. */
export const STRETCH_MS = 20_000;
/** Margin analysed on each side of a stretch (neighbouring marks, filter start-up) [ms]. */
export const MARGIN_MS = 1000;
/** Edge snippets kept for the overlay before thinning to every other one. */
const MAX_SNIPPETS = 80;

export interface Stretch {
  /** Marks whose key-down lies in [keepFromMs, keepToMs) belong to this stretch [ms, recording's clock]. */
  keepFromMs: number;
  keepToMs: number;
  /** Samples analysed: [fromMs, toMs), the kept part plus the margins. */
  fromMs: number;
  toMs: number;
}

/**
 * Cuts a recording into stretches of about `stretchMs`, each cut in the middle of the key-up gap
 * nearest the ideal cut (within a quarter stretch), so no mark is split.
 * @param recordMs - Length of the recording [ms].
 * @param marks - Key-down intervals known beforehand (the receiver's) [ms]; may be empty.
 * @example planStretches(50_000, []).length //=> 2 (25 s each)
 */
export function planStretches(recordMs: number, marks: readonly Interval[], stretchMs = STRETCH_MS, marginMs = MARGIN_MS): Stretch[] {
  const count = recordMs <= 1.5 * stretchMs ? 1 : Math.round(recordMs / stretchMs);
  const cuts = [0];
  for (let k = 1; k < count; k++) {
    const ideal = (k * recordMs) / count;
    let best = ideal;
    let bestDist = stretchMs / 4;
    for (let i = 1; i < marks.length; i++) {
      const mid = (marks[i - 1]![1] + marks[i]![0]) / 2;
      if (Math.abs(mid - ideal) < bestDist && mid > cuts[cuts.length - 1]!) {
        bestDist = Math.abs(mid - ideal);
        best = mid;
      }
    }
    cuts.push(best);
  }
  cuts.push(recordMs);
  const out: Stretch[] = [];
  for (let k = 0; k + 1 < cuts.length; k++) {
    const keepFromMs = k === 0 ? 0 : cuts[k]!;
    const keepToMs = k + 2 === cuts.length ? recordMs : cuts[k + 1]!;
    out.push({ keepFromMs, keepToMs, fromMs: Math.max(0, keepFromMs - marginMs), toMs: Math.min(recordMs, keepToMs + marginMs) });
  }
  return out;
}

export interface EnvelopePass {
  /** All marks on the recording's clock, with summed counts; levels are those of the first stretch. */
  edges: EdgeAnalysis;
  chirpTracks: ChirpTrack[];
  /** Edge snippets for the overlay (every `snippetStride`-th measured mark). */
  snippets: EdgeSnippet[];
  snippetStride: number;
  snr: SnrSums;
  /** Filter facts (the same for every stretch). */
  baseband: Pick<Baseband, 'passBandHz' | 'taperHz' | 'narrowestSideHz'>;
  /** Envelope means just inside the first and last 5 ms and the highest envelope value, for the cut-edge warnings. */
  ends: { startMean: number; endMean: number; peak: number; length: number };
  stretches: number;
}

export interface EnvelopePassOptions {
  toneHz: number;
  halfBandHz?: number;
  /** Key-down intervals for the SNR sums and the cuts [ms]. */
  timingMarks: readonly Interval[];
  chirp: ChirpOptions;
  onProgress?: (fraction: number) => void;
}

function shiftMark(m: MarkShape, dMs: number): MarkShape {
  return {
    ...m,
    startMs: m.startMs + dMs,
    endMs: m.endMs + dMs,
    rise: m.rise ? { ...m.rise, at50Ms: m.rise.at50Ms + dMs } : null,
    fall: m.fall ? { ...m.fall, at50Ms: m.fall.at50Ms + dMs } : null,
  };
}

/**
 * One pass of the envelope analysis over the whole recording, a stretch at a time.
 * @param samples - The recording (only read).
 * @param sampleRate - Sample rate [Hz].
 * @returns Marks, chirp tracks, overlay snippets and SNR sums of the whole recording.
 * @example envelopePass(samples, 48000, { toneHz: 700, timingMarks: [], chirp: {} }).edges.marks.length //=> marks found
 */
export function envelopePass(samples: Float32Array, sampleRate: number, options: EnvelopePassOptions): EnvelopePass {
  const perMs = sampleRate / 1000;
  const recordMs = samples.length / perMs;
  const stretches = planStretches(recordMs, options.timingMarks);
  const marks: MarkShape[] = [];
  const tracks: ChirpTrack[] = [];
  let snippets: EdgeSnippet[] = [];
  let stride = 1;
  let measuredSeen = 0;
  const counts: EdgeCounts = { bumps: 0, kept: 0, tooShort: 0, tooNoisy: 0, endsInMark: false, noKeyDown: false };
  let noKeyDownAll = true;
  const snr: SnrSums = { onSum: 0, onN: 0, offSum: 0, offN: 0 };
  let first: EdgeAnalysis | null = null;
  let meta: EnvelopePass['baseband'] | null = null;
  const ends = { startMean: 0, endMean: 0, peak: 0, length: samples.length };
  const n5 = Math.max(1, Math.round(sampleRate * 0.005));
  // One set of working arrays, the size of the longest stretch, reused for every stretch.
  const longest = Math.max(...stretches.map((st, k) => (k + 1 === stretches.length ? samples.length : Math.round(st.toMs * perMs)) - Math.round(st.fromMs * perMs)));
  const work = { re: new Float32Array(longest), im: new Float32Array(longest), env: new Float32Array(longest) };
  // A loop, not a callback: see stretchMean.
  for (let k = 0; k < stretches.length; k++) {
    const st = stretches[k]!;
    const i0 = Math.round(st.fromMs * perMs);
    const i1 = k + 1 === stretches.length ? samples.length : Math.round(st.toMs * perMs);
    const startMs = i0 / perMs;
    const part = samples.subarray(i0, i1);
    const bb = complexBaseband(part, sampleRate, {
      toneHz: options.toneHz,
      halfBandHz: options.halfBandHz,
      output: work,
      onProgress: options.onProgress ? (f) => options.onProgress!((k + f) / stretches.length) : undefined,
    });
    meta ??= { passBandHz: bb.passBandHz, taperHz: bb.taperHz, narrowestSideHz: bb.narrowestSideHz };
    const env = magnitude(bb, work.env);
    const a = measureEdges(env, sampleRate, { keepFromMs: st.keepFromMs - startMs, keepToMs: st.keepToMs - startMs });
    first ??= a;
    counts.bumps += a.counts.bumps;
    counts.kept += a.counts.kept;
    counts.tooShort += a.counts.tooShort;
    counts.tooNoisy += a.counts.tooNoisy;
    if (k + 1 === stretches.length) counts.endsInMark = a.counts.endsInMark;
    noKeyDownAll &&= a.counts.noKeyDown;
    for (const m of a.marks) marks.push(shiftMark(m, startMs));
    tracks.push(...chirpTracks(bb, sampleRate, a.marks, options.chirp, startMs));
    for (const m of a.marks) {
      if (!m.rise || !m.fall) continue;
      if (measuredSeen++ % stride !== 0) continue;
      const s = edgeSnippet(env, sampleRate, m, i0);
      if (s) snippets.push(s);
      if (snippets.length >= MAX_SNIPPETS) {
        // Keep every other one and take every other one from now on: evenly spread, bounded.
        snippets = snippets.filter((_, j) => j % 2 === 0);
        stride *= 2;
      }
    }
    addSnrSums(snr, bb, sampleRate, options.timingMarks, { startMs, keepFromMs: st.keepFromMs, keepToMs: st.keepToMs, recordMs });
    ends.peak = Math.max(ends.peak, peakOf(env));
    if (k === 0) ends.startMean = stretchMean(env, 2 * n5, 3 * n5);
    if (k + 1 === stretches.length) ends.endMean = stretchMean(env, env.length - 3 * n5, env.length - 2 * n5);
  }
  counts.noKeyDown = noKeyDownAll;
  const f = first ?? measureEdges(new Float32Array(0), sampleRate);
  return {
    edges: { marks, counts, thresholdLevel: f.thresholdLevel, onLevel: f.onLevel, offLevel: f.offLevel, warnings: [] },
    chirpTracks: tracks,
    snippets,
    snippetStride: stride,
    snr,
    baseband: meta ?? { passBandHz: [0, 0], taperHz: 0, narrowestSideHz: 0 },
    ends,
    stretches: stretches.length,
  };
}

// Sample loops live in module-level functions: a callback made inside the per-recording function
// would be a new function at every call, whose compiled code the engine does not keep from one
// recording to the next (a batch would compile it again for every file).

/** Mean of env[i0…i1) (clipped to the array), over the nominal length i1 − i0. */
function stretchMean(env: Float32Array, i0: number, i1: number): number {
  let s = 0;
  for (let i = Math.max(0, i0); i < Math.min(env.length, i1); i++) s += env[i]!;
  return s / Math.max(1, i1 - i0);
}

/** Largest value of env (−∞ for an empty array). */
function peakOf(env: Float32Array): number {
  let peak = -Infinity;
  for (let i = 0; i < env.length; i++) if (env[i]! > peak) peak = env[i]!;
  return peak;
}
