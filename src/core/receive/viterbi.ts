import type { CodeTrie } from './trie.js';
import { lnI0FastTable } from './lni0.js';
import { sequenceStepModule } from './wasm/module.js';

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

/** Spread of each class on a log scale (hand-sent dash/dot ratio 2.5…4 and 20 % jitter fit inside). */
const SPREAD = { dit: 0.3, dah: 0.3, elementGap: 0.35, letterGap: 0.35, wordGap: 0.35 } as const;
/** Log prior of the gap after an element (roughly how often each follows a mark in plain text). */
const GAP_PRIOR = { elementGap: Math.log(0.6), letterGap: Math.log(0.3), wordGap: Math.log(0.1) };
/** Log penalty of decoding a run that is not a known character. */
const UNKNOWN_PENALTY = -8;
/** Log prior of each known character (0: a cost per character made decoding worse in the benchmark). */
const CHAR_PRIOR = 0;
// The beam (40 nats), the prior costs of a mark 6 and 12 dB weaker than the tracked level (−4, −8:
// the level tracker lags a fast fade by a few marks) and the rescaling slot are the step's own:
// see wasm/sequence-step.as.ts.

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
  if (!(max <= cap)) {
    // A mean past the ring's reach (or not a number): no duration of this class can be scored. The
    // step indexes its arrays by these bounds, so they never leave 1…cap.
    logP.fill(NEG);
    into.min = 1;
    into.max = 0;
    return;
  }
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

/** The step's exports (wasm/sequence-step.as.ts). */
interface StepExports {
  init(header: number): void;
  step(t: number): void;
  markLlr(a: number, b: number): number;
}

/** Header words the step reads (wasm/sequence-step.as.ts names them). */
const H_WORDS = 56;
const H_PARAMS = 44;

/**
 * Lays out arrays in one WebAssembly memory from byte `from` on, each at a multiple of 16 bytes.
 * `take` returns an array's byte offset; `memory()` makes the memory once all are taken.
 */
class MemoryLayout {
  private end: number;
  constructor(from: number) {
    this.end = from;
  }
  take(bytes: number): number {
    const at = this.end;
    this.end = at + Math.ceil(bytes / 16) * 16;
    return at;
  }
  memory(): WebAssembly.Memory {
    const pages = Math.ceil(this.end / 65536);
    return new WebAssembly.Memory({ initial: pages, maximum: pages });
  }
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
 *
 * The step itself runs as WebAssembly (wasm/sequence-step.as.ts, which explains each part), over
 * arrays in a memory of this decoder's own; this class lays them out, keeps the duration tables and
 * walks the back-pointers.
 * @example const d = new SequenceDecoder(buildCodeTrie(), { dit: 4, dah: 12, elementGap: 4, letterGap: 12, wordGap: 28 }); d.step(yRe, yIm, q); d.traceback(0) // segments
 */
export class SequenceDecoder {
  readonly historySlots: number;
  private readonly n: number;
  private readonly nStates: number;
  private readonly stR: number;
  private readonly stS: number;
  /**
   * The step's exports, called through Function.prototype.call: each decoder has a WebAssembly
   * instance of its own, and a direct call would be compiled for the first instance's function, then
   * thrown away (a "wrong call target") when the next recording's decoder brings its own; a call made
   * through .call is compiled for any function.
   */
  private readonly core: StepExports;
  /** Header words: layout, then the tables' reach and block sizes (H_PARAMS on), which setModel writes. */
  private readonly header: Int32Array;
  private readonly score: Float64Array;
  private readonly bpDur: Uint16Array;
  private readonly bpPrev: Int16Array;
  private readonly charPrior: Float64Array;
  /** Mark scores of the current slot by length (read by the tests). */
  private readonly llr: Float64Array;
  /** The slot's [yRe, yIm, q], where the step reads them. */
  private readonly input: Float64Array;
  /**
   * Duration priors [slots], refreshed in place by setModel; logP are views on the step's memory.
   * (Named dot and dash, not dit and dah: an object made with the same first property names as a
   * duration model would share its shape, whose fields hold numbers there and tables here, and the
   * engine would then make them general ones and throw away the code compiled for models.)
   */
  private readonly tables: { dot: DurationTable; dash: DurationTable; egap: DurationTable; lgap: DurationTable; wgap: DurationTable };
  /** Index of the last slot processed (slot 0 is the start, before any data). */
  t = 0;

