/**
 * The sequence decoder's step (see ../viterbi.ts), in AssemblyScript, compiled to WebAssembly by
 * `npm run build:wasm` into sequence-step.wasm.ts (committed; a test checks that it matches this
 * source). Why: every worker thread of a batch compiles JavaScript afresh, while a WebAssembly
 * module's compiled code is shared by all threads of the process, so a second worker no longer pays
 * again for the hottest code of the decoder.
 *
 * The arithmetic is the JavaScript decoder's, operation for operation, in float64 (WebAssembly's
 * +, −, ×, ÷ and sqrt are IEEE 754's, as JavaScript's are; ln comes from the host's Math.log), so
 * the decoder's results are unchanged to the last bit.
 *
 * Memory is the host's: it lays out every array (typed-array views on the same memory), writes
 * their byte offsets into a header of 32-bit words and calls `init(header)`. The duration tables'
 * reach and the block sizes are read from the header at every step, so the host changes them by
 * writing there. Nothing is allocated here.
 */

@external('env', 'log')
declare function hostLog(x: f64): f64;

/** Score of a state no path reaches. */
const NEG: f64 = -1e300;
/** Paths more than this far (natural log) below the best one are dropped (beam search). */
const BEAM: f64 = 40;
/** Slot within each 65,536 at which the scores are shifted (see the end of step). */
const RESCALE_PHASE: i32 = 16;
/** Log prior cost of a mark 6 dB below the tracked amplitude. */
const WEAKER_PRIOR: f64 = -4;
/** Log prior cost of a mark 12 dB below it (fast fading: the level tracker lags a fade by a few marks). */
const WEAKER_PRIOR_12DB: f64 = -8;
/** Reach of the host's ln I0 table (steps of 1/64). */
const FAST_MAX: f64 = 64;

// Header words (32-bit), as the host writes them.
const H_STATES = 0;
const H_NODES = 1;
const H_MASK = 2;
const H_ST_R = 3;
const H_ST_S = 4;
const H_LONG_DOT = 5;
const H_LONG_DASH = 6;
const H_SLOTS = 7;
// Byte offsets of the arrays.
const H_SCORE = 8;
const H_BP_DUR = 9;
const H_BP_PREV = 10;
const H_Y_RE = 11;
const H_Y_IM = 12;
const H_Y_Q = 13;
const H_BEST_CHAR = 14;
const H_BEST_CHAR_NODE = 15;
const H_CHAR_PRIOR = 16;
const H_LLR = 17;
const H_LLR_WEAK = 18;
const H_LN_ARG = 19;
const H_LN_OUT = 20;
const H_Q_OF = 21;
const H_BLOCK_AT = 22;
const H_BLOCK_SIZE_AT = 23;
const H_WRITTEN = 24;
const H_LONG_SRC_SCORE_0 = 25;
const H_LONG_SRC_SCORE_1 = 26;
const H_LONG_SRC_STATE_0 = 27;
const H_LONG_SRC_STATE_1 = 28;
const H_LONG_MASK = 29;
const H_ROW_BASE = 30;
const H_LAST_ALIVE = 31;
const H_PARENT = 32;
const H_SYMBOL = 33;
const H_DOT_CHILD = 34;
const H_DASH_CHILD = 35;
const H_FAST_TABLE = 36;
const H_INPUT = 37;
const H_LOGP_DOT = 38;
const H_LOGP_DASH = 39;
const H_LOGP_EGAP = 40;
const H_LOGP_LGAP = 41;
const H_LOGP_WGAP = 42;
const H_PRIORS = 43;
// Words the host changes between steps.
const H_DOT_MIN = 44;
const H_DOT_MAX = 45;
const H_DASH_MIN = 46;
const H_DASH_MAX = 47;
const H_EGAP_MIN = 48;
const H_EGAP_MAX = 49;
const H_LGAP_MIN = 50;
const H_LGAP_MAX = 51;
const H_WGAP_MIN = 52;
const H_WGAP_MAX = 53;
const H_BLOCK_SLOTS = 54;
const H_MIN_WEAK_SLOTS = 55;

