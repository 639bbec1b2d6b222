import type { CodeTrie } from './trie.js';
import { lnI0Fast, lnI0FastInto } from './lni0.js';
import { FRACTIONAL_ZERO } from './fractional.js';

/** Mean segment lengths [slots] the decoder expects; updated as the speed is tracked. */
export interface DurationModel {
  dit: number;
  dah: number;
  elementGap: number;
  letterGap: number;
  wordGap: number;
  /** Spread of each class on a log scale (standard deviation of ln(duration)); defaults when omitted. */
  spread?: { dit: number; dah: number; elementGap: number; letterGap: number; wordGap: number };
}

export type SegmentKind = 'mark' | 'element-gap' | 'letter-gap' | 'word-gap' | 'idle';

/** One decided piece of the keying: slots (startSlot, endSlot]. */
export interface Segment {
  kind: SegmentKind;
  startSlot: number;
  endSlot: number;
  /** Mark: trie node reached by this element. Letter/word gap: the node of the character it closes. */
  node: number;
}

const NEG = -1e300;
/** Slot within each 65,536 at which the scores are shifted (see the end of step). */
const RESCALE_PHASE = 16;

/** Spread of each class on a log scale (hand-sent dash/dot ratio 2.5…4 and 20 % jitter fit inside). */
const SPREAD = { dit: 0.3, dah: 0.3, elementGap: 0.35, letterGap: 0.35, wordGap: 0.35 } as const;
/** Log prior of the gap after an element (roughly how often each follows a mark in plain text). */
const GAP_PRIOR = { elementGap: Math.log(0.6), letterGap: Math.log(0.3), wordGap: Math.log(0.1) };
const LETTER_GAP_PRIOR = GAP_PRIOR.letterGap;
const WORD_GAP_PRIOR = GAP_PRIOR.wordGap;
/** Log prior cost of a mark 6 dB below the tracked amplitude. */
const WEAKER_PRIOR = -4;
/** Log prior cost of a mark 12 dB below it (fast fading: the level tracker lags a fade by a few marks). */
const WEAKER_PRIOR_12DB = -8;
/** Paths more than this far (natural log) below the best one are dropped (beam search). */
const BEAM = 40;
/** Log penalty of decoding a run that is not a known character. */
const UNKNOWN_PENALTY = -8;
/** Log prior of each known character (0: a cost per character made decoding worse in the benchmark). */
const CHAR_PRIOR = 0;

/**
 * Mark score: the log-likelihood ratio ln I0(x) − q of a tone of the tracked amplitude, or of a
 * tone 6 or 12 dB weaker (with prior costs), whichever fits best, so that marks stay visible while
 * the amplitude tracker catches up with a fade.
 * @param x - 2·|Σ y| over the segment. @param q - Σ A²/σ² over the segment.
 * @returns Log-likelihood ratio [nats].
 * @example markScore(0, 0) //=> 0
 */
export function markScore(x: number, q: number): number {
  return weakerMarkScore(lnI0Fast(x) - q, x, q);
}

/** markScore given its first term, full = ln I0(x) − q (the score at the tracked level), already worked out. */
function weakerMarkScore(full: number, x: number, q: number): number {
  const half = lnI0Fast(0.5 * x) - 0.25 * q + WEAKER_PRIOR;
  const quarter = lnI0Fast(0.25 * x) - q / 16 + WEAKER_PRIOR_12DB;
  return full > half ? (full > quarter ? full : quarter) : half > quarter ? half : quarter;
}

/** ln d for the whole durations a table can hold (d ≤ historySlots / 4 ≤ 2^14). */
const LN_INT: Float64Array = (() => {
  const t = new Float64Array((1 << 14) + 1);
  for (let d = 1; d < t.length; d++) t[d] = Math.log(d);
  return t;
})();

interface DurationTable {
  min: number;
  max: number;
  logP: Float64Array;
}

