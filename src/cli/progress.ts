/**
 * A one-line progress bar on stderr: fraction, elapsed time and real-time factor (audio seconds per
 * wall second). Drawn only when stderr is a terminal; plain (no colour) when NO_COLOR is set.
 */
import type { CliIo } from './io.js';

export interface ProgressOptions {
  /** What is being done, shown before the bar (e.g. the file name). */
  label: string;
  /** Length of the audio being processed [s], for the real-time factor; omit when unknown. */
  audioSeconds?: number | null;
  /** Show the bar only once the work has run this long [ms] (default 1000: short jobs stay quiet). */
  showAfterMs?: number;
  /** Redraw at most this often [ms] (default 100). */
  intervalMs?: number;
  /** Clock for tests [ms]. */
  now?: () => number;
}

export interface ProgressBar {
  /** Reports progress as a fraction 0…1 (the core's onProgress callback). */
  update(fraction: number, detail?: string): void;
  /** Clears the line (call when done, before printing results). */
  done(): void;
  /** Wall time since the bar was made [ms]. */
  elapsedMs(): number;
}

/** Formats a duration as m:ss or h:mm:ss. */
export function formatElapsed(ms: number): string {
  const s = Math.max(0, Math.floor(ms / 1000));
  const h = Math.floor(s / 3600);
  const mm = String(Math.floor((s % 3600) / 60)).padStart(h > 0 ? 2 : 1, '0');
  const ss = String(s % 60).padStart(2, '0');
  return h > 0 ? `${h}:${mm}:${ss}` : `${mm}:${ss}`;
}

/**
 * Renders one progress line (without control codes), e.g.
 * `beacon.wav [#########-----------]  45 % 0:03  812× real time`.
 */
export function renderProgressLine(label: string, fraction: number, elapsedMs: number, audioSeconds: number | null, width: number, detail = ''): string {
  const f = Math.max(0, Math.min(1, Number.isFinite(fraction) ? fraction : 0));
  const barWidth = Math.max(10, Math.min(30, width - label.length - 40));
  const filled = Math.round(f * barWidth);
  const bar = `[${'#'.repeat(filled)}${'-'.repeat(barWidth - filled)}]`;
  let line = `${label} ${bar} ${String(Math.round(f * 100)).padStart(3)} % ${formatElapsed(elapsedMs)}`;
  if (audioSeconds && elapsedMs > 0 && f > 0) {
    const rtf = (audioSeconds * f) / (elapsedMs / 1000);
    line += `  ${rtf >= 10 ? Math.round(rtf) : rtf.toFixed(1)}× real time`;
  }
  if (detail) line += `  ${detail}`;
  return line.length > width - 1 ? line.slice(0, width - 1) : line;
}

/** Makes a progress bar on `io.stderr`; it draws nothing unless stderr is a TTY. */
export function createProgress(io: Pick<CliIo, 'stderr' | 'env'>, options: ProgressOptions): ProgressBar {
  const now = options.now ?? (() => performance.now());
  const start = now();
  const tty = Boolean(io.stderr.isTTY);
  const color = tty && io.env.NO_COLOR === undefined;
  const showAfter = options.showAfterMs ?? 1000;
  const interval = options.intervalMs ?? 100;
  let lastDraw = -Infinity;
  let drawn = false;
  return {
    update(fraction, detail) {
      if (!tty) return;
      const t = now();
      if (t - start < showAfter || t - lastDraw < interval) return;
      lastDraw = t;
      const width = io.stderr.columns ?? 80;
      const line = renderProgressLine(options.label, fraction, t - start, options.audioSeconds ?? null, width, detail);
      // Dim when colour is allowed; \r + erase-line keeps it on one line.
      io.stderr.write(`\r\x1b[2K${color ? `\x1b[2m${line}\x1b[22m` : line}`);
      drawn = true;
    },
    done() {
      if (drawn) io.stderr.write('\r\x1b[2K');
      drawn = false;
    },
    elapsedMs: () => now() - start,
  };
}
