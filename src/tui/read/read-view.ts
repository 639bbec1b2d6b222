/**
 * Pure helpers that turn the receiver's and the timing report's results into lines for the screen.
 * They format; every figure comes from the core.
 */
import type { DecodedCharacter } from '../core-modules.js';
import { histogramColumns } from '../widgets/charts.js';

/** Confidence below which a character is marked as doubtful on screen. */
export const DOUBTFUL_BELOW = 0.6;

/**
 * Wraps decoded text to `width` columns, with a second line per row that puts `?` under each
 * doubtful character. Characters are matched to the text in order; when they do not match, the
 * text is shown without marks.
 */
export function markedTextLines(text: string, characters: readonly DecodedCharacter[], width: number): { text: string; marks: string }[] {
  const tokens: { s: string; doubtful: boolean }[] = [];
  let p = 0;
  let ci = 0;
  let matched = true;
  while (p < text.length) {
    if (text[p] === ' ') {
      tokens.push({ s: ' ', doubtful: false });
      p++;
      continue;
    }
    const ch = characters[ci];
    if (matched && ch && text.startsWith(ch.text, p)) {
      tokens.push({ s: ch.text, doubtful: ch.confidence < DOUBTFUL_BELOW });
      p += ch.text.length;
      ci++;
    } else {
      matched = false;
      tokens.push({ s: text[p]!, doubtful: false });
      p++;
    }
  }
  const rows: { text: string; marks: string }[] = [];
  let line = '';
  let marks = '';
  for (const t of tokens) {
    if (Array.from(line).length + t.s.length > width && line.length > 0) {
      rows.push({ text: line, marks });
      line = '';
      marks = '';
      if (t.s === ' ') continue;
    }
    line += t.s;
    marks += (t.doubtful ? '?' : ' ').repeat(Array.from(t.s).length);
  }
  if (line.length > 0 || rows.length === 0) rows.push({ text: line, marks });
  return rows;
}

const num = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);
const fmt = (x: unknown, digits = 1): string => {
  const n = num(x);
  return n === null ? '–' : n.toFixed(digits);
};

/**
 * The timing report's histogram as columns: one column per bin (bin k centred on k·binUnits),
 * `rows` high, marks and gaps one above the other, with a ruler in units below.
 */
export function histogramLines(report: Record<string, unknown>, width: number, rows = 3): string[] {
  const h = report.histogram as { binUnits?: unknown; marks?: unknown; gaps?: unknown; marksOver?: unknown; gapsOver?: unknown } | undefined;
  if (!h || !Array.isArray(h.marks) || !Array.isArray(h.gaps) || typeof h.binUnits !== 'number') return [];
  const bin = h.binUnits;
  const marks = h.marks as number[];
  const gaps = h.gaps as number[];
  let last = 0;
  marks.forEach((c, i) => c > 0 && (last = Math.max(last, i)));
  gaps.forEach((c, i) => c > 0 && (last = Math.max(last, i)));
  const label = 7;
  const n = Math.min(last + 1, Math.max(8, width - label - 1));
  const padded = (a: number[]): number[] => Array.from({ length: n }, (_, i) => a[i] ?? 0);
  const cols = histogramColumns([padded(marks), padded(gaps)], rows);
  const ruler = Array<string>(n).fill(' ');
  for (let k = 0; k < n; k++) {
    const u = k * bin;
    if (Math.abs(u - Math.round(u)) < 1e-9 && Math.round(u) % (n > 40 ? 2 : 1) === 0) {
      const t = String(Math.round(u));
      const free = (k === 0 || ruler[k - 1] === ' ') && ruler.slice(k, k + t.length + 1).every((c) => c === ' ');
      if (k + t.length <= n && free) Array.from(t).forEach((c, i) => (ruler[k + i] = c));
    }
  }
  const over = (x: unknown): string => (typeof x === 'number' && x > 0 ? ` +${x} longer` : '');
  return [
    ...cols[0]!.map((l, i) => `${(i === rows - 1 ? 'marks' : '').padEnd(label)}${l}${i === rows - 1 ? over(h.marksOver) : ''}`),
    ...cols[1]!.map((l, i) => `${(i === rows - 1 ? 'gaps' : '').padEnd(label)}${l}${i === rows - 1 ? over(h.gapsOver) : ''}`),
    `${'units'.padEnd(label)}${ruler.join('')}`,
  ];
}

/** Summary lines (each under 52 columns) and the histogram of the timing report for the lower pane. */
export function timingLines(report: Record<string, unknown>, width: number, histogramRows = 2): string[] {
  const gaps = (report.gapUnits ?? {}) as Record<string, unknown>;
  const gap = (g: unknown): string => fmt(typeof g === 'number' ? g : ((g ?? {}) as Record<string, unknown>).median, 2);
  const drift = num(report.driftWpm);
  return [
    `speed ${fmt(report.wpm)} wpm, effective ${fmt(report.effectiveWpm)} · unit ${fmt(report.unitMs)} ms`,
    `weight ${fmt(report.weightPct, 0)} % · dah/dit ${fmt(report.dahDitRatio, 2)} · jitter ${fmt(report.jitterPct, 0)} % of a unit`,
    `gaps ${gap(gaps.element)} / ${gap(gaps.letter)} / ${gap(gaps.word)} units (element/letter/word)`,
    drift === null ? 'drift: too few words to tell' : `drift ${drift >= 0 ? '+' : ''}${drift.toFixed(1)} wpm from the first word to the last`,
    ...histogramLines(report, width, histogramRows),
  ];
}

/** Lines of the comparison with the expected message: verdict, then one line per planned element. */
export function comparisonLines(report: Record<string, unknown>): { verdict: string; pass: boolean | null; lines: string[] } {
  const pass = typeof report.pass === 'boolean' ? report.pass : null;
  const missing = Array.isArray(report.missing) ? report.missing.length : num(report.missing) ?? 0;
  const extra = Array.isArray(report.extra) ? report.extra.length : num(report.extra) ?? 0;
  const verdict = `${pass === null ? '' : pass ? 'PASS' : 'FAIL'} at ±${fmt(report.tolerancePct, 0)} % of a unit: worst ${fmt(report.maxErrorMs)} ms (${fmt(report.maxErrorPct, 0)} %)`;
  const signed = (x: number | null, unit: string, d = 1): string => (x === null ? '–' : `${x >= 0 ? '+' : ''}${x.toFixed(d)}${unit}`);
  const lines: string[] = [
    `${missing} missing · ${extra} extra · offset ${fmt(report.offsetMs)} ms removed`,
    '  # char kind status  start error    length error',
  ];
  const elements = Array.isArray(report.elements) ? (report.elements as Record<string, unknown>[]) : [];
  elements.forEach((e, i) => {
    const start = `${signed(num(e.startErrorMs), ' ms')} ${signed(num(e.startErrorPct), ' %', 0)}`;
    const length = `${signed(num(e.lengthErrorMs), ' ms')} ${signed(num(e.lengthErrorPct), ' %', 0)}`;
    lines.push(
      `${String(num(e.index) ?? i).padStart(3)} ${String(e.char ?? '').padEnd(4)} ${String(e.kind ?? '').padEnd(4)} ${String(e.status ?? '').padEnd(7)} ${start.padEnd(14)} ${length}`,
    );
  });
  return { verdict, pass, lines };
}
