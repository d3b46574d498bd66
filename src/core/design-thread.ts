// One design thread of designInThreads (threads.ts): runs design() on its start indices,
// streams progress, and stops when the parent says so.
import { parentPort, workerData } from 'node:worker_threads';
import { design } from './api.ts';
import type { ThreadMessage } from './threads.ts';

const port = parentPort!;
const controller = new AbortController();
port.on('message', (message) => {
  if (message === 'stop') controller.abort();
});
const post = (message: ThreadMessage): void => port.postMessage(message);
try {
  const result = await design(workerData.problem, {
    startIndices: workerData.startIndices,
    signal: controller.signal,
    progressPulseEveryMs: workerData.progressPulseEveryMs,
    onProgress: (progress) => post({ kind: 'progress', progress }),
  });
  post({ kind: 'done', result });
} catch (error) {
  const e = error instanceof Error ? error : new Error(String(error));
  post({ kind: 'error', name: e.name, message: e.message, stack: e.stack });
}
port.close();