let hdr: usize = 0;
let S: i32 = 0;
let n: i32 = 0;
let M: i32 = 0;
let stR: i32 = 0;
let stS: i32 = 0;
let longDot: i32 = 0;
let longDash: i32 = 0;
let H: i32 = 0;
let oScore: usize = 0;
let oBpDur: usize = 0;
let oBpPrev: usize = 0;
let oYRe: usize = 0;
let oYIm: usize = 0;
let oYQ: usize = 0;
let oBestChar: usize = 0;
let oBestCharNode: usize = 0;
let oCharPrior: usize = 0;
let oLlr: usize = 0;
let oLlrWeak: usize = 0;
let oLnArg: usize = 0;
let oLnOut: usize = 0;
let oQOf: usize = 0;
let oBlockAt: usize = 0;
let oBlockSizeAt: usize = 0;
let oWritten: usize = 0;
let oLongSrcScore0: usize = 0;
let oLongSrcScore1: usize = 0;
let oLongSrcState0: usize = 0;
let oLongSrcState1: usize = 0;
let oLongMask: usize = 0;
let oRowBase: usize = 0;
let oLastAlive: usize = 0;
let oParent: usize = 0;
let oSymbol: usize = 0;
let oDotChild: usize = 0;
let oDashChild: usize = 0;
let oFast: usize = 0;
let oInput: usize = 0;
let oLogPDot: usize = 0;
let oLogPDash: usize = 0;
let oLogPEgap: usize = 0;
let oLogPLgap: usize = 0;
let oLogPWgap: usize = 0;
let elementGapPrior: f64 = 0;
let letterGapPrior: f64 = 0;
let wordGapPrior: f64 = 0;

@inline function word(k: i32): i32 {
  return load<i32>(hdr + (<usize>k << 2));
}
@inline function at(k: i32): usize {
  return <usize>word(k);
}
@inline function f64At(base: usize, i: i32): f64 {
  return load<f64>(base + (<usize>i << 3));
}
@inline function setF64(base: usize, i: i32, v: f64): void {
  store<f64>(base + (<usize>i << 3), v);
}
@inline function i32At(base: usize, i: i32): i32 {
  return load<i32>(base + (<usize>i << 2));
}
@inline function setI32(base: usize, i: i32, v: i32): void {
  store<i32>(base + (<usize>i << 2), v);
}
@inline function i16At(base: usize, i: i32): i32 {
  return <i32>load<i16>(base + (<usize>i << 1));
}
@inline function setI16(base: usize, i: i32, v: i32): void {
  store<i16>(base + (<usize>i << 1), <i16>v);
}
@inline function imax(a: i32, b: i32): i32 {
  return a > b ? a : b;
}
@inline function imin(a: i32, b: i32): i32 {
  return a < b ? a : b;
}

/** Reads the layout the host wrote at `header`. */
export function init(header: usize): void {
  hdr = header;
  S = word(H_STATES);
  n = word(H_NODES);
  M = word(H_MASK);
  stR = word(H_ST_R);
  stS = word(H_ST_S);
  longDot = word(H_LONG_DOT);
  longDash = word(H_LONG_DASH);
  H = word(H_SLOTS);
  oScore = at(H_SCORE);
  oBpDur = at(H_BP_DUR);
  oBpPrev = at(H_BP_PREV);
  oYRe = at(H_Y_RE);
  oYIm = at(H_Y_IM);
  oYQ = at(H_Y_Q);
  oBestChar = at(H_BEST_CHAR);
  oBestCharNode = at(H_BEST_CHAR_NODE);
  oCharPrior = at(H_CHAR_PRIOR);
  oLlr = at(H_LLR);
  oLlrWeak = at(H_LLR_WEAK);
  oLnArg = at(H_LN_ARG);
  oLnOut = at(H_LN_OUT);
  oQOf = at(H_Q_OF);
  oBlockAt = at(H_BLOCK_AT);
  oBlockSizeAt = at(H_BLOCK_SIZE_AT);
  oWritten = at(H_WRITTEN);
  oLongSrcScore0 = at(H_LONG_SRC_SCORE_0);
  oLongSrcScore1 = at(H_LONG_SRC_SCORE_1);
  oLongSrcState0 = at(H_LONG_SRC_STATE_0);
  oLongSrcState1 = at(H_LONG_SRC_STATE_1);
  oLongMask = at(H_LONG_MASK);
  oRowBase = at(H_ROW_BASE);
  oLastAlive = at(H_LAST_ALIVE);
  oParent = at(H_PARENT);
  oSymbol = at(H_SYMBOL);
  oDotChild = at(H_DOT_CHILD);
  oDashChild = at(H_DASH_CHILD);
  oFast = at(H_FAST_TABLE);
  oInput = at(H_INPUT);
  oLogPDot = at(H_LOGP_DOT);
  oLogPDash = at(H_LOGP_DASH);
  oLogPEgap = at(H_LOGP_EGAP);
  oLogPLgap = at(H_LOGP_LGAP);
  oLogPWgap = at(H_LOGP_WGAP);
  const priors = at(H_PRIORS);
  elementGapPrior = f64At(priors, 0);
  letterGapPrior = f64At(priors, 1);
  wordGapPrior = f64At(priors, 2);
}

