// One design thread of designInThreads (threads.ts): runs design() on its start indices one
// start at a time, posting each start's result as it ends (so that a stop keeps every
// finished start whole) and streaming progress; stops when the parent says so. With
// memberThreads > 1 it evaluates a large problem's member shares with helper threads.
import { parentPort, workerData } from 'node:worker_threads';
import { design } from './api.ts';
import { memberShares, type SharePool } from './member-split.ts';
import { startSharePool } from './share-threads.ts';
import type { Problem } from './types.ts';
import type { ThreadMessage } from './threads.ts';

const port = parentPort!;
const controller = new AbortController();
port.on('message', (message) => {
  if (message === 'stop') controller.abort();
});
const post = (message: ThreadMessage): void => port.postMessage(message);
let pool: SharePool | undefined;
try {
  const problem = workerData.problem as Problem;
  // A large problem's member shares on this thread and `memberThreads - 1` helpers (share-threads.ts).
  if (workerData.memberThreads > 1) pool = await startSharePool(problem, memberShares(problem), workerData.memberThreads);
  const t0 = performance.now();
  let ran = 0;
  for (const start of workerData.startIndices as number[]) {
    // One time budget for the thread's whole share, as design() keeps for its starts.
    const timeLimit = problem.optimizer.timeLimit - (performance.now() - t0) / 1000;
    if (ran > 0 && (controller.signal.aborted || timeLimit <= 0)) break;
    const result = await design({ ...problem, optimizer: { ...problem.optimizer, timeLimit } }, {
      startIndices: [start],
      signal: controller.signal,
      progressPulseEveryMs: workerData.progressPulseEveryMs,
      // A stage of a pruned design (api.ts DesignOptions.stage): each start alone to the
      // pruning point, or on to its end.
      stage: workerData.stage,
      initialPulse: workerData.initialPulse,
      sharePool: pool,
      onProgress: (progress) => post({ kind: 'progress', progress }),
    });
    post({ kind: 'start', result: result.starts[0] });
    ran++;
  }
  post({ kind: 'done' });
} catch (error) {
  const e = error instanceof Error ? error : new Error(String(error));
  post({ kind: 'error', name: e.name, message: e.message, stack: e.stack });
}
pool?.close();
port.close();
