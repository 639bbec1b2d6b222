/**
 * SVG plots of a keying-shape report: the spectrum in dBc with the necessary bandwidth, occupied band
 * and mask marked, and an overlay of every rising and falling edge (a scope's persistence view) with
 * the 10 % and 90 % lines. Plain SVG 1.1, no scripts, deterministic output.
 */
import type { ShapeReport } from '../core/measure/shape.js';

const W = 900;
const PANEL_H = 330;
const M = { left: 70, right: 20, top: 40, bottom: 45 };

function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

const fmt = (x: number): string => (Math.round(x * 10) / 10).toString();

interface Axis {
  x0: number;
  x1: number;
  y0: number;
  y1: number;
  top: number;
}

function scaler(a: Axis): { sx: (x: number) => number; sy: (y: number) => number; left: number; right: number; bottom: number; top: number } {
  const left = M.left;
  const right = W - M.right;
  const top = a.top + M.top;
  const bottom = a.top + PANEL_H - M.bottom;
  return {
    sx: (x) => left + ((x - a.x0) / (a.x1 - a.x0)) * (right - left),
    sy: (y) => bottom - ((y - a.y0) / (a.y1 - a.y0)) * (bottom - top),
    left,
    right,
    bottom,
    top,
  };
}

function grid(a: Axis, xStep: number, yStep: number, xLabel: string, yLabel: string, title: string): string[] {
  const s = scaler(a);
  const out: string[] = [];
  out.push(`<text x="${s.left}" y="${a.top + 22}" font-size="15" font-weight="bold">${esc(title)}</text>`);
  out.push(`<rect x="${s.left}" y="${s.top}" width="${s.right - s.left}" height="${s.bottom - s.top}" fill="#fff" stroke="#444"/>`);
  for (let x = Math.ceil(a.x0 / xStep) * xStep; x <= a.x1 + 1e-9; x += xStep) {
    out.push(`<line x1="${fmt(s.sx(x))}" y1="${s.top}" x2="${fmt(s.sx(x))}" y2="${s.bottom}" stroke="#ddd"/>`);
    out.push(`<text x="${fmt(s.sx(x))}" y="${s.bottom + 16}" font-size="11" text-anchor="middle">${fmt(x)}</text>`);
  }
  for (let y = Math.ceil(a.y0 / yStep) * yStep; y <= a.y1 + 1e-9; y += yStep) {
    out.push(`<line x1="${s.left}" y1="${fmt(s.sy(y))}" x2="${s.right}" y2="${fmt(s.sy(y))}" stroke="#ddd"/>`);
    out.push(`<text x="${s.left - 6}" y="${fmt(s.sy(y) + 4)}" font-size="11" text-anchor="end">${fmt(y)}</text>`);
  }
  out.push(`<text x="${(s.left + s.right) / 2}" y="${s.bottom + 34}" font-size="12" text-anchor="middle">${esc(xLabel)}</text>`);
  out.push(`<text x="18" y="${(s.top + s.bottom) / 2}" font-size="12" text-anchor="middle" transform="rotate(-90 18 ${(s.top + s.bottom) / 2})">${esc(yLabel)}</text>`);
  return out;
}

function polyline(points: Array<[number, number]>, style: string): string {
  return `<polyline fill="none" ${style} points="${points.map(([x, y]) => `${fmt(x)},${fmt(y)}`).join(' ')}"/>`;
}