/** ln I0(a), a ≥ 64, by the asymptotic expansion (lni0.ts: lnI0Asymptotic, the same operations). */
function lnI0Asymptotic(a: f64): f64 {
  return a - 0.5 * hostLog(2.0 * Math.PI * a) + 1.0 / (8.0 * a) + 9.0 / (128.0 * a * a);
}

/** lnI0Fast (lni0.ts): interpolation in the host's table below 64, the expansion above. */
@inline function lnI0Fast(x: f64): f64 {
  const a = x < 0 ? -x : x;
  if (a < FAST_MAX) {
    const u = a * 64.0;
    const i = <i32>u;
    const t0 = f64At(oFast, i);
    return t0 + (u - <f64>i) * (f64At(oFast, i + 1) - t0);
  }
  return lnI0Asymptotic(a);
}

/**
 * Mark score: the log-likelihood ratio ln I0(x) − q of a tone of the tracked amplitude, or of a
 * tone 6 or 12 dB weaker (with prior costs), whichever fits best, so that marks stay visible while
 * the amplitude tracker catches up with a fade. x = 2·|Σ y| over the segment, q = Σ A²/σ².
 */
function markScore(x: f64, q: f64): f64 {
  const full = lnI0Fast(x) - q;
  const half = lnI0Fast(0.5 * x) - 0.25 * q + WEAKER_PRIOR;
  const quarter = lnI0Fast(0.25 * x) - q / 16.0 + WEAKER_PRIOR_12DB;
  return full > half ? (full > quarter ? full : quarter) : half > quarter ? half : quarter;
}

/** Score of a tone over slots (a, b] with one phase: fade-tolerant (markScore) or at the tracked level. */
function spanScore(a: i32, b: i32, weak: bool): f64 {
  const si = a & M;
  const ei = b & M;
  const dr = f64At(oYRe, ei) - f64At(oYRe, si);
  const di = f64At(oYIm, ei) - f64At(oYIm, si);
  const x = 2.0 * Math.sqrt(dr * dr + di * di);
  const q = f64At(oYQ, ei) - f64At(oYQ, si);
  return weak ? markScore(x, q) : lnI0Fast(x) - q;
}

/**
 * Log-likelihood ratio (mark against noise) of slots (a, b], both within the history. Phase is held
 * over blocks of about two units from the start: (a, a + block], (a + block, a + 2·block], …, the
 * last one shorter: dots whole, dashes in two coherent pieces summed as energy, so a tone a few
 * hertz off (drift the loop has not caught yet) costs little. Only marks of a plausible length (at
 * least about a dot) may be weaker than the tracked level: a click is short.
 */
export function markLlr(a: i32, b: i32): f64 {
  const block = word(H_BLOCK_SLOTS);
  const weak = b - a >= word(H_MIN_WEAK_SLOTS);
  let sum: f64 = 0;
  for (let s = a; s < b; s += block) sum += spanScore(s, imin(b, s + block), weak);
  return sum;
}

/**
 * Fills llr[d] = markLlr(t − d, t) for d = 1…maxMark in O(block + maxMark) rather than
 * O(maxMark²/block): a mark longer than a block is its first, whole block plus the mark over the
 * rest, which ends at t too and was scored just before (llrWeak[d − block]); each whole block's
 * score is kept by its last slot (blockAt), as it does not change once the slot is past. Marks of
 * at most a block are scored directly: their ln I0 arguments x, x/2, x/4 first, then the values.
 */