/**
 * Log-normal duration prior around `mean` [slots] with log-scale spread `spread`, from 2.5 spreads
 * below to 2.5 above (at most `cap`), normalised over the whole slots it covers, written into
 * `into` (its logP holds cap + 1 entries): the decoder refreshes its tables at every commit, in place.
 */
function durationTable(mean: number, spread: number, cap: number, into: DurationTable): void {
  const min = Math.max(1, Math.floor(mean * Math.exp(-2.5 * spread)));
  const max = Math.max(min, Math.min(cap, Math.ceil(mean * Math.exp(2.5 * spread))));
  const logP = into.logP;
  logP.fill(NEG, 0, min);
  const k = 1 / (2 * spread * spread);
  const lnMean = Math.log(mean);
  let total = 0;
  for (let d = min; d <= max; d++) {
    const u = LN_INT[d]! - lnMean;
    logP[d] = -u * u * k;
    total += Math.exp(logP[d]!);
  }
  const norm = Math.log(total);
  for (let d = min; d <= max; d++) logP[d] = logP[d]! - norm;
  into.min = min;
  into.max = max;
}

type Spread = NonNullable<DurationModel['spread']>;

/** A model or spread object of its own, to be filled by copyModelInto (fields fractional from the start). */
function blankSpread(): Spread {
  return { dit: FRACTIONAL_ZERO, dah: FRACTIONAL_ZERO, elementGap: FRACTIONAL_ZERO, letterGap: FRACTIONAL_ZERO, wordGap: FRACTIONAL_ZERO };
}
function blankModel(): DurationModel {
  return { dit: FRACTIONAL_ZERO, dah: FRACTIONAL_ZERO, elementGap: FRACTIONAL_ZERO, letterGap: FRACTIONAL_ZERO, wordGap: FRACTIONAL_ZERO, spread: undefined };
}

/**
 * Copies a duration model into `to`, its spreads (if any) into `toSpread`, field by field rather
 * than spread ({ ...m }): the engine spreads an object with fractional fields by first making those
 * fields of its shape general ones, which throws away code compiled for the shape.
 */
function copyModelInto(from: DurationModel, to: DurationModel, toSpread: Spread): void {
  to.dit = from.dit;
  to.dah = from.dah;
  to.elementGap = from.elementGap;
  to.letterGap = from.letterGap;
  to.wordGap = from.wordGap;
  const s = from.spread;
  if (s) {
    toSpread.dit = s.dit;
    toSpread.dah = s.dah;
    toSpread.elementGap = s.elementGap;
    toSpread.letterGap = s.letterGap;
    toSpread.wordGap = s.wordGap;
    to.spread = toSpread;
  } else {
    to.spread = undefined;
  }
}

/** Subtracts `top` from every live score (above NEG) of a[0…n). */
function shiftLive(a: Float64Array, n: number, top: number): void {
  for (let k = 0; k < n; k++) if (a[k]! > NEG) a[k] = a[k]! - top;
}

function emptyTable(cap: number): DurationTable {
  return { min: 1, max: 0, logP: new Float64Array(cap + 1) };
}

/**
 * Sequence decoder: a semi-Markov (explicit-duration) Viterbi search over marks and gaps that
 * walks the code tree, so only runs of elements that form characters are cheap, after the
 * hidden-Markov decoders of the literature (D. L. Mills 1977; E. L. Bell 1977).
 *
 * Each slot brings a soft observation: the slot's complex baseband value weighted by A/σ² and the
 * energy term A²/σ² (A: carrier amplitude, σ²: noise power). A mark over slots (a, b] scores
 * ln I0(2·|Σ y|) − Σ q, the log-likelihood ratio of a tone of unknown phase against noise; gaps
 * score 0 (the noise hypothesis). Durations score by log-normal priors around the tracked means.
 * State is bounded: a ring of `historySlots` slots of scores and back-pointers.
 * @example const d = new SequenceDecoder(buildCodeTrie(), { dit: 4, dah: 12, elementGap: 4, letterGap: 12, wordGap: 28 }); d.step(yRe, yIm, q); d.traceback(0) // segments
 */
