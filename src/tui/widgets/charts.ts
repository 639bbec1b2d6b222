/**
 * Pure text charts for the terminal: progress bar, envelope strip chart with its threshold,
 * histogram bars and a spectrum plot. Each returns plain strings, so they are tested without Ink.
 */

/** `[██████······] 50 %` */
export function progressBar(fraction: number, width: number): string {
  const f = Math.max(0, Math.min(1, Number.isFinite(fraction) ? fraction : 0));
  const inner = Math.max(1, width - 8);
  const full = Math.round(f * inner);
  return `[${'█'.repeat(full)}${'·'.repeat(inner - full)}] ${String(Math.round(f * 100)).padStart(3)} %`;
}

/** Column-wise maximum (or mean) of `values[start…end)` squeezed (or stretched) into `width` columns. */
export function resample(values: ArrayLike<number>, width: number, start = 0, end = values.length, mode: 'max' | 'mean' = 'max'): number[] {
  const out: number[] = [];
  const span = Math.max(0, end - start);
  for (let c = 0; c < width; c++) {
    const i0 = start + Math.floor((c * span) / width);
    const i1 = Math.max(i0 + 1, start + Math.floor(((c + 1) * span) / width));
    let m = -Infinity;
    let sum = 0;
    let count = 0;
    for (let i = i0; i < i1 && i < end; i++) {
      m = Math.max(m, values[i]!);
      sum += values[i]!;
      count++;
    }
    out.push(mode === 'mean' && count > 0 ? sum / count : m);
  }
  return out;
}

const EIGHTHS = [' ', '▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'];

/**
 * Envelope strip chart, `rows` high: bars of the envelope, and the threshold drawn as `─`
 * where the bar is below it (`┄` marks the threshold inside a bar's row).
 */
export function envelopeChart(values: ArrayLike<number>, threshold: ArrayLike<number> | null, width: number, rows: number, start = 0, end = values.length): string[] {
  const v = resample(values, width, start, end, 'mean');
  const t = threshold ? resample(threshold, width, start, end, 'mean') : null;
  let top = 0;
  for (const x of v) if (Number.isFinite(x)) top = Math.max(top, x);
  if (top <= 0) top = 1;
  const lines: string[] = [];
  for (let r = rows - 1; r >= 0; r--) {
    let line = '';
    for (let c = 0; c < width; c++) {
      const level = (Math.max(0, v[c]!) / top) * rows; // 0…rows
      const cell = Math.max(0, Math.min(8, Math.round((level - r) * 8)));
      const th = t ? (Math.max(0, t[c]!) / top) * rows : -1;
      const thisRowHasThreshold = th >= r && th < r + 1;
      if (thisRowHasThreshold && cell < 4) line += '─';
      else line += EIGHTHS[cell]!;
    }
    lines.push(line);
  }
  return lines;
}

/**
 * Vertical histogram columns for several series on one scale: each series `rows` lines high,
 * one column per bin, eighth-blocks for the top of each bar.
 */
export function histogramColumns(series: readonly (readonly number[])[], rows: number): string[][] {
  const max = Math.max(1, ...series.flatMap((s) => s));
  return series.map((counts) => {
    const lines: string[] = [];
    for (let r = rows - 1; r >= 0; r--) {
      let line = '';
      for (const c of counts) {
        const level = (c / max) * rows;
        const cell = Math.max(0, Math.min(8, Math.round((level - r) * 8)));
        line += c > 0 && r === 0 && cell === 0 ? '▁' : EIGHTHS[cell]!;
      }
      lines.push(line);
    }
    return lines;
  });
}

/** Horizontal histogram bars: `label │████ count`. */
export function histogramBars(bins: readonly { label: string; count: number }[], width: number): string[] {
  const max = Math.max(1, ...bins.map((b) => b.count));
  const labelWidth = Math.max(...bins.map((b) => b.label.length), 1);
  const barWidth = Math.max(1, width - labelWidth - 8);
  return bins.map((b) => `${b.label.padStart(labelWidth)} │${'█'.repeat(Math.round((b.count / max) * barWidth))} ${b.count}`);
}