function niceStep(range: number, target: number): number {
  const raw = range / target;
  const p = 10 ** Math.floor(Math.log10(raw));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

/**
 * Renders a shape report as an SVG document with two panels (spectrum, edge overlay).
 * @example shapeSvg(report).startsWith('<?xml') //=> true
 */
export function shapeSvg(report: ShapeReport): string {
  const out: string[] = [];
  const H = 2 * PANEL_H + 40;
  out.push('<?xml version="1.0" encoding="UTF-8"?>');
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="sans-serif">`);
  out.push(`<rect width="${W}" height="${H}" fill="#fafafa"/>`);

  // Panel 1: spectrum.
  const sp = report.spectrum;
  let reach = 0;
  for (const f of sp.offsetHz) reach = Math.max(reach, Math.abs(f));
  const bw40 = report.bandwidthAtDbcHz['40'] ?? 0;
  const lastMaskHz = report.mask.points.length ? report.mask.points[report.mask.points.length - 1]!.offsetHz : 500;
  const half = Math.min(reach || 1000, Math.max(500, Math.ceil((1.2 * Math.max(bw40 / 2, (report.necessaryBandwidthHz ?? 0) / 2, lastMaskHz)) / 250) * 250));
  const a1: Axis = { x0: -half, x1: half, y0: -100, y1: 0, top: 0 };
  const s1 = scaler(a1);
  out.push(
    ...grid(
      a1,
      niceStep(2 * half, 8),
      10,
      `offset from the ${fmt(report.toneHz)} Hz tone [Hz]`,
      'level [dBc]',
      `Spectrum (${sp.window} window, RBW ${sp.rbwHz.toFixed(1)} Hz)`,
    ),
  );
  out.push(`<clipPath id="c1"><rect x="${s1.left}" y="${s1.top}" width="${s1.right - s1.left}" height="${s1.bottom - s1.top}"/></clipPath>`);
  out.push('<g clip-path="url(#c1)">');
  if (report.occupiedBandEdgesHz) {
    const { lowerHz, upperHz } = report.occupiedBandEdgesHz;
    out.push(`<rect x="${fmt(s1.sx(lowerHz))}" y="${s1.top}" width="${fmt(s1.sx(upperHz) - s1.sx(lowerHz))}" height="${s1.bottom - s1.top}" fill="#cfe8cf" fill-opacity="0.6"/>`);
  }
  if (sp.noiseFloorDbc !== null) {
    out.push(`<line x1="${s1.left}" y1="${fmt(s1.sy(sp.noiseFloorDbc))}" x2="${s1.right}" y2="${fmt(s1.sy(sp.noiseFloorDbc))}" stroke="#999" stroke-dasharray="2 3"/>`);
  }
  const pts: Array<[number, number]> = [];
  sp.offsetHz.forEach((f, i) => {
    if (Math.abs(f) <= half) pts.push([s1.sx(f), s1.sy(Math.max(-110, sp.dbc[i]!))]);
  });
  if (pts.length > 1) out.push(polyline(pts, 'stroke="#1f4e9c" stroke-width="1.2"'));
  // Mask limit line on both sides.
  for (const sign of [-1, 1]) {
    const m: Array<[number, number]> = report.mask.points.map((p) => [s1.sx(sign * p.offsetHz), s1.sy(p.maxDbc)]);
    const last = report.mask.points[report.mask.points.length - 1];
    if (last) m.push([s1.sx(sign * half * 2), s1.sy(last.maxDbc)]);
    out.push(polyline(m, 'stroke="#c0392b" stroke-width="1.5" stroke-dasharray="6 4"'));
  }
  if (report.necessaryBandwidthHz !== null) {
    for (const sign of [-1, 1]) {
      const x = fmt(s1.sx((sign * report.necessaryBandwidthHz) / 2));
      out.push(`<line x1="${x}" y1="${s1.top}" x2="${x}" y2="${s1.bottom}" stroke="#8e44ad" stroke-width="1.5"/>`);
    }
  }
  for (const v of report.mask.violations) {
    out.push(`<circle cx="${fmt(s1.sx(v.offsetHz))}" cy="${fmt(s1.sy(v.measuredDbc))}" r="4" fill="none" stroke="#c0392b" stroke-width="2"/>`);
  }
  out.push('</g>');
  const legend = [
    ['#1f4e9c', 'spectrum'],
    ['#8e44ad', `necessary bandwidth ${report.necessaryBandwidthHz !== null ? `${fmt(report.necessaryBandwidthHz)} Hz (SM.1138)` : 'unknown'}`],
    ['#cfe8cf', `occupied (99 %) ${report.occupiedBandwidthHz !== null ? `${fmt(report.occupiedBandwidthHz)} Hz` : 'unknown'}`],
    ['#c0392b', `mask: ${report.mask.pass === null ? 'not judged' : report.mask.pass ? 'pass' : 'FAIL'}`],
  ];
  legend.forEach(([color, label], i) => {
    const y = s1.top + 16 + i * 16;
    out.push(`<rect x="${s1.right - 250}" y="${y - 9}" width="14" height="10" fill="${color}"/>`);
    out.push(`<text x="${s1.right - 230}" y="${y}" font-size="11">${esc(label!)}</text>`);
  });

  // Panel 2: edge overlay.
  const e = report.edges;
  const tmax = e.timeMs.length ? e.timeMs[e.timeMs.length - 1]! : 1;
  const a2: Axis = { x0: -tmax, x1: tmax, y0: -0.1, y1: 1.2, top: PANEL_H + 20 };
  const s2 = scaler(a2);
  const rise = report.riseMs.median;
  const fall = report.fallMs.median;
  out.push(
    ...grid(
      a2,
      niceStep(2 * tmax, 10),
      0.1,
      'time from the 50 % crossing [ms]',
      'level (settled = 1)',
      `Edges: ${e.rising.length} rising, ${e.falling.length} falling · rise ${rise !== null ? rise.toFixed(2) : '–'} ms, fall ${fall !== null ? fall.toFixed(2) : '–'} ms (10–90 %; a hard step reads ${report.envelope.resolutionMs.toFixed(2)} ms)`,
    ),
  );
  out.push(`<clipPath id="c2"><rect x="${s2.left}" y="${s2.top}" width="${s2.right - s2.left}" height="${s2.bottom - s2.top}"/></clipPath>`);
  out.push('<g clip-path="url(#c2)">');
  for (const level of [0.1, 0.9]) {
    out.push(`<line x1="${s2.left}" y1="${fmt(s2.sy(level))}" x2="${s2.right}" y2="${fmt(s2.sy(level))}" stroke="#27ae60" stroke-width="1.5" stroke-dasharray="5 3"/>`);
    out.push(`<text x="${s2.left + 6}" y="${fmt(s2.sy(level) - 4)}" font-size="11" fill="#27ae60">${level * 100} %</text>`);
  }
  for (const tr of e.rising) out.push(polyline(tr.map((v, i) => [s2.sx(e.timeMs[i]!), s2.sy(v)]), 'stroke="#1f4e9c" stroke-opacity="0.35"'));
  for (const tr of e.falling) out.push(polyline(tr.map((v, i) => [s2.sx(e.timeMs[i]!), s2.sy(v)]), 'stroke="#d35400" stroke-opacity="0.35"'));
  out.push('</g>');
  out.push(`<text x="${s2.right - 200}" y="${s2.top + 16}" font-size="11" fill="#1f4e9c">rising edges</text>`);
  out.push(`<text x="${s2.right - 200}" y="${s2.top + 32}" font-size="11" fill="#d35400">falling edges</text>`);
  out.push(`<text x="${M.left}" y="${H - 8}" font-size="10" fill="#555">keyform measures; it does not certify. Defer to local regulations and licensed practice.</text>`);
  out.push('</svg>');
  return out.join('\n') + '\n';
}