export class SequenceDecoder {
  readonly historySlots: number;
  private readonly trie: CodeTrie;
  private readonly n: number;
  private readonly nStates: number;
  private readonly stR: number;
  private readonly stS: number;
  private readonly score: Float64Array;
  private readonly bpDur: Uint16Array;
  private readonly bpPrev: Int16Array;
  private readonly yRe: Float64Array;
  private readonly yIm: Float64Array;
  private readonly yQ: Float64Array;
  private readonly bestChar: Float64Array;
  private readonly bestCharNode: Int16Array;
  private readonly charPrior: Float64Array;
  private readonly llr: Float64Array;
  /** Fade-tolerant mark scores of the current slot, llr's twin for marks longer than a dot. */
  private readonly llrWeak: Float64Array;
  /** markScores' scratch: ln I0 arguments (three per mark length), their values, and each length's q. */
  private readonly lnArg: Float64Array;
  private readonly lnOut: Float64Array;
  private readonly qOf: Float64Array;
  /** Per slot e: the fade-tolerant score of the block (e − blockSizeAt[e], e] (see markScores). */
  private readonly blockAt: Float64Array;
  private readonly blockSizeAt: Int32Array;
  /** States given a score at the current slot, in the order they were written. */
  private readonly written: Int16Array;
  /** Per slot: the best element-gap state a long dot / long dash may follow, and its score. */
  private readonly longSrcScore: [Float64Array, Float64Array];
  private readonly longSrcState: [Int16Array, Int16Array];
  /**
   * Per state: for the element gap after node p (state n + p), bit 0 if p's dot child is the long
   * dot node, bit 1 if its dash child is the long dash node; 0 for every other state.
   */
  private readonly longMask: Uint8Array;
  private blockSlots = 4;
  private minWeakSlots = 3;
  /** Duration priors [slots], refreshed in place by setModel. */
  /**
   * (Named dot and dash, not dit and dah: an object made with the same first property names as a
   * duration model would share its shape, whose fields hold numbers there and tables here, and the
   * engine would then make them general ones and throw away the code compiled for models.)
   */
  private readonly tables: { dot: DurationTable; dash: DurationTable; egap: DurationTable; lgap: DurationTable; wgap: DurationTable };
  /** The model in use, the decoder's own objects, refilled in place by setModel. */
  private readonly model = blankModel();
  private readonly modelSpread = blankSpread();
  /** Index of the last slot processed (slot 0 is the start, before any data). */
  t = 0;

  private readonly mask: number;
  private readonly rowBase: Int32Array;
  /** Last slot at which each state was within the beam. */
  private readonly lastAlive: Int32Array;

