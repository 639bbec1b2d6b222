import { PATTERN_TO_TEXT } from '../morse/alphabet.js';

/**
 * The code tree the sequence decoder walks: every prefix of a known pattern, plus every pattern up
 * to `UNKNOWN_DEPTH` elements so that unknown characters can still be decoded (printed `*`), plus
 * two "long" nodes that take any further element of a run that has left the tree below that depth
 * (one ending in a dot, one in a dash; each is the other's child and its own), so that an unknown
 * run of any length stays one character.
 */
export interface CodeTrie {
  /** Number of nodes; node 0 is the root (no element yet). */
  size: number;
  /** Parent node of each node (−1 for the root and the two long nodes, which have many). */
  parent: Int16Array;
  /** Last element of each node's pattern: 0 dot, 1 dash (−1 for the root). */
  symbol: Int8Array;
  /** Child for a dot / dash, or −1. */
  dotChild: Int16Array;
  dashChild: Int16Array;
  /** Dots and dashes of each node. */
  pattern: string[];
  /** Text printed for each node's pattern, or null when it is not a known character. */
  text: (string | null)[];
  /** The long nodes: an unknown run of more than `UNKNOWN_DEPTH` elements ending in a dot / a dash. */
  longDot: number;
  longDash: number;
  /** Nodes whose dot child / dash child is the long node (the long nodes themselves included). */
  longDotParents: Int16Array;
  longDashParents: Int16Array;
}

/** Longest run of elements decoded as an unknown character (`*`). */
export const UNKNOWN_DEPTH = 6;

/**
 * Builds the code tree from the alphabet (ITU-R M.1677-1 patterns, prosigns and extensions).
 * @example buildCodeTrie().text[buildCodeTrie().dotChild[0]!] //=> 'E'
 */
export function buildCodeTrie(): CodeTrie {
  const patterns = new Set<string>();
  for (const p of PATTERN_TO_TEXT.keys()) patterns.add(p);
  const all = new Set<string>(['']);
  for (const p of patterns) for (let i = 1; i <= p.length; i++) all.add(p.slice(0, i));
  const grow = (prefix: string): void => {
    if (prefix.length >= UNKNOWN_DEPTH) return;
    for (const c of ['.', '-']) {
      all.add(prefix + c);
      grow(prefix + c);
    }
  };
  grow('');
  const list = [...all].sort((a, b) => a.length - b.length || (a < b ? -1 : a > b ? 1 : 0));
  const index = new Map<string, number>();
  list.forEach((p, i) => index.set(p, i));
  const longDot = list.length;
  const longDash = list.length + 1;
  const size = list.length + 2;
  const parent = new Int16Array(size).fill(-1);
  const symbol = new Int8Array(size).fill(-1);
  const dotChild = new Int16Array(size).fill(-1);
  const dashChild = new Int16Array(size).fill(-1);
  list.forEach((p, i) => {
    if (p.length === 0) return;
    const up = index.get(p.slice(0, -1))!;
    parent[i] = up;
    symbol[i] = p.endsWith('-') ? 1 : 0;
    if (symbol[i] === 0) dotChild[up] = i;
    else dashChild[up] = i;
  });
  symbol[longDot] = 0;
  symbol[longDash] = 1;
  const toDot: number[] = [];
  const toDash: number[] = [];
  list.forEach((p, i) => {
    if (p.length < UNKNOWN_DEPTH) return;
    if (dotChild[i]! < 0) { dotChild[i] = longDot; toDot.push(i); }
    if (dashChild[i]! < 0) { dashChild[i] = longDash; toDash.push(i); }
  });
  for (const long of [longDot, longDash]) {
    dotChild[long] = longDot;
    dashChild[long] = longDash;
    toDot.push(long);
    toDash.push(long);
  }
  return {
    size, parent, symbol, dotChild, dashChild,
    pattern: [...list, `(${'.'.repeat(UNKNOWN_DEPTH)}…).`, `(${'.'.repeat(UNKNOWN_DEPTH)}…)-`],
    text: [...list.map((p) => PATTERN_TO_TEXT.get(p) ?? null), null, null],
    longDot, longDash, longDotParents: Int16Array.from(toDot), longDashParents: Int16Array.from(toDash),
  };
}
