// Design with the starts spread over Node worker threads (the command line's way to use
// every core; the app does the same with Web Workers). Each thread runs the ordinary
// design() on its share of the start indices; the best start wins as in design() (best-start.ts).
import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { design, toProblem } from './api.ts';
import { mergeDesigns } from './best-start.ts';
import type { DesignOptions } from './api.ts';
import { checkProblemAngles } from './limits.ts';
import type { DesignResult, Progress } from './types.ts';

/** Messages from a design thread. */
export type ThreadMessage =
  | { kind: 'progress'; progress: Progress }
  | { kind: 'done'; result: DesignResult }
  | { kind: 'error'; name: string; message: string; stack?: string };

/** Options of a threaded design: those of design() plus the number of threads. */
export interface ThreadedDesignOptions extends DesignOptions {
  /** Threads to use (default: the machine's parallelism, at most the number of starts). */
  threads?: number;
}

/** Design a pulse with the starts spread over worker threads; one thread runs in-process. */
export async function designInThreads(spec: unknown, options: ThreadedDesignOptions = {}): Promise<DesignResult> {
  const problem = toProblem(spec);
  checkProblemAngles(problem);
  const indices = options.startIndices ?? Array.from({ length: problem.optimizer.starts }, (_, k) => k);
  const threads = Math.max(1, Math.min(options.threads ?? availableParallelism(), indices.length));
  if (threads === 1) return design(problem, options);
  const t0 = performance.now();
  const shares = Array.from({ length: threads }, (_, t) => indices.filter((_, k) => k % threads === t));
  const runs = shares.map((share) => runThread(problem, share, options));
  return mergeDesigns(await Promise.all(runs), (performance.now() - t0) / 1000);
}

// Threads do not inherit the TypeScript loader: each registers tsx, then loads the thread module.
function threadBootstrap(): string {
  // The ESM build of tsx's API (its CommonJS build resolves its loader wrongly from a thread).
  const cjs = createRequire(import.meta.url).resolve('tsx/esm/api');
  const tsx = pathToFileURL(cjs.replace(/index\.cjs$/, 'index.mjs')).href;
  const thread = new URL('./design-thread.ts', import.meta.url).href;
  return `import(${JSON.stringify(tsx)}).then((m) => { m.register(); return import(${JSON.stringify(thread)}); });`;
}

function runThread(problem: unknown, startIndices: number[], options: ThreadedDesignOptions): Promise<DesignResult> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(threadBootstrap(), {
      eval: true,
      workerData: { problem, startIndices, progressPulseEveryMs: options.progressPulseEveryMs },
    });
    const stop = (): void => worker.postMessage('stop');
    options.signal?.addEventListener('abort', stop, { once: true });
    if (options.signal?.aborted) stop();
    worker.on('message', (message: ThreadMessage) => {
      if (message.kind === 'progress') options.onProgress?.(message.progress);
      else if (message.kind === 'done') resolve(message.result);
      else {
        const error = new Error(message.message);
        error.name = message.name;
        error.stack = message.stack;
        reject(error);
      }
    });
    worker.on('error', reject);
    worker.on('exit', () => options.signal?.removeEventListener('abort', stop));
  });
}