  /** @param historySlots - Ring length [slots], a power of two from 256 to 65536. */
  constructor(trie: CodeTrie, model: DurationModel, historySlots = 2048) {
    if (historySlots < 256 || historySlots > 65536 || (historySlots & (historySlots - 1)) !== 0) {
      throw new RangeError(`historySlots must be a power of two from 256 to 65536 (got ${historySlots})`);
    }
    this.trie = trie;
    this.historySlots = historySlots;
    this.mask = historySlots - 1;
    this.n = trie.size;
    this.nStates = 2 * this.n + 2;
    this.stR = 2 * this.n;
    this.stS = 2 * this.n + 1;
    const H = historySlots;
    this.score = new Float64Array(H * this.nStates).fill(NEG);
    this.bpDur = new Uint16Array(H * this.nStates);
    this.bpPrev = new Int16Array(H * this.nStates).fill(-1);
    this.yRe = new Float64Array(H);
    this.yIm = new Float64Array(H);
    this.yQ = new Float64Array(H);
    this.bestChar = new Float64Array(H).fill(NEG);
    this.bestCharNode = new Int16Array(H).fill(-1);
    this.charPrior = new Float64Array(this.n);
    for (let i = 1; i < this.n; i++) this.charPrior[i] = trie.text[i] !== null ? CHAR_PRIOR : CHAR_PRIOR + UNKNOWN_PENALTY;
    this.llr = new Float64Array(H);
    this.llrWeak = new Float64Array(H);
    // (Marks scored directly are at most a block, and a block at most the longest mark: cap slots.)
    this.lnArg = new Float64Array(3 * (Math.floor(H / 4) + 1));
    this.lnOut = new Float64Array(this.lnArg.length);
    this.qOf = new Float64Array(Math.floor(H / 4) + 1);
    this.blockAt = new Float64Array(H);
    this.blockSizeAt = new Int32Array(H);
    this.written = new Int16Array(this.nStates);
    this.longSrcScore = [new Float64Array(H).fill(NEG), new Float64Array(H).fill(NEG)];
    this.longSrcState = [new Int16Array(H).fill(-1), new Int16Array(H).fill(-1)];
    this.longMask = new Uint8Array(this.nStates);
    for (const p of trie.longDotParents) this.longMask[this.n + p] |= 1;
    for (const p of trie.longDashParents) this.longMask[this.n + p] |= 2;
    this.rowBase = new Int32Array(H);
    this.lastAlive = new Int32Array(this.nStates).fill(-1_000_000);
    this.lastAlive[this.stS] = 0;
    this.score[this.stS] = 0; // slot 0: idle
    const cap = Math.floor(H / 4);
    this.tables = { dot: emptyTable(cap), dash: emptyTable(cap), egap: emptyTable(cap), lgap: emptyTable(cap), wgap: emptyTable(cap) };
    this.setModel(model);
  }

  /** The duration model in use [slots]. */
  get durations(): DurationModel {
    const out = blankModel();
    copyModelInto(this.model, out, blankSpread());
    return out;
  }

  /**
   * Replaces the expected segment lengths [slots]. Copied into the decoder's own model object, in
   * place: the receiver sets a model at every commit, and a new object each time was 7 MB an hour.
   */
  setModel(model: DurationModel): void {
    copyModelInto(model, this.model, this.modelSpread);
    this.blockSlots = Math.max(1, Math.round(model.dit + model.elementGap));
    this.minWeakSlots = Math.max(2, Math.round(model.dit));
    const cap = Math.floor(this.historySlots / 4);
    const spread = model.spread ?? SPREAD;
    const t = this.tables;
    durationTable(model.dit, spread.dit, cap, t.dot);
    durationTable(model.dah, spread.dah, cap, t.dash);
    durationTable(model.elementGap, spread.elementGap, cap, t.egap);
    durationTable(model.letterGap, spread.letterGap, cap, t.lgap);
    durationTable(model.wordGap, SPREAD.wordGap, cap, t.wgap);
  }

  /**
   * Advances one slot.
   * @param yRe - Real part of the weighted observation (A/σ²)·z.
   * @param yIm - Imaginary part.
   * @param q - Energy term A²/σ² of the slot, ≥ 0.
   */
  step(yRe: number, yIm: number, q: number): void {
    const y = this.input;
    y[0] = yRe;
    y[1] = yIm;
    y[2] = q;
    this.stepFrom(y);
  }

  private readonly input = new Float64Array(3);

