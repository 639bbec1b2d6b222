/**
 * Banded edit-distance alignment of two sequences (dynamic programming): pairs items of a planned
 * sequence with items of an observed one, at a caller-given pairing cost, and leaves items unpaired
 * at a fixed skip cost. Only cells within `band` of a caller-given centre are computed, so memory
 * grows with the length of the sequences, not with its square.
 */

export interface BandedAlignInput {
  /** Number of observed items. */
  n: number;
  /** Number of planned items. */
  m: number;
  /** Observed index expected to pair with planned item j (0-based); need not be exact. */
  center(j: number): number;
  /** Cost of pairing observed i with planned j; Infinity forbids the pair. */
  pairCost(i: number, j: number): number;
  /** Cost of leaving one item (either side) unpaired, > 0. */
  skipCost: number;
  /** Half-width of the band around each centre [items], ≥ 1. */
  band: number;
}

export interface BandedAlignResult {
  /** For each planned item, the index of its observed item or −1. */
  pairs: number[];
  /** Total cost of the alignment. */
  cost: number;
}

/**
 * Finds the cheapest alignment (pairs in order, no crossing) within the band.
 * @example bandedAlign({ n: 2, m: 3, center: (j) => j, pairCost: (i, j) => ([0, 2][i] === j ? 0 : Infinity), skipCost: 1, band: 4 }).pairs //=> [0, -1, 1]
 */
export function bandedAlign(input: BandedAlignInput): BandedAlignResult {
  const { n, m, pairCost, skipCost } = input;
  const band = Math.max(1, Math.round(input.band));
  // Row j = planned items consumed; column i = observed items consumed; row j covers i in [lo[j], hi[j]].
  const lo = new Int32Array(m + 1);
  const hi = new Int32Array(m + 1);
  for (let j = 1; j <= m; j++) {
    const c = Math.round(input.center(j - 1)) + 1;
    lo[j] = Math.min(n, Math.max(0, c - band));
    hi[j] = Math.max(0, Math.min(n, c + band));
  }
  lo[0] = 0;
  hi[0] = Math.min(n, band);
  hi[m] = n;
  // Make the bands non-decreasing and overlapping so that a path from (0, 0) to (m, n) exists.
  for (let j = m - 1; j >= 0; j--) lo[j] = Math.min(lo[j]!, lo[j + 1]!);
  for (let j = 1; j <= m; j++) hi[j] = Math.max(hi[j]!, hi[j - 1]!);
  for (let j = m - 1; j >= 0; j--) hi[j] = Math.max(hi[j]!, lo[j + 1]!);

  const cost: Float64Array[] = [];
  const from: Uint8Array[] = []; // 1 pair, 2 planned unpaired (up), 3 observed unpaired (left)
  const at = (j: number, i: number): number => (i < lo[j]! || i > hi[j]! ? Infinity : cost[j]![i - lo[j]!]!);
  for (let j = 0; j <= m; j++) {
    const width = hi[j]! - lo[j]! + 1;
    const row = new Float64Array(width);
    const back = new Uint8Array(width);
    for (let i = lo[j]!; i <= hi[j]!; i++) {
      let best = j === 0 && i === 0 ? 0 : Infinity;
      let how = 0;
      if (j > 0 && i > 0) {
        const prev = at(j - 1, i - 1);
        if (prev < Infinity) {
          const c = prev + pairCost(i - 1, j - 1);
          if (c < best) [best, how] = [c, 1];
        }
      }
      if (j > 0) {
        const c = at(j - 1, i) + skipCost;
        if (c < best) [best, how] = [c, 2];
      }
      if (i > lo[j]!) {
        const c = row[i - 1 - lo[j]!]! + skipCost;
        if (c < best) [best, how] = [c, 3];
      }
      row[i - lo[j]!] = best;
      back[i - lo[j]!] = how;
    }
    cost.push(row);
    from.push(back);
  }
  const pairs = new Array<number>(m).fill(-1);
  let j = m;
  let i = n;
  while (j > 0 || i > 0) {
    const how = from[j]![i - lo[j]!]!;
    if (how === 1) {
      pairs[j - 1] = i - 1;
      j--;
      i--;
    } else if (how === 2) j--;
    else if (how === 3) i--;
    else throw new Error('alignment backtrack left its band'); // cannot happen: the bands are connected
  }
  return { pairs, cost: at(m, n) };
}
