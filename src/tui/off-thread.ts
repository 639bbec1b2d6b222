/**
 * Runs a slow task in a worker thread so the keyboard stays live while the core works. Where no
 * compiled worker exists (running from the TypeScript sources), it runs the task inline instead.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { runTask, type Task } from './tasks.js';

/** The compiled worker beside this file, or null. */
function workerUrl(): URL | null {
  const url = new URL('./worker.js', import.meta.url);
  return url.protocol === 'file:' && existsSync(fileURLToPath(url)) && import.meta.url.endsWith('.js') ? url : null;
}

const running = new Set<Worker>();

/** Stops every worker still running (when the person leaves the app mid-job). */
export async function stopWorkers(): Promise<void> {
  await Promise.all([...running].map((w) => w.terminate()));
  running.clear();
}

/**
 * Runs a task off the render path. `signal` stops it (the worker is terminated; the promise
 * rejects with an AbortError) when its result is no longer wanted.
 */
export function runOffThread(task: Task, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<unknown> {
  const url = workerUrl();
  if (!url) return new Promise<void>((r) => setImmediate(r)).then(() => runTask(task, onProgress));
  return new Promise((resolvePromise, reject) => {
    const worker = new Worker(url, { workerData: task });
    running.add(worker);
    signal?.addEventListener('abort', () => {
      void worker.terminate();
      const err = new Error('cancelled');
      err.name = 'AbortError';
      reject(err);
    });
    let settled = false;
    worker.on('message', (m: { progress?: number; result?: unknown; error?: string; name?: string }) => {
      if (m.progress !== undefined) onProgress(m.progress);
      else if (m.error !== undefined) {
        const err = new Error(m.error);
        if (m.name) err.name = m.name;
        settled = true;
        reject(err);
      } else {
        settled = true;
        resolvePromise(m.result);
      }
    });
    worker.on('error', (err) => {
      settled = true;
      reject(err);
    });
    worker.on('exit', (code) => {
      running.delete(worker);
      if (!settled) reject(new Error(`the worker stopped (code ${code}) before it finished`));
    });
  });
}