  /**
   * As step, with the slot's [yRe, yIm, q] in y[0…2]: a caller in a hot loop passes its own array,
   * as numbers passed to a method the engine does not inline (this one is large) are boxed on the
   * heap, three objects per slot otherwise.
   */
  stepFrom(y: Float64Array): void {
    const yRe = y[0]!;
    const yIm = y[1]!;
    const q = y[2]!;
    const M = this.mask;
    const S = this.nStates;
    const prevT = this.t;
    const t = ++this.t;
    const ti = t & M;
    const pi = prevT & M;
    this.yRe[ti] = this.yRe[pi]! + yRe;
    this.yIm[ti] = this.yIm[pi]! + yIm;
    this.yQ[ti] = this.yQ[pi]! + q;
    const { dot: dit, dash: dah, egap, lgap, wgap } = this.tables;
    const score = this.score;
    const base = ti * S;
    score.fill(NEG, base, base + S);
    const maxD = Math.min(Math.max(dit.max, dah.max, egap.max, lgap.max, wgap.max), t);
    const maxMark = Math.min(Math.max(dit.max, dah.max), t);
    const llr = this.llr;
    const rowBase = this.rowBase;
    for (let d = 1; d <= maxD; d++) rowBase[d] = ((t - d) & M) * S;
    this.markScores(t, maxMark);
    const written = this.written;
    let nWritten = 0;
    const { parent, symbol } = this.trie;
    const n = this.n;
    const bpDur = this.bpDur;
    const bpPrev = this.bpPrev;
    // Marks: from the gap before them (element gap of the parent, or a letter/word gap at the root).
    const lastAlive = this.lastAlive;
    // Fields read once here, not inside branches that the first stretch of a recording (often only
    // noise) never takes: the engine compiles this method early, and a field first read in such a
    // branch later makes it throw the compiled code away and compile it again.
    const stR = this.stR;
    const stS = this.stS;
    const { dotChild, dashChild } = this.trie;
    const charPrior = this.charPrior;
    const rootAlive = Math.max(lastAlive[stR]!, lastAlive[stS]!);
    for (let node = 1; node < n; node++) {
      const table = symbol[node] === 1 ? dah : dit;
      const p = parent[node]!;
      if (p < 0) continue; // a long node: below
      if ((p === 0 ? rootAlive : lastAlive[n + p]!) < t - table.max) continue;
      const hi = Math.min(table.max, t);
      let best = NEG;
      let bestD = 0;
      let bestPrev = -1;
      for (let d = table.min; d <= hi; d++) {
        const ab = rowBase[d]!;
        let src: number;
        let srcState: number;
        if (p === 0) {
          const r = score[ab + stR]!;
          const s = score[ab + stS]!;
          if (r >= s) { src = r; srcState = stR; } else { src = s; srcState = stS; }
        } else {
          src = score[ab + n + p]!;
          srcState = n + p;
        }
        if (src <= NEG) continue;
        const v = src + llr[d]! + table.logP[d]!;
        if (v > best) { best = v; bestD = d; bestPrev = srcState; }
      }
      if (bestPrev >= 0) {
        score[base + node] = best;
        bpDur[base + node] = bestD;
        bpPrev[base + node] = bestPrev;
        written[nWritten++] = node;
      }
    }
    // Long nodes (unknown runs past the tree's depth): from the best element gap that may lead to them.
    for (let kind = 0; kind < 2; kind++) {
      const node = kind === 0 ? this.trie.longDot : this.trie.longDash;
      const table = kind === 0 ? dit : dah;
      const srcScore = this.longSrcScore[kind]!;
      const srcState = this.longSrcState[kind]!;
      const hi = Math.min(table.max, t);
      let best = NEG;
      let bestD = 0;
      let bestPrev = -1;
      // Every load and comparison made at every d, with no source too (v is then NEG, as adding a
      // few hundred to −1e300 leaves it unchanged, and so never above best): long runs are rare, and
      // code first reached minutes into a recording would make the engine throw this method's
      // compiled code away and compile it again.
      for (let d = table.min; d <= hi; d++) {
        const src = srcScore[(t - d) & M]!;
        const from = srcState[(t - d) & M]!;
        const v = src + llr[d]! + table.logP[d]!;
        if (v > best) { best = v; bestD = d; bestPrev = from; }
      }
      // Stored at every slot, path or none (best is then NEG, what the row holds already, and a dead
      // state's back-pointers are never followed), for the same reason.
      score[base + node] = best;
      bpDur[base + node] = bestD;
      bpPrev[base + node] = bestPrev;
      written[nWritten] = node;
      nWritten += bestPrev >= 0 ? 1 : 0;
    }
    // Element gaps: after a mark, inside a character.
    {
      const hi = Math.min(egap.max, t);
      for (let node = 1; node < n; node++) {
        if (lastAlive[node]! < t - egap.max) continue;
        if (dotChild[node]! < 0 && dashChild[node]! < 0) continue;
        let best = NEG;
        let bestD = 0;
        for (let d = egap.min; d <= hi; d++) {
          const src = score[rowBase[d]! + node]!;
          if (src <= NEG) continue;
          const v = src + egap.logP[d]!;
          if (v > best) { best = v; bestD = d; }
        }
        if (bestD > 0) {
          score[base + n + node] = best + GAP_PRIOR.elementGap;
          bpDur[base + n + node] = bestD;
          bpPrev[base + n + node] = node;
          written[nWritten++] = n + node;
        }
      }
    }
    // Letter and word gaps: close the best character that ended where the gap starts.
    if (this.closeGap(lgap, stR, t, base)) written[nWritten++] = stR;
    const wordGapWritten = this.closeGap(wgap, stS, t, base);
    // Idle: a word gap may go on for any length.
    const idle = score[pi * S + stS]!;
    if (idle > score[base + stS]!) {
      score[base + stS] = idle;
      bpDur[base + stS] = 1;
      bpPrev[base + stS] = stS;
    }
    if (wordGapWritten || score[base + stS]! > NEG) written[nWritten++] = stS;
    // Beam: drop what is far below the best path; remember what is still alive. Only the states
    // written at this slot can hold a score (the row was cleared above).
    let top = NEG;
    for (let w = 0; w < nWritten; w++) {
      const v = score[base + written[w]!]!;
      if (v > top) top = v;
    }
    const floor = top - BEAM;
    // ... and, on the way, where a long dot / long dash could start after this slot: the best live
    // element gap among the nodes that lead to them.
    const longMask = this.longMask;
    let dotSrc = NEG, dotState = -1, dashSrc = NEG, dashState = -1;
    for (let w = 0; w < nWritten; w++) {
      const s = written[w]!;
      const v = score[base + s]!;
      if (v <= NEG) continue;
      if (v < floor) { score[base + s] = NEG; continue; }
      lastAlive[s] = t;
      // Branch-free over the kinds of state (the mask is 0 outside element gaps), with the score
      // compared first: every comparison here is then made from the first slots on, and none is
      // new to the engine when the first element gaps appear.
      const m = longMask[s]!;
      if (v > dotSrc && (m & 1) !== 0) { dotSrc = v; dotState = s; }
      if (v > dashSrc && (m & 2) !== 0) { dashSrc = v; dashState = s; }
    }
    this.longSrcScore[0][ti] = dotSrc;
    this.longSrcState[0][ti] = dotState;
    this.longSrcScore[1][ti] = dashSrc;
    this.longSrcState[1][ti] = dashState;
    // Best character ending at this slot, for the gaps that will close it (marks were written
    // first, in node order: the same node wins a tie as in a scan of all nodes).
    let bc = NEG;
    let bcNode = -1;
    for (let w = 0; w < nWritten; w++) {
      const node = written[w]!;
      if (node >= n) break;
      const v = score[base + node]! + charPrior[node]!;
      if (v > bc) { bc = v; bcNode = node; }
    }
    this.bestChar[ti] = bc;
    this.bestCharNode[ti] = bcNode;
    // Keep numbers small: shift every live score by the best one now and then (float64 keeps
    // ample precision in between).
    // (At slot 16, 65552, …: the first one early, so that the engine has seen the call before it
    // compiles this method, rather than meeting it after a quarter of an hour and compiling again.)
    if ((t & 0xffff) === RESCALE_PHASE) this.rescale(base);
  }