function markScores(t: i32, maxMark: i32, block: i32, minWeak: i32): void {
  const ti = t & M;
  const yr = f64At(oYRe, ti);
  const yi = f64At(oYIm, ti);
  const yq = f64At(oYQ, ti);
  const direct = imin(maxMark, block);
  for (let d = 1; d <= direct; d++) {
    const si = (t - d) & M;
    const dr = yr - f64At(oYRe, si);
    const di = yi - f64At(oYIm, si);
    const x = 2.0 * Math.sqrt(dr * dr + di * di);
    setF64(oQOf, d, yq - f64At(oYQ, si));
    setF64(oLnArg, 3 * d, x);
    setF64(oLnArg, 3 * d + 1, 0.5 * x);
    setF64(oLnArg, 3 * d + 2, 0.25 * x);
  }
  const to = 3 * direct + 3;
  for (let k = 3; k < to; k++) setF64(oLnOut, k, lnI0Fast(f64At(oLnArg, k)));
  for (let d = 1; d <= direct; d++) {
    const q = f64At(oQOf, d);
    const full = f64At(oLnOut, 3 * d) - q;
    const half = f64At(oLnOut, 3 * d + 1) - 0.25 * q + WEAKER_PRIOR;
    const quarter = f64At(oLnOut, 3 * d + 2) - q / 16.0 + WEAKER_PRIOR_12DB;
    const fw = full > half ? (full > quarter ? full : quarter) : half > quarter ? half : quarter;
    setF64(oLlrWeak, d, fw);
    setF64(oLlr, d, d >= minWeak ? fw : full);
  }
  // The whole block ending now, for the marks that will start with it (not over the first two blocks).
  if (t >= 2 * block) {
    setF64(oBlockAt, ti, f64At(oLlrWeak, block));
    setI32(oBlockSizeAt, ti, block);
  }
  for (let d = block + 1; d <= maxMark; d++) {
    const e = t - d + block;
    const ei = e & M;
    const first = i32At(oBlockSizeAt, ei) == block ? f64At(oBlockAt, ei) : spanScore(t - d, e, true);
    const v = first + f64At(oLlrWeak, d - block);
    setF64(oLlrWeak, d, v);
    setF64(oLlr, d, v);
  }
}

/** A letter or word gap ending at slot t (its row at `base`): closes the best character that ended where the gap starts; 1 when the state got a score. */
function closeGap(logP: usize, min: i32, max: i32, state: i32, prior: f64, t: i32, base: i32): i32 {
  const hi = imin(max, t);
  let best = NEG;
  let bestD = 0;
  for (let d = min; d <= hi; d++) {
    const src = f64At(oBestChar, (t - d) & M);
    if (src <= NEG) continue;
    const v = src + f64At(logP, d);
    if (v > best) {
      best = v;
      bestD = d;
    }
  }
  if (bestD == 0) return 0;
  setF64(oScore, base + state, best + prior);
  setI16(oBpDur, base + state, bestD);
  setI16(oBpPrev, base + state, i16At(oBestCharNode, (t - bestD) & M));
  return 1;
}

/** Subtracts `top` from every live score (above NEG) of the n float64 at a. */
function shiftLive(a: usize, count: i32, top: f64): void {
  for (let k = 0; k < count; k++) {
    const v = f64At(a, k);
    if (v > NEG) setF64(a, k, v - top);
  }
}

/** Shifts every live score by the best one at the current slot (row `base`): float64 keeps ample precision in between. */
function rescale(base: i32): void {
  let top = NEG;
  for (let s = 0; s < S; s++) top = Math.max(top, f64At(oScore, base + s));
  if (top <= NEG) return;
  shiftLive(oScore, H * S, top);
  shiftLive(oBestChar, H, top);
  shiftLive(oLongSrcScore0, H, top);
  shiftLive(oLongSrcScore1, H, top);
}

/**
 * Advances to slot t (the previous slot + 1) with the slot's observation [yRe, yIm, q] at the input
 * offset: prefix sums of the observation, every mark's score, then the best way into each state at
 * this slot over every duration its table allows (semi-Markov Viterbi), the beam, and what the
 * next slots need (where long runs may start, the best character ending here).
 */
