/** Worker-thread entry: runs one task of tasks.ts and posts progress and the result back. */
import { parentPort, workerData } from 'node:worker_threads';
import { runTask, type Task } from './tasks.js';

const port = parentPort;
if (port) {
  let last = -1;
  runTask(workerData as Task, (f) => {
    if (f - last >= 0.02 || f >= 1) {
      last = f;
      port.postMessage({ progress: f });
    }
  }).then(
    (result) => port.postMessage({ result }),
    (err: unknown) => port.postMessage({ error: (err as Error).message, name: (err as Error).name }),
  );
}