  /** @param historySlots - Ring length [slots], a power of two from 256 to 65536. */
  constructor(trie: CodeTrie, model: DurationModel, historySlots = 2048) {
    if (historySlots < 256 || historySlots > 65536 || (historySlots & (historySlots - 1)) !== 0) {
      throw new RangeError(`historySlots must be a power of two from 256 to 65536 (got ${historySlots})`);
    }
    const module = sequenceStepModule();
    this.historySlots = historySlots;
    const n = (this.n = trie.size);
    const S = (this.nStates = 2 * n + 2);
    this.stR = 2 * n;
    this.stS = 2 * n + 1;
    const H = historySlots;
    const cap = Math.floor(H / 4);
    const fast = lnI0FastTable();
    // Page 0 is left to the compiled module; the header and arrays follow.
    const lay = new MemoryLayout(65536);
    const at = {
      header: lay.take(4 * H_WORDS),
      score: lay.take(8 * H * S),
      bpDur: lay.take(2 * H * S),
      bpPrev: lay.take(2 * H * S),
      yRe: lay.take(8 * H),
      yIm: lay.take(8 * H),
      yQ: lay.take(8 * H),
      bestChar: lay.take(8 * H),
      bestCharNode: lay.take(2 * H),
      charPrior: lay.take(8 * n),
      llr: lay.take(8 * H),
      llrWeak: lay.take(8 * H),
      // (Marks scored directly are at most a block, and a block at most the longest mark: cap slots.)
      lnArg: lay.take(8 * 3 * (cap + 1)),
      lnOut: lay.take(8 * 3 * (cap + 1)),
      qOf: lay.take(8 * (cap + 1)),
      blockAt: lay.take(8 * H),
      blockSizeAt: lay.take(4 * H),
      written: lay.take(2 * S),
      longSrcScore0: lay.take(8 * H),
      longSrcScore1: lay.take(8 * H),
      longSrcState0: lay.take(2 * H),
      longSrcState1: lay.take(2 * H),
      longMask: lay.take(S),
      rowBase: lay.take(4 * H),
      lastAlive: lay.take(4 * S),
      parent: lay.take(2 * n),
      symbol: lay.take(n),
      dotChild: lay.take(2 * n),
      dashChild: lay.take(2 * n),
      fast: lay.take(8 * fast.length),
      input: lay.take(8 * 3),
      logPDot: lay.take(8 * (cap + 1)),
      logPDash: lay.take(8 * (cap + 1)),
      logPEgap: lay.take(8 * (cap + 1)),
      logPLgap: lay.take(8 * (cap + 1)),
      logPWgap: lay.take(8 * (cap + 1)),
      priors: lay.take(8 * 3),
    };
    const memory = lay.memory();
    const buf = memory.buffer;
    const f64 = (offset: number, length: number): Float64Array => new Float64Array(buf, offset, length);
    const i16 = (offset: number, length: number): Int16Array => new Int16Array(buf, offset, length);
    const i32 = (offset: number, length: number): Int32Array => new Int32Array(buf, offset, length);
    this.header = i32(at.header, H_WORDS);
    this.header.set([S, n, H - 1, this.stR, this.stS, trie.longDot, trie.longDash, H]);
    // Byte offsets in the order the step's header names them (H_SCORE = 8 … H_PRIORS = 43).
    this.header.set(Object.values(at).slice(1), 8);
    this.score = f64(at.score, H * S).fill(NEG);
    this.bpDur = new Uint16Array(buf, at.bpDur, H * S);
    this.bpPrev = i16(at.bpPrev, H * S).fill(-1);
    f64(at.bestChar, H).fill(NEG);
    i16(at.bestCharNode, H).fill(-1);
    this.charPrior = f64(at.charPrior, n);
    for (let i = 1; i < n; i++) this.charPrior[i] = trie.text[i] !== null ? CHAR_PRIOR : CHAR_PRIOR + UNKNOWN_PENALTY;
    this.llr = f64(at.llr, H);
    f64(at.longSrcScore0, H).fill(NEG);
    f64(at.longSrcScore1, H).fill(NEG);
    i16(at.longSrcState0, H).fill(-1);
    i16(at.longSrcState1, H).fill(-1);
    const longMask = new Uint8Array(buf, at.longMask, S);
    for (const p of trie.longDotParents) longMask[n + p] |= 1;
    for (const p of trie.longDashParents) longMask[n + p] |= 2;
    const lastAlive = i32(at.lastAlive, S).fill(-1_000_000);
    lastAlive[this.stS] = 0;
    this.score[this.stS] = 0; // slot 0: idle
    i16(at.parent, n).set(trie.parent);
    new Int8Array(buf, at.symbol, n).set(trie.symbol);
    i16(at.dotChild, n).set(trie.dotChild);
    i16(at.dashChild, n).set(trie.dashChild);
    f64(at.fast, fast.length).set(fast);
    this.input = f64(at.input, 3);
    f64(at.priors, 3).set([GAP_PRIOR.elementGap, GAP_PRIOR.letterGap, GAP_PRIOR.wordGap]);
    const table = (offset: number): DurationTable => ({ min: 1, max: 0, logP: f64(offset, cap + 1) });
    this.tables = { dot: table(at.logPDot), dash: table(at.logPDash), egap: table(at.logPEgap), lgap: table(at.logPLgap), wgap: table(at.logPWgap) };
    const instance = new WebAssembly.Instance(module, { env: { memory, log: Math.log } });
    this.core = instance.exports as unknown as StepExports;
    this.core.init(at.header);
    this.setModel(model);
  }