  /**
   * A letter or word gap ending at slot t (its row starts at `base`): closes the best character
   * that ended where the gap starts. A method rather than a callback made in step, which would be
   * a new function object at every slot. Returns 1 when the state got a score. (The gap's prior
   * follows from the state, not passed: a number passed to a call that is not inlined is boxed.)
   */
  private closeGap(table: DurationTable, state: number, t: number, base: number): number {
    const prior = state === this.stS ? WORD_GAP_PRIOR : LETTER_GAP_PRIOR;
    const M = this.mask;
    const hi = Math.min(table.max, t);
    let best = NEG;
    let bestD = 0;
    for (let d = table.min; d <= hi; d++) {
      const src = this.bestChar[(t - d) & M]!;
      if (src <= NEG) continue;
      const v = src + table.logP[d]!;
      if (v > best) { best = v; bestD = d; }
    }
    if (bestD === 0) return 0;
    this.score[base + state] = best + prior;
    this.bpDur[base + state] = bestD;
    this.bpPrev[base + state] = this.bestCharNode[(t - bestD) & M]!;
    return 1;
  }

  /** Shifts every live score by the best one at the current slot (row `base`). */
  private rescale(base: number): void {
    const H = this.historySlots;
    const S = this.nStates;
    const score = this.score;
    let top = NEG;
    for (let s = 0; s < S; s++) top = Math.max(top, score[base + s]!);
    if (top <= NEG) return;
    // (One leaf loop for all four arrays: loops one after another in this method, run once in a
    // while, were compiled in the middle of the first and sent back to slow code at the next.)
    shiftLive(score, H * S, top);
    shiftLive(this.bestChar, H, top);
    shiftLive(this.longSrcScore[0], H, top);
    shiftLive(this.longSrcScore[1], H, top);
  }