export function step(t: i32): void {
  const yRe = f64At(oInput, 0);
  const yIm = f64At(oInput, 1);
  const q = f64At(oInput, 2);
  const dotMin = word(H_DOT_MIN);
  const dotMax = word(H_DOT_MAX);
  const dashMin = word(H_DASH_MIN);
  const dashMax = word(H_DASH_MAX);
  const egapMin = word(H_EGAP_MIN);
  const egapMax = word(H_EGAP_MAX);
  const lgapMin = word(H_LGAP_MIN);
  const lgapMax = word(H_LGAP_MAX);
  const wgapMin = word(H_WGAP_MIN);
  const wgapMax = word(H_WGAP_MAX);
  const prevT = t - 1;
  const ti = t & M;
  const pi = prevT & M;
  setF64(oYRe, ti, f64At(oYRe, pi) + yRe);
  setF64(oYIm, ti, f64At(oYIm, pi) + yIm);
  setF64(oYQ, ti, f64At(oYQ, pi) + q);
  const base = ti * S;
  for (let s = 0; s < S; s++) setF64(oScore, base + s, NEG);
  const maxD = imin(imax(imax(imax(dotMax, dashMax), imax(egapMax, lgapMax)), wgapMax), t);
  const maxMark = imin(imax(dotMax, dashMax), t);
  for (let d = 1; d <= maxD; d++) setI32(oRowBase, d, ((t - d) & M) * S);
  markScores(t, maxMark, word(H_BLOCK_SLOTS), word(H_MIN_WEAK_SLOTS));
  let nWritten = 0;
  const rootAlive = imax(i32At(oLastAlive, stR), i32At(oLastAlive, stS));
  // Marks: from the gap before them (element gap of the parent, or a letter/word gap at the root).
  // A node whose parent state has been out of the beam for longer than the longest mark is skipped.
  for (let node = 1; node < n; node++) {
    const isDash = <i32>load<i8>(oSymbol + <usize>node) == 1;
    const tMin = isDash ? dashMin : dotMin;
    const tMax = isDash ? dashMax : dotMax;
    const logP = isDash ? oLogPDash : oLogPDot;
    const p = i16At(oParent, node);
    if (p < 0) continue;
    if ((p == 0 ? rootAlive : i32At(oLastAlive, n + p)) < t - tMax) continue;
    const hi = imin(tMax, t);
    let best = NEG;
    let bestD = 0;
    let bestPrev = -1;
    for (let d = tMin; d <= hi; d++) {
      const ab = i32At(oRowBase, d);
      let src: f64;
      let srcState: i32;
      if (p == 0) {
        const r = f64At(oScore, ab + stR);
        const s = f64At(oScore, ab + stS);
        if (r >= s) {
          src = r;
          srcState = stR;
        } else {
          src = s;
          srcState = stS;
        }
      } else {
        src = f64At(oScore, ab + n + p);
        srcState = n + p;
      }
      if (src <= NEG) continue;
      const v = src + f64At(oLlr, d) + f64At(logP, d);
      if (v > best) {
        best = v;
        bestD = d;
        bestPrev = srcState;
      }
    }
    if (bestPrev >= 0) {
      setF64(oScore, base + node, best);
      setI16(oBpDur, base + node, bestD);
      setI16(oBpPrev, base + node, bestPrev);
      setI16(oWritten, nWritten++, node);
    }
  }
  // Long nodes (unknown runs past the tree's depth): from the best element gap that may lead to them,
  // kept per slot below. Stored at every slot, path or none (best stays NEG).
  for (let kind = 0; kind < 2; kind++) {
    const node = kind == 0 ? longDot : longDash;
    const tMin = kind == 0 ? dotMin : dashMin;
    const tMax = kind == 0 ? dotMax : dashMax;
    const logP = kind == 0 ? oLogPDot : oLogPDash;
    const srcScore = kind == 0 ? oLongSrcScore0 : oLongSrcScore1;
    const srcStateOf = kind == 0 ? oLongSrcState0 : oLongSrcState1;
    const hi = imin(tMax, t);
    let best = NEG;
    let bestD = 0;
    let bestPrev = -1;
    for (let d = tMin; d <= hi; d++) {
      const src = f64At(srcScore, (t - d) & M);
      const from = i16At(srcStateOf, (t - d) & M);
      const v = src + f64At(oLlr, d) + f64At(logP, d);
      if (v > best) {
        best = v;
        bestD = d;
        bestPrev = from;
      }
    }
    setF64(oScore, base + node, best);
    setI16(oBpDur, base + node, bestD);
    setI16(oBpPrev, base + node, bestPrev);
    setI16(oWritten, nWritten, node);
    nWritten += bestPrev >= 0 ? 1 : 0;
  }
  // Element gaps: after a mark, inside a character.
  {
    const hi = imin(egapMax, t);
    for (let node = 1; node < n; node++) {
      if (i32At(oLastAlive, node) < t - egapMax) continue;
      if (i16At(oDotChild, node) < 0 && i16At(oDashChild, node) < 0) continue;
      let best = NEG;
      let bestD = 0;
      for (let d = egapMin; d <= hi; d++) {
        const src = f64At(oScore, i32At(oRowBase, d) + node);
        if (src <= NEG) continue;
        const v = src + f64At(oLogPEgap, d);
        if (v > best) {
          best = v;
          bestD = d;
        }
      }
      if (bestD > 0) {
        setF64(oScore, base + n + node, best + elementGapPrior);
        setI16(oBpDur, base + n + node, bestD);
        setI16(oBpPrev, base + n + node, node);
        setI16(oWritten, nWritten++, n + node);
      }
    }
  }
  // Letter and word gaps: close the best character that ended where the gap starts.
  if (closeGap(oLogPLgap, lgapMin, lgapMax, stR, letterGapPrior, t, base) != 0) setI16(oWritten, nWritten++, stR);
  const wordGapWritten = closeGap(oLogPWgap, wgapMin, wgapMax, stS, wordGapPrior, t, base);
  // Idle: a word gap may go on for any length.
  const idle = f64At(oScore, pi * S + stS);
  if (idle > f64At(oScore, base + stS)) {
    setF64(oScore, base + stS, idle);
    setI16(oBpDur, base + stS, 1);
    setI16(oBpPrev, base + stS, stS);
  }
  if (wordGapWritten != 0 || f64At(oScore, base + stS) > NEG) setI16(oWritten, nWritten++, stS);
  // Beam: drop what is far below the best path; remember what is still alive. Only the states
  // written at this slot can hold a score (the row was cleared above). On the way, where a long dot /
  // long dash could start after this slot: the best live element gap among the nodes leading to them.
  let top = NEG;
  for (let w = 0; w < nWritten; w++) {
    const v = f64At(oScore, base + i16At(oWritten, w));
    if (v > top) top = v;
  }
  const floor = top - BEAM;
  let dotSrc = NEG;
  let dotState = -1;
  let dashSrc = NEG;
  let dashState = -1;
  for (let w = 0; w < nWritten; w++) {
    const s = i16At(oWritten, w);
    const v = f64At(oScore, base + s);
    if (v <= NEG) continue;
    if (v < floor) {
      setF64(oScore, base + s, NEG);
      continue;
    }
    setI32(oLastAlive, s, t);
    const m = <i32>load<u8>(oLongMask + <usize>s);
    if (v > dotSrc && (m & 1) != 0) {
      dotSrc = v;
      dotState = s;
    }
    if (v > dashSrc && (m & 2) != 0) {
      dashSrc = v;
      dashState = s;
    }
  }
  setF64(oLongSrcScore0, ti, dotSrc);
  setI16(oLongSrcState0, ti, dotState);
  setF64(oLongSrcScore1, ti, dashSrc);
  setI16(oLongSrcState1, ti, dashState);
  // Best character ending at this slot, for the gaps that will close it (marks were written first, in
  // node order: the same node wins a tie as in a scan of all nodes).
  let bc = NEG;
  let bcNode = -1;
  for (let w = 0; w < nWritten; w++) {
    const node = i16At(oWritten, w);
    if (node >= n) break;
    const v = f64At(oScore, base + node) + f64At(oCharPrior, node);
    if (v > bc) {
      bc = v;
      bcNode = node;
    }
  }
  setF64(oBestChar, ti, bc);
  setI16(oBestCharNode, ti, bcNode);
  // Keep numbers small: shift every live score by the best one now and then.
  if ((t & 0xffff) == RESCALE_PHASE) rescale(base);
}
