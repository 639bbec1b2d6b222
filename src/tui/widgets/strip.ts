import type { Interval } from '../../core/timeline.js';

/**
 * A one-line picture of key-down time: each column covers `msPerColumn` ms from `startMs`;
 * `█` (mostly) down, `▌` partly down (an edge in the column), `·` up. Pure, for the timeline strip.
 */
export function keyingStrip(marks: readonly Interval[], startMs: number, msPerColumn: number, width: number): string {
  const down = new Float64Array(width);
  for (const [a, b] of marks) {
    const c0 = Math.max(0, Math.floor((a - startMs) / msPerColumn));
    const c1 = Math.min(width - 1, Math.floor((b - startMs) / msPerColumn));
    for (let c = c0; c <= c1; c++) {
      const lo = startMs + c * msPerColumn;
      const hi = lo + msPerColumn;
      down[c] = down[c]! + Math.max(0, Math.min(b, hi) - Math.max(a, lo));
    }
  }
  let out = '';
  for (let c = 0; c < width; c++) {
    const f = down[c]! / msPerColumn;
    out += f > 0.75 ? '█' : f > 0.25 ? '▌' : '·';
  }
  return out;
}

/** Character labels placed under the strip at each character's start column. */
export function labelRow(chars: readonly { text: string; startMs: number }[], startMs: number, msPerColumn: number, width: number): string {
  const row = Array<string>(width).fill(' ');
  let free = 0;
  for (const ch of chars) {
    const col = Math.floor((ch.startMs - startMs) / msPerColumn);
    if (col < 0) continue;
    if (col >= width) break;
    const at = Math.max(col, free);
    const label = Array.from(ch.text);
    if (at + label.length > width) break;
    label.forEach((s, i) => (row[at + i] = s));
    free = at + label.length + 1;
  }
  return row.join('');
}

/** A time ruler: a tick `|` and the time in seconds every `everyColumns` columns. */
export function timeRuler(startMs: number, msPerColumn: number, width: number, everyColumns = 10): string {
  const row = Array<string>(width).fill(' ');
  for (let c = 0; c < width; c += everyColumns) {
    const label = `|${((startMs + c * msPerColumn) / 1000).toFixed(1)}s`;
    if (c + label.length > width) break;
    Array.from(label).forEach((s, i) => (row[c + i] = s));
  }
  return row.join('');
}
