/**
 * Worker-thread entry for `keyform batch` (loaded by piscina from the compiled dist/cli/batch-worker.js):
 * analyses one recording and returns its report row. A bad file comes back as a row with its error.
 */
import { analyzeRecording, type AnalyzeOptions } from './analyze-recording.js';
import type { BatchRow } from './batch-row.js';

/** What the main thread sends for one file (plain data: it crosses the thread boundary). */
export interface BatchTask {
  path: string;
  options: Omit<AnalyzeOptions, 'onProgress' | 'stdin'>;
}

export default async function analyzeTask(task: BatchTask): Promise<BatchRow> {
  return analyzeRecording(task.path, task.options);
}