/**
 * Spectrum plot in dBc: x = offset from the carrier [Hz] over ±spanHz, y = dBc from 0 down to
 * floorDb. Columns inside ±necessaryHz/2 are marked on the axis with `═`, the carrier with `┼`.
 */
export function spectrumPlot(
  offsetHz: ArrayLike<number>,
  dbc: ArrayLike<number>,
  opts: { width: number; rows: number; spanHz: number; floorDb: number; necessaryHz?: number | null },
): string[] {
  const { width, rows, spanHz, floorDb } = opts;
  const colTop = new Array<number>(width).fill(-Infinity);
  for (let i = 0; i < offsetHz.length; i++) {
    const f = offsetHz[i]!;
    if (f < -spanHz || f > spanHz) continue;
    const c = Math.min(width - 1, Math.max(0, Math.floor(((f + spanHz) / (2 * spanHz)) * width)));
    colTop[c] = Math.max(colTop[c]!, dbc[i]!);
  }
  // Columns between bins (when columns are narrower than bins) are interpolated linearly in dB,
  // so the plot has no holes; columns beyond the outermost bins stay empty.
  const known = colTop.map((v, c) => (v > -Infinity ? c : -1)).filter((c) => c >= 0);
  const filled = colTop.map((v, c) => {
    if (v > -Infinity) return v;
    let lo = -1;
    let hi = -1;
    for (const k of known) {
      if (k < c) lo = k;
      else if (hi < 0) hi = k;
    }
    if (lo < 0 || hi < 0) return v;
    return colTop[lo]! + ((colTop[hi]! - colTop[lo]!) * (c - lo)) / (hi - lo);
  });
  colTop.splice(0, width, ...filled);
  const labelW = 5;
  const lines: string[] = [];
  for (let r = 0; r < rows; r++) {
    const rowDb = (floorDb * r) / (rows - 1); // 0 at the top row
    const nextDb = (floorDb * (r + 1)) / (rows - 1);
    let line = r % 2 === 0 || r === rows - 1 ? `${Math.round(rowDb)}`.padStart(labelW - 1) + ' ' : ' '.repeat(labelW);
    for (let c = 0; c < width; c++) {
      const v = colTop[c]!;
      if (v >= rowDb) line += '█';
      else if (v > nextDb && r < rows - 1) line += v > (rowDb + nextDb) / 2 ? '▄' : '▁';
      else line += ' ';
    }
    lines.push(line);
  }
  let axis = ' '.repeat(labelW);
  const half = (opts.necessaryHz ?? 0) / 2;
  const carrierColumn = Math.min(width - 1, Math.floor(width / 2)); // where offset 0 lands above
  const colHz = (2 * spanHz) / width;
  for (let c = 0; c < width; c++) {
    const lo = -spanHz + c * colHz;
    const hi = lo + colHz;
    const inBand = half > 0 && hi > -half && lo < half;
    axis += c === carrierColumn ? '┼' : inBand ? '═' : '─';
  }
  lines.push(axis);
  const left = `-${formatHz(spanHz)}`;
  const right = `+${formatHz(spanHz)}`;
  const mid = '0';
  const pad = Math.max(1, Math.floor(width / 2) - left.length);
  const pad2 = Math.max(1, width - left.length - pad - mid.length - right.length);
  lines.push(' '.repeat(labelW) + left + ' '.repeat(pad) + mid + ' '.repeat(pad2) + right);
  return lines;
}

/** `7.0 kHz`, `522 Hz`, `91.7 Hz` (a decimal below 100 Hz, where designators have three figures). */
export function formatHz(hz: number): string {
  const a = Math.abs(hz);
  if (a >= 1000) return `${(hz / 1000).toFixed(a >= 10_000 ? 0 : 1)} kHz`;
  if (a < 100 && Math.abs(hz - Math.round(hz)) >= 0.05) return `${hz.toFixed(1)} Hz`;
  return `${Math.round(hz)} Hz`;
}
