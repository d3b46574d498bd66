// One design thread of designInThreads (threads.ts): runs design() on its start indices,
// posting each start's result as it ends (so that a stop keeps every finished start whole)
// and streaming progress; stops when the parent says so. When the parent referees the
// starts (best-start.ts Referee), each comparison waits for the parent's answer. With
// memberThreads > 1 it evaluates a large problem's member shares with helper threads.
import { parentPort, workerData } from 'node:worker_threads';
import { design } from './api.ts';
import type { Checkpoint } from './best-start.ts';
import { memberShares, type SharePool } from './member-split.ts';
import { startSharePool } from './share-threads.ts';
import type { Problem } from './types.ts';
import type { ThreadMessage } from './threads.ts';

const port = parentPort!;
const controller = new AbortController();
let answer: ((stop: number[]) => void) | null = null;
port.on('message', (message: 'stop' | { kind: 'judged'; stop: number[] }) => {
  if (message === 'stop') controller.abort();
  else if (message.kind === 'judged') answer?.(message.stop);
});
const post = (message: ThreadMessage): void => port.postMessage(message);
const judge = (checkpoint: Checkpoint): Promise<number[]> => new Promise((resolve) => {
  answer = resolve;
  post({ kind: 'checkpoint', checkpoint });
});
let pool: SharePool | undefined;
try {
  const problem = workerData.problem as Problem;
  // A large problem's member shares on this thread and `memberThreads - 1` helpers (share-threads.ts).
  if (workerData.memberThreads > 1) pool = await startSharePool(problem, memberShares(problem), workerData.memberThreads);
  await design(problem, {
    startIndices: workerData.startIndices as number[],
    signal: controller.signal,
    progressPulseEveryMs: workerData.progressPulseEveryMs,
    // A stage of a pruned design (api.ts DesignOptions.stage): each start to the pruning
    // point, or on to its end.
    stage: workerData.stage,
    initialPulse: workerData.initialPulse,
    ...(workerData.refereed ? { judge } : {}),
    onProgress: (progress) => post({ kind: 'progress', progress }),
    onStartEnd: (result) => post({ kind: 'start', result }),
    sharePool: pool,
  });
  post({ kind: 'done' });
} catch (error) {
  const e = error instanceof Error ? error : new Error(String(error));
  post({ kind: 'error', name: e.name, message: e.message, stack: e.stack });
}
pool?.close();
port.close();
