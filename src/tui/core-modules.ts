/**
 * Loads the receiver and measurement modules of the core when they are present, so the app can
 * show a clear "not available yet" state instead of failing when a part of keyform is missing.
 * The specifiers are built at run time on purpose: the app must build and run without them.
 */
// Types only (erased at run time): the modules themselves are loaded lazily below.
import type { DecodedCharacter, DecodeResult } from '../core/receive/index.js';

export type { DecodedCharacter, DecodeResult };

export interface DecodeOptions {
  toneHz?: number;
  keepEnvelope?: boolean;
  onProgress?: (fraction: number) => void;
}

export interface ReceiveModule {
  decodeSamples(samples: Float32Array, sampleRate: number, options?: DecodeOptions): DecodeResult;
  StreamDecoder?: new (sampleRate: number, options?: DecodeOptions) => { push(chunk: Float32Array): void; finish(): DecodeResult };
  pickChannel?(channels: Float32Array[], sampleRate: number): { index: number; reason: string };
}

export interface TimingModule {
  measureTiming(timeline: unknown, options?: Record<string, unknown>): Record<string, unknown>;
}

export interface AlignModule {
  alignTimelines(observed: unknown, plan: unknown, options?: Record<string, unknown>): Record<string, unknown>;
}

export interface ShapeModule {
  measureShape(samples: Float32Array, sampleRate: number, options?: Record<string, unknown>): Record<string, unknown>;
  predictShape(options: Record<string, unknown>): Record<string, unknown>;
  sweepRise?(options: Record<string, unknown>): unknown;
}

/** Raised when a part of the core the app needs has not been built into this copy of keyform. */
export class NotAvailableError extends Error {
  constructor(what: string) {
    super(`${what} is not available yet in this build of keyform`);
    this.name = 'NotAvailableError';
  }
}

const cache = new Map<string, Promise<unknown>>();

function isMissingModule(err: unknown): boolean {
  const e = err as { code?: string; message?: string };
  return (
    e?.code === 'ERR_MODULE_NOT_FOUND' ||
    e?.code === 'MODULE_NOT_FOUND' ||
    /Cannot find module|Failed to load url|Does the file exist|not found/i.test(e?.message ?? '')
  );
}

async function loadOptional<T>(relative: string, check: (m: Record<string, unknown>) => boolean): Promise<T | null> {
  let pending = cache.get(relative);
  if (!pending) {
    const specifier = relative; // a variable, so neither tsc nor a bundler resolves it at build time
    pending = import(specifier).then(
      (m: Record<string, unknown>) => (check(m) ? m : null),
      (err: unknown) => {
        if (isMissingModule(err)) return null;
        throw err;
      },
    );
    cache.set(relative, pending);
  }
  return (await pending) as T | null;
}

const fn = (m: Record<string, unknown>, name: string): boolean => typeof m[name] === 'function';

export const loadReceive = (): Promise<ReceiveModule | null> => loadOptional('../core/receive/index.js', (m) => fn(m, 'decodeSamples'));
export const loadTiming = (): Promise<TimingModule | null> => loadOptional('../core/measure/timing.js', (m) => fn(m, 'measureTiming'));
export const loadAlign = (): Promise<AlignModule | null> => loadOptional('../core/measure/align.js', (m) => fn(m, 'alignTimelines'));
export const loadShape = (): Promise<ShapeModule | null> =>
  loadOptional('../core/measure/shape.js', (m) => fn(m, 'measureShape') && fn(m, 'predictShape'));