  /** Replaces the expected segment lengths [slots]: the tables are refreshed in place (the receiver sets a model at every commit). */
  setModel(model: DurationModel): void {
    const cap = Math.floor(this.historySlots / 4);
    const spread = model.spread ?? SPREAD;
    const t = this.tables;
    durationTable(model.dit, spread.dit, cap, t.dot);
    durationTable(model.dah, spread.dah, cap, t.dash);
    durationTable(model.elementGap, spread.elementGap, cap, t.egap);
    durationTable(model.letterGap, spread.letterGap, cap, t.lgap);
    durationTable(model.wordGap, SPREAD.wordGap, cap, t.wgap);
    const h = this.header;
    h[H_PARAMS] = t.dot.min;
    h[H_PARAMS + 1] = t.dot.max;
    h[H_PARAMS + 2] = t.dash.min;
    h[H_PARAMS + 3] = t.dash.max;
    h[H_PARAMS + 4] = t.egap.min;
    h[H_PARAMS + 5] = t.egap.max;
    h[H_PARAMS + 6] = t.lgap.min;
    h[H_PARAMS + 7] = t.lgap.max;
    h[H_PARAMS + 8] = t.wgap.min;
    h[H_PARAMS + 9] = t.wgap.max;
    // Marks are scored in blocks of about two units (see markLlr), weaker-than-tracked only from about a dot.
    h[H_PARAMS + 10] = Math.max(1, Math.round(model.dit + model.elementGap));
    h[H_PARAMS + 11] = Math.max(2, Math.round(model.dit));
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
    this.core.step.call(undefined, ++this.t);
  }

  /**
   * As step, with the slot's [yRe, yIm, q] in y[0…2]: a caller in a hot loop passes its own array,
   * as numbers passed to a call the engine does not inline are boxed on the heap.
   */
  stepFrom(y: Float64Array): void {
    const input = this.input;
    input[0] = y[0]!;
    input[1] = y[1]!;
    input[2] = y[2]!;
    this.core.step.call(undefined, ++this.t);
  }

  /** Score of the best path so far (log-likelihood ratio against noise plus log priors). */
  bestScore(): number {
    const base = (this.t & (this.historySlots - 1)) * this.nStates;
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
    return this.core.markLlr.call(undefined, a, b);
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
