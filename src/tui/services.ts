/**
 * Side effects of the app, injected into the screens: listing and reading recordings, running the
 * receiver and the measurements, writing exports. Screens never touch files or the core's slow
 * functions directly; tests pass fakes.
 */
import { existsSync, readdirSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError } from '../core/errors.js';
import { EXPORT_FORMATS, type ExportFormat } from '../io/export.js';
import { writeOutputFile } from '../io/files.js';
import { renderPlan, type EncodeCliOptions } from '../cli/commands/encode.js';
import type { CommandContext } from '../cli/io.js';
import { loadAlign, loadReceive, loadShape, NotAvailableError } from './core-modules.js';
import { computePlan, type PlanSettings } from './plan/plan-model.js';
import type { DecodedRecording, ShapeTask } from './tasks.js';
import { runOffThread } from './off-thread.js';

export type { DecodedRecording } from './tasks.js';

export interface RecordingEntry {
  /** Path as given or found. */
  path: string;
  name: string;
  sizeBytes: number;
}

export interface RecordingList {
  /** Folder shown in the list. */
  dir: string;
  files: RecordingEntry[];
  /** The file to open at once (when the app was started on a file). */
  open?: string;
}

export interface Services {
  listRecordings(target: string | undefined): Promise<RecordingList>;
  /** Decodes a recording without blocking the keyboard, reporting progress 0…1. */
  decode(path: string, onProgress: (fraction: number) => void): Promise<DecodedRecording>;
  /** Aligns a decoded recording against the expected message planned with these settings (alignTimelines). */
  compare(decoded: DecodedRecording, expectedText: string, settings: PlanSettings): Promise<Record<string, unknown>>;
  /** Shape measurement, prediction or sweep, off the render path; `signal` cancels it. */
  shape(task: ShapeTask, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<unknown>;
  fileExists(path: string): boolean;
  /** Writes the plan in an export format; returns a one-line note of what was written. */
  exportPlan(settings: PlanSettings, format: ExportFormat, path: string, force: boolean): Promise<string>;
}

const yieldToInput = (): Promise<void> => new Promise((r) => setImmediate(r));

/** The options `encode` would use for the Plan workspace's settings (the rest at encode's defaults). */
export function encodeOptionsFor(s: PlanSettings): EncodeCliOptions {
  return {
    wpm: s.wpm, farnsworth: s.farnsworthWpm ?? undefined, weight: s.weightPct, compensation: 0, pttLead: 0, pttTail: 0,
    repeat: 1, tickHz: 1000, name: 'keying', rate: 48000, tone: s.toneHz, level: -6, edge: s.edge, rise: s.riseMs, pad: 250,
  };
}

export function realServices(): Services {
  return {
    async listRecordings(target) {
      // By default ./recordings, else the demo recordings that ship with keyform.
      const bundled = fileURLToPath(new URL('../../recordings', import.meta.url));
      const where = resolve(target ?? (existsSync('recordings') ? 'recordings' : bundled));
      if (!existsSync(where)) {
        if (target !== undefined) throw new InputError(`${target}: no such file or folder`);
        return { dir: where, files: [] };
      }
      const isDir = statSync(where).isDirectory();
      const dir = isDir ? where : dirname(where);
      const files = readdirSync(dir)
        .filter((n) => n.toLowerCase().endsWith('.wav'))
        .sort()
        .map((name) => ({ path: join(dir, name), name, sizeBytes: statSync(join(dir, name)).size }));
      return { dir, files, ...(isDir ? {} : { open: where }) };
    },

    async decode(path, onProgress) {
      if (!(await loadReceive())) throw new NotAvailableError('the receiver');
      return (await runOffThread({ kind: 'decode', path }, onProgress)) as DecodedRecording;
    },

    async compare(decoded, expectedText, settings) {
      const align = await loadAlign();
      if (!align) throw new NotAvailableError('the comparison with an expected message');
      const planned = computePlan({ ...settings, message: expectedText });
      if ('error' in planned) throw new InputError(planned.error);
      await yieldToInput();
      return align.alignTimelines(decoded.decode, planned.plan, {});
    },

    async shape(task, onProgress, signal) {
      if (!(await loadShape())) throw new NotAvailableError('the keying-shape analysis');
      return runOffThread(task, onProgress, signal);
    },

    fileExists: (path) => existsSync(path),

    async exportPlan(settings, format, path, force) {
      if (!(EXPORT_FORMATS as readonly string[]).includes(format)) throw new InputError(`unknown format ${format}`);
      const planned = computePlan(settings);
      if ('error' in planned) throw new InputError(planned.error);
      const warnings: string[] = [];
      const ctx = { warn: (m: string) => warnings.push(m) } as unknown as CommandContext;
      const data = renderPlan(planned.plan, format, encodeOptionsFor(settings), ctx);
      await writeOutputFile(path, data, { force });
      const size = typeof data === 'string' ? Buffer.byteLength(data) : data.length;
      return `wrote ${basename(path)} (${format}, ${size} bytes)${warnings.length > 0 ? `; ${warnings.join('; ')}` : ''}`;
    },
  };
}