  /** Score of the best path so far (log-likelihood ratio against noise plus log priors). */
  bestScore(): number {
    const base = (this.t & this.mask) * this.nStates;
    let top = NEG;
    for (let s = 0; s < this.nStates; s++) top = Math.max(top, this.score[base + s]!);
    return top;
  }

  /**
   * Log-likelihood ratio (mark against noise) of slots (a, b], both within the history.
   * Phase is held over blocks of two units from the start: (a, a + block], (a + block, a + 2·block],
   * …, the last one shorter: dots whole, dashes in two coherent pieces summed as energy, so a tone a
   * few hertz off (drift the loop has not caught yet) costs little. Only marks of a plausible length
   * (at least about a dot) may be weaker than the tracked level: a click is short.
   */
  markLlr(a: number, b: number): number {
    const block = this.blockSlots;
    const weak = b - a >= this.minWeakSlots;
    let sum = 0;
    for (let s = a; s < b; s += block) sum += this.spanScore(s, Math.min(b, s + block), weak);
    return sum;
  }

  /** Score of a tone over slots (a, b] with one phase: fade-tolerant (markScore) or at the tracked level. */
  private spanScore(a: number, b: number, weak: boolean): number {
    const si = a & this.mask;
    const ei = b & this.mask;
    const dr = this.yRe[ei]! - this.yRe[si]!;
    const di = this.yIm[ei]! - this.yIm[si]!;
    const x = 2 * Math.sqrt(dr * dr + di * di);
    const q = this.yQ[ei]! - this.yQ[si]!;
    return weak ? markScore(x, q) : lnI0Fast(x) - q;
  }

