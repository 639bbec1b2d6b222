/**
 * Edit (Levenshtein) distance between two strings: the fewest single-character insertions,
 * deletions and substitutions that turn one into the other. Character error rate = distance /
 * reference length. Memory: one row of the reference's length.
 * @param a - Decoded text. @param b - Reference text.
 * @returns The distance, 0…max(a.length, b.length).
 * @example editDistance('Q7ZKT DE', 'Q7ZKT IE') //=> 1
 */
export function editDistance(a: string, b: string): number {
  const prev = new Array<number>(b.length + 1);
  for (let j = 0; j <= b.length; j++) prev[j] = j;
  for (let i = 1; i <= a.length; i++) {
    let diag = prev[0]!;
    prev[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const tmp = prev[j]!;
      prev[j] = Math.min(prev[j]! + 1, prev[j - 1]! + 1, diag + (a[i - 1] === b[j - 1] ? 0 : 1));
      diag = tmp;
    }
  }
  return prev[b.length]!;
}
