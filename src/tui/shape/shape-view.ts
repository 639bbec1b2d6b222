/** Pure helpers that turn a shape report (from the core) into lines for the screen. */
import { formatHz, spectrumPlot } from '../widgets/charts.js';

const num = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);
const obj = (x: unknown): Record<string, unknown> => (x && typeof x === 'object' ? (x as Record<string, unknown>) : {});
const f = (x: unknown, d = 1): string => {
  const n = num(x);
  return n === null ? '–' : n.toFixed(d);
};
const hz = (x: unknown): string => {
  const n = num(x);
  return n === null ? '–' : formatHz(n);
};

/** The averaged spectrum (offset Hz, dBc) of a report, wherever the report keeps it. */
export function spectrumOf(report: Record<string, unknown>): { offsetHz: ArrayLike<number>; dbc: ArrayLike<number>; note: string } | null {
  const s = obj(report.spectrum);
  const offsetHz = (s.offsetHz ?? s.offsetsHz ?? s.frequencyHz) as ArrayLike<number> | undefined;
  const dbc = (s.dbc ?? s.dBc ?? s.levelDbc ?? s.powerDbc) as ArrayLike<number> | undefined;
  if (!offsetHz || !dbc || offsetHz.length === 0) return null;
  const rbw = num(s.rbwHz ?? s.resolutionBandwidthHz);
  const win = typeof s.window === 'string' ? s.window : null;
  return { offsetHz, dbc, note: [rbw !== null ? `RBW ${f(rbw, 1)} Hz` : null, win].filter(Boolean).join(', ') };
}

/** The report's figures as short text lines (each fits 80 columns), and the mask verdict. */
export function shapeSummary(report: Record<string, unknown>): { lines: string[]; verdict: { pass: boolean | null; text: string } } {
  const rise = obj(report.riseMs);
  const fall = obj(report.fallMs);
  const chirp = obj(report.chirpHz);
  const at = obj(report.bandwidthAtDbcHz);
  const mask = obj(report.mask);
  const over = obj(report.overshootPct);
  const lines: string[] = [];
  lines.push(`Rise 10–90 % ${f(rise.median, 2)} ms (p10 ${f(rise.p10, 2)}, p90 ${f(rise.p90, 2)}) · fall ${f(fall.median, 2)} ms (p10 ${f(fall.p10, 2)}, p90 ${f(fall.p90, 2)})`);
  const edge = typeof report.edgeKind === 'string' ? report.edgeKind : null;
  lines.push(`${edge ? `Edge ${edge} · ` : ''}overshoot ${f(over.median)} % (worst ${f(over.worst)} %)`);
  const windowMs = num(chirp.windowMs);
  lines.push(`Chirp ${f(chirp.median)} Hz median, ${f(chirp.worst)} Hz worst${windowMs !== null ? ` (first ${windowMs} ms of each mark)` : ''}`);
  const occ = num(report.occupiedBandwidthHz);
  const nec = num(report.necessaryBandwidthHz);
  lines.push(`Occupied (99 %, SM.328) ${hz(occ)} · at −20/−40/−60 dBc ${hz(at['20'])} / ${hz(at['40'])} / ${hz(at['60'])}`);
  const k = num(report.k);
  lines.push(
    `Necessary (ITU-R SM.1138${k !== null ? `, K = ${k}` : ''}) ${hz(nec)}${typeof report.designator === 'string' ? `, ${report.designator}` : ''}` +
      `${occ !== null && nec ? ` · occupied/necessary ×${(occ / nec).toFixed(1)}` : ''}`,
  );
  const clicks = Array.isArray(report.clickDbc) ? (report.clickDbc as Record<string, unknown>[]) : [];
  if (clicks.length > 0) {
    const worstSide = (c: Record<string, unknown>): number | null => {
      const a = num(c.lowerDbc);
      const b = num(c.upperDbc);
      return a === null ? b : b === null ? a : Math.max(a, b);
    };
    lines.push(`Clicks ${clicks.map((c) => `±${formatHz(num(c.offsetHz) ?? 0)} ${f(worstSide(c), 0)}`).join(' · ')} dBc`);
  }
  const nc = obj(report.noiseCorrection);
  if (nc.applied === true && num(nc.uncorrectedHz) !== null) lines.push(`Noise floor removed before the 99 % band (uncorrected ${hz(nc.uncorrectedHz)})`);
  const pass = typeof mask.pass === 'boolean' ? mask.pass : null;
  const violations = Array.isArray(mask.violations) ? (mask.violations as Record<string, unknown>[]) : [];
  let worst = '';
  if (violations.length > 0) {
    const v = violations.reduce((a, b) => ((num(b.excessDb) ?? 0) > (num(a.excessDb) ?? 0) ? b : a));
    const by = num(v.excessDb);
    const at2 = num(v.offsetHz);
    worst = `, worst ${by !== null ? `+${by.toFixed(1)} dB` : ''}${at2 !== null ? ` at ±${formatHz(Math.abs(at2))}` : ''}`;
  }
  const shortest = num(mask.shortestRiseMs ?? report.shortestRiseMs);
  const text =
    pass === null
      ? 'Mask: no verdict in this report'
      : pass
        ? `PASS: within the spectral mask${shortest !== null ? ` (shortest rise that meets it: ${f(shortest, 1)} ms)` : ''}`
        : `FAIL: ${violations.length} point${violations.length === 1 ? '' : 's'} over the mask${worst}${shortest !== null ? `; ${f(shortest, 1)} ms rise meets it` : ''}`;
  return { lines, verdict: { pass, text } };
}