  /**
   * Fills llr[d] = markLlr(t − d, t) for d = 1…maxMark in O(block + maxMark) rather than
   * O(maxMark²/block): a mark longer than a block is its first, whole block plus the mark over the
   * rest, which ends at t too and was scored just before (w[d − block]); each whole block's score
   * is kept by its last slot (blockAt), as it does not change once the slot is past.
   */
  private markScores(t: number, maxMark: number): void {
    const M = this.mask;
    const block = this.blockSlots;
    const minWeak = this.minWeakSlots;
    const llr = this.llr;
    const w = this.llrWeak;
    const ti = t & M;
    const yr = this.yRe[ti]!;
    const yi = this.yIm[ti]!;
    const yq = this.yQ[ti]!;
    const direct = Math.min(maxMark, block);
    // markScore(x, q) for each mark of d ≤ block slots, in two passes with no call per number (see
    // lnI0FastInto): the arguments x, x/2, x/4 at lnArg[3d…3d+2], then their ln I0 at once, then
    // weakerMarkScore's choice written out.
    const lnArg = this.lnArg;
    const ln = this.lnOut;
    const qd = this.qOf;
    for (let d = 1; d <= direct; d++) {
      const si = (t - d) & M;
      const dr = yr - this.yRe[si]!;
      const di = yi - this.yIm[si]!;
      const x = 2 * Math.sqrt(dr * dr + di * di);
      qd[d] = yq - this.yQ[si]!;
      lnArg[3 * d] = x;
      lnArg[3 * d + 1] = 0.5 * x;
      lnArg[3 * d + 2] = 0.25 * x;
    }
    lnI0FastInto(lnArg, ln, 3, 3 * direct + 3);
    for (let d = 1; d <= direct; d++) {
      const q = qd[d]!;
      const full = ln[3 * d]! - q;
      const half = ln[3 * d + 1]! - 0.25 * q + WEAKER_PRIOR;
      const quarter = ln[3 * d + 2]! - q / 16 + WEAKER_PRIOR_12DB;
      const fw = full > half ? (full > quarter ? full : quarter) : half > quarter ? half : quarter;
      w[d] = fw;
      llr[d] = d >= minWeak ? fw : full;
    }
    // The whole block ending now, for the marks that will start with it. (Not kept over the first
    // two blocks: the recomputation below then runs at the start too, so it is no path new to the
    // engine when a change of speed later makes the kept blocks stale.)
    if (t >= 2 * block) {
      this.blockAt[ti] = w[block]!;
      this.blockSizeAt[ti] = block;
    }
    for (let d = block + 1; d <= maxMark; d++) {
      const e = t - d + block;
      const ei = e & M;
      const first = this.blockSizeAt[ei] === block ? this.blockAt[ei]! : this.spanScore(t - d, e, true);
      const v = first + w[d - block]!;
      w[d] = v;
      llr[d] = v;
    }
  }

  /**
   * The best path's segments that end after slot `sinceSlot` (and, when given, no later than
   * `endLimit`: the recent ones, not yet final, are walked over without making objects for them),
   * oldest first, traced back from the best state at the current slot.
   */
  traceback(sinceSlot: number, endLimit = Infinity): Segment[] {
    const H = this.historySlots;
    const S = this.nStates;
    const n = this.n;
    const base = (this.t % H) * S;
    let state = -1;
    let best = NEG;
    for (let s = 0; s < S; s++) {
      const v = this.score[base + s]! + (s >= 1 && s < n ? this.charPrior[s]! : 0);
      if (v > best) { best = v; state = s; }
    }
    const out: Segment[] = [];
    let tau = this.t;
    while (state >= 0 && tau > sinceSlot) {
      const k = (tau % H) * S + state;
      const d = this.bpDur[k]!;
      const prev = this.bpPrev[k]!;
      if (d === 0) break;
      let kind: SegmentKind;
      let node: number;
      if (state < n) { kind = 'mark'; node = state; }
      else if (state < 2 * n) { kind = 'element-gap'; node = state - n; }
      else if (state === this.stR) { kind = 'letter-gap'; node = prev; }
      else if (prev === this.stS && d === 1) { kind = 'idle'; node = -1; }
      else { kind = 'word-gap'; node = prev; }
      if (tau <= endLimit) out.push({ kind, startSlot: tau - d, endSlot: tau, node });
      tau -= d;
      state = prev;
    }
    return out.reverse();
  }
}
