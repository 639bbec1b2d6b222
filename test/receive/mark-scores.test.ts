/**
 * The sequence decoder scores every candidate mark ending at the current slot. It does so
 * incrementally (a long mark = its first whole block + the shorter mark after it); this checks the
 * incremental scores against a reference written here from the definition: blocks of
 * `round(dit + elementGap)` slots from the start of the mark, each scored as the log-likelihood ratio
 * ln I0(2·|Σ y|) − Σ q of a tone of unknown phase against noise (or of a tone 6 / 12 dB weaker, with
 * log prior costs −4 / −8, for marks at least a dot long), with I0 from its power series
 * I0(x) = Σ (x/2)^(2k) / (k!)² (Abramowitz & Stegun 9.6.12).
 */
import { describe, expect, it } from 'vitest';
import { buildCodeTrie } from '../../src/core/receive/trie.js';
import { SequenceDecoder, type DurationModel } from '../../src/core/receive/viterbi.js';
import { seededRandom } from '../../src/core/signal/noise.js';

/** ln I0(x) from the power series, summed in the log domain (exact to double precision for x ≤ 200). */
function lnI0Series(x: number): number {
  const h = (x / 2) ** 2;
  let term = 1;
  let sum = 1;
  let k = 0;
  // Scale as we go to avoid overflow: track ln of a running scale.
  let lnScale = 0;
  while (k < 2000) {
    k++;
    term *= h / (k * k);
    sum += term;
    if (sum > 1e200) {
      lnScale += Math.log(sum);
      term /= sum;
      sum = 1;
    }
    if (term < 1e-17 * sum) break;
  }
  return lnScale + Math.log(sum);
}

function referenceLlr(yRe: number[], yIm: number[], q: number[], a: number, b: number, block: number, minWeak: number): number {
  const one = (s: number, e: number, weak: boolean): number => {
    let re = 0;
    let im = 0;
    let qq = 0;
    for (let k = s; k < e; k++) {
      re += yRe[k]!;
      im += yIm[k]!;
      qq += q[k]!;
    }
    const x = 2 * Math.hypot(re, im);
    const full = lnI0Series(x) - qq;
    if (!weak) return full;
    return Math.max(full, lnI0Series(x / 2) - qq / 4 - 4, lnI0Series(x / 4) - qq / 16 - 8);
  };
  let sum = 0;
  for (let s = a; s < b; s += block) sum += one(s, Math.min(b, s + block), b - a >= minWeak);
  return sum;
}

describe('incremental mark scores of the sequence decoder', () => {
  it('equal the block-wise log-likelihood ratio from the definition, for every length, also after a change of speed', () => {
    const trie = buildCodeTrie();
    const models: DurationModel[] = [
      { dit: 4, dah: 12, elementGap: 4, letterGap: 12, wordGap: 28 }, // block 8, dot 4
      { dit: 6.4, dah: 19, elementGap: 5.8, letterGap: 18, wordGap: 42 }, // block 12, dot 6 (slower sender)
      { dit: 3, dah: 9, elementGap: 3, letterGap: 9, wordGap: 21 }, // block 6 (faster)
    ];
    const decoder = new SequenceDecoder(trie, models[0]!, 256);
    const random = seededRandom(11);
    // Slot observations y = (A/σ²)·z with q = A²/σ² = 2.5 (about 4 dB per slot): key-down runs (a
    // tone with slowly turning phase) and noise of variance q (uniform, per component q/2). Strong
    // enough that noise-only spans often score best as a faded tone, so both kinds of score occur.
    const yRe: number[] = [];
    const yIm: number[] = [];
    const q: number[] = [];
    let checked = 0;
    let worst = 0;
    for (let t = 1; t <= 700; t++) {
      const on = Math.floor(t / 9) % 3 !== 0;
      const qt = 2.5;
      const phase = 0.05 * t;
      const spread = Math.sqrt(12 * (qt / 2));
      const re = (on ? qt * Math.cos(phase) : 0) + (random() - 0.5) * spread;
      const im = (on ? qt * Math.sin(phase) : 0) + (random() - 0.5) * spread;
      yRe.push(re);
      yIm.push(im);
      q.push(qt);
      if (t === 250) decoder.setModel(models[1]!);
      if (t === 480) decoder.setModel(models[2]!);
      decoder.step(re, im, qt);
      const model = t >= 480 ? models[2]! : t >= 250 ? models[1]! : models[0]!;
      const block = Math.max(1, Math.round(model.dit + model.elementGap));
      const minWeak = Math.max(2, Math.round(model.dit));
      const llr = decoder['llr'] as Float64Array;
      const durations = decoder['tables'] as { dot: { max: number }; dash: { max: number } };
      const maxMark = Math.min(Math.max(durations.dot.max, durations.dash.max), t);
      if (t % 7 !== 0) continue; // every 7th slot: enough cases, a fast test
      for (let d = 1; d <= maxMark; d++) {
        const want = referenceLlr(yRe, yIm, q, t - d, t, block, minWeak);
        const got = llr[d]!;
        worst = Math.max(worst, Math.abs(got - want));
        expect(got).toBeCloseTo(want, 3);
        // The public one-off score agrees with the incremental one.
        expect(decoder.markLlr(t - d, t)).toBeCloseTo(want, 3);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(2000);
    expect(worst).toBeLessThan(5e-4); // lnI0Fast is within 2e-5 per block
  });
});