/** The spectrum as a terminal plot with the necessary bandwidth marked (═ on the axis). */
export function spectrumLines(report: Record<string, unknown>, width: number, rows: number): { title: string; lines: string[] } | null {
  const s = spectrumOf(report);
  if (!s) return null;
  // Wide enough to show the skirts down to −40…−60 dBc, where key clicks live.
  const at = obj(report.bandwidthAtDbcHz);
  const widest = Math.max(1.5 * (num(report.occupiedBandwidthHz) ?? 0), 0.75 * (num(at['40']) ?? 0), 0.6 * (num(at['60']) ?? 0), 500);
  let maxOffset = 0;
  for (let i = 0; i < s.offsetHz.length; i++) maxOffset = Math.max(maxOffset, Math.abs(s.offsetHz[i]!));
  const span = Math.min(maxOffset || 2000, Math.ceil(widest / 250) * 250);
  return {
    title: `Spectrum in dBc, ±${formatHz(span)}${s.note ? ` (${s.note})` : ''}; ═ necessary bandwidth, ┼ carrier`,
    lines: spectrumPlot(s.offsetHz, s.dbc, { width: Math.max(20, width - 6), rows, spanHz: span, floorDb: -80, necessaryHz: num(report.necessaryBandwidthHz) }),
  };
}

/** The rise-time sweep as table lines, whatever its row layout. */
export function sweepLines(sweep: unknown): string[] {
  const s = obj(sweep);
  const rows = (Array.isArray(sweep) ? sweep : Array.isArray(s.rows) ? s.rows : Array.isArray(s.points) ? s.points : []) as Record<string, unknown>[];
  if (rows.length === 0) return [];
  const shortest = num(s.shortestRiseMs ?? s.shortestPassingRiseMs);
  const lines = [
    shortest !== null ? `shortest rise time that meets the mask: ${shortest.toFixed(1)} ms` : 'no rise time in the table meets the mask',
    'rise ms   occupied    at −40 dBc   mask',
  ];
  for (const r of rows) {
    const pass = typeof r.pass === 'boolean' ? (r.pass ? '✓ pass' : '✗ fail') : typeof obj(r.mask).pass === 'boolean' ? (obj(r.mask).pass ? '✓ pass' : '✗ fail') : '';
    lines.push(`${f(r.riseMs, 1).padStart(7)}   ${hz(r.occupiedBandwidthHz).padStart(9)}   ${hz(r.at40DbcHz ?? obj(r.bandwidthAtDbcHz)['40'] ?? r.bandwidth40DbcHz).padStart(10)}   ${pass}`);
  }
  return lines;
}
