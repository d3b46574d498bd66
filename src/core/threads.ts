// Design with the starts spread over Node worker threads (the command line's way to use
// every core and to stop at once; the app does the same with Web Workers). Each thread runs
// the ordinary design() on its share of the start indices; the best start wins as in design()
// (best-start.ts).
// Stopping terminates the threads instead of waiting for an iteration to end (one
// iteration of a large problem can take seconds): each running start then contributes the
// last pulse it reported, which is its best so far since L-BFGS only accepts decreases.
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { bestOfStarts, toProblem } from './api.ts';
import { prunes, Referee, startsToContinue, type Checkpoint } from './best-start.ts';
import type { DesignOptions } from './api.ts';
import { checkProblemAngles } from './limits.ts';
import { memberShares } from './member-split.ts';
import { threadEntry } from './thread-entry.ts';
import type { DesignResult, Problem, Progress, Pulse, StartResult } from './types.ts';

/** Messages from a design thread. */
export type ThreadMessage =
  | { kind: 'progress'; progress: Progress }
  | { kind: 'start'; result: StartResult }
  | { kind: 'checkpoint'; checkpoint: Checkpoint }
  | { kind: 'done' }
  | { kind: 'error'; name: string; message: string; stack?: string };

/** Options of a threaded design: those of design() plus the number of threads. */
export interface ThreadedDesignOptions extends DesignOptions {
  /**
   * Threads to use (default: the machine's parallelism): the starts spread over them, and
   * when fewer starts than threads run, a large problem's member shares (memberThreads).
   */
  threads?: number;
}

/** How often (ms) a thread sends its current samples, so that a stop loses little. */
const KEEP_PULSE_EVERY_MS = 100;

/** Raised when a threaded design is stopped before any start reported a pulse. */
export class StoppedBeforeFirstIterationError extends Error {
  override name = 'StoppedBeforeFirstIterationError';
}

/**
 * Design a pulse with the starts spread over worker threads (at least one thread, even for
 * one start). Aborting the signal terminates the threads at once and returns the best pulse
 * reported so far; a start cut short has stopReason "stopped" and evaluations NaN.
 */
export async function designInThreads(spec: unknown, options: ThreadedDesignOptions = {}): Promise<DesignResult> {
  const problem = toProblem(spec);
  checkProblemAngles(problem);
  const indices = options.startIndices ?? Array.from({ length: problem.optimizer.starts }, (_, k) => k);
  // Every thread asked for: a stage with fewer starts than threads gives each start some (memberThreads).
  const threads = Math.max(1, options.threads ?? availableParallelism());
  const t0 = performance.now();
  if (!prunes(problem.optimizer, indices.length)) {
    const { starts } = await runStage(problem, indices, threads, options, t0);
    return bestOfStarts(problem, starts, t0);
  }
  // Pruned: every start to the pruning point, then the best again from their beginning
  // (a start is deterministic, so it retraces its probe and goes on as in one loop).
  const probe = await runStage(problem, indices, threads, options, t0, 'probe');
  const going = probe.stopped ? [] : startsToContinue(probe.starts, problem.optimizer.keepStarts);
  if (going.length === 0) return bestOfStarts(problem, probe.starts, t0);
  const reached = new Map(probe.starts.map((r) => [r.start, r]));
  const finish = await runStage(problem, going, threads, options, t0, 'finish', reached);
  const byStart = new Map(finish.starts.map((r) => [r.start, r]));
  // A start stopped while it retraced its probe keeps its probe's (better) result.
  const starts = probe.starts.map((r) => {
    const f = byStart.get(r.start);
    return f && !(f.stopReason === 'stopped' && f.objective > r.objective) ? f : r;
  });
  return bestOfStarts(problem, starts, t0);
}

/**
 * One stage of a threaded design (all of it when `stage` is undefined): the starts of
 * `indices` dealt round-robin over the threads; a stop ends the threads at once and each
 * running start contributes its last reported pulse. `reached` (the finish stage) holds
 * the probe results of the starts that go on: their retraced reports are not passed on.
 */
async function runStage(
  problem: Problem, indices: number[], threadCount: number, options: ThreadedDesignOptions, t0: number,
  stage?: 'probe' | 'finish', reached?: Map<number, StartResult>,
): Promise<{ starts: StartResult[]; stopped: boolean }> {
  const threads = Math.min(threadCount, indices.length);
  const perStart = memberThreads(problem, indices.length, threadCount);
  const shares = Array.from({ length: threads }, (_, t) => indices.filter((_, k) => k % threads === t));
  const latest = new Map<number, Progress>();
  const finished: StartResult[] = [];
  const onProgress = (p: Progress): void => {
    if (reached && p.iteration <= (reached.get(p.start)?.iterations ?? -1)) return;
    const previous = latest.get(p.start);
    // Keep the last report that carried samples, with the figures of that same iterate.
    if (p.pulse || !previous?.pulse) latest.set(p.start, p);
    if (options.onProgress) {
      const { pulse, ...rest } = p;
      options.onProgress(options.progressPulseEveryMs !== undefined && pulse ? p : rest);
    }
  };
  const workers: Worker[] = [];
  // A design that is not staged compares its starts across the threads (best-start.ts Referee).
  const referee = stage === undefined && problem.optimizer.outpaceEvery > 0 ? new Referee(threads, problem.optimizer) : undefined;
  const runs = shares.map((share, t) => runThread(problem, share, { ...options, stage }, perStart, workers, onProgress, finished, referee && { referee, share: t }));
  // The threads end inside the abort itself, before whatever the caller does next.
  const stopped = new Promise<'stopped'>((resolve) => {
    const stop = (): void => {
      for (const w of workers) void w.terminate();
      resolve('stopped');
    };
    if (options.signal?.aborted) stop();
    options.signal?.addEventListener('abort', stop, { once: true });
  });
  const outcome = await Promise.race([Promise.all(runs).then(() => 'done' as const), stopped]);
  if (outcome === 'stopped') {
    const done = new Set(finished.map((s) => s.start));
    for (const [start, p] of latest) {
      if (!done.has(start) && p.pulse) finished.push(startFromProgress(problem, p, t0));
    }
    if (finished.length === 0 && !reached) throw new StoppedBeforeFirstIterationError('the design was stopped before its first iteration: there is no pulse yet');
  }
  finished.sort((a, b) => a.start - b.start);
  return { starts: finished, stopped: outcome === 'stopped' };
}

/** A start cut short, from its last progress report with samples. */
function startFromProgress(problem: Problem, p: Progress, t0: number): StartResult {
  const pulse: Pulse = { dt: problem.dt, i: p.pulse!.i, q: p.pulse!.q, metadata: { origin: 'design', name: `design start ${p.start + 1}` } };
  return {
    start: p.start, pulse, meanInfidelity: p.meanInfidelity, objective: p.objective, iterations: p.iteration,
    evaluations: NaN, stopReason: 'stopped', elapsedS: (performance.now() - t0) / 1000,
  };
}

/**
 * Threads per start: starts over threads while there are at least as many starts as
 * threads (no waiting at all); with fewer, a problem in member shares (member-split.ts)
 * gives each start the threads left over, up to its number of shares (1, 2 or 4, so that
 * each takes a whole block of them). The result is the same either way: the shares are
 * the problem's, not the threads'.
 */
export function memberThreads(problem: Problem, starts: number, threads: number): number {
  if (starts >= threads) return 1;
  // A power of two, as the shares' count (1, 2 or 4), so that each thread takes a whole block of them.
  const most = Math.min(memberShares(problem).length, Math.floor(threads / starts));
  return most >= 4 ? 4 : most >= 2 ? 2 : 1;
}

function runThread(
  problem: unknown,
  startIndices: number[],
  options: ThreadedDesignOptions,
  perStart: number,
  workers: Worker[],
  onProgress: (p: Progress) => void,
  finished: StartResult[],
  refereed?: { referee: Referee; share: number },
): Promise<void> {
  return new Promise((resolve, reject) => {
    const entry = threadEntry('design-thread');
    const keepEvery = Math.min(options.progressPulseEveryMs ?? KEEP_PULSE_EVERY_MS, KEEP_PULSE_EVERY_MS);
    const initialPulse = options.initialPulse ? { i: Array.from(options.initialPulse.i), q: Array.from(options.initialPulse.q) } : undefined;
    const workerData = { problem, startIndices, progressPulseEveryMs: keepEvery, initialPulse, stage: options.stage, refereed: refereed !== undefined, memberThreads: perStart };
    const worker = new Worker(entry.url, { eval: entry.eval, workerData });
    workers.push(worker);
    const mine = new Set(startIndices);
    // The thread's ended starts, for the referee once it has ended (or failed).
    const end = (): void => refereed?.referee.end(refereed.share, finished.filter((r) => mine.has(r.start)));
    worker.on('message', (message: ThreadMessage) => {
      if (message.kind === 'progress') onProgress(message.progress);
      else if (message.kind === 'start') {
        finished.push(message.result);
        options.onStartEnd?.(message.result);
      }
      else if (message.kind === 'checkpoint') {
        void refereed?.referee.report(refereed.share, message.checkpoint).then((stop) => worker.postMessage({ kind: 'judged', stop }));
      } else if (message.kind === 'done') {
        end();
        resolve();
      } else {
        end();
        const error = new Error(message.message);
        error.name = message.name;
        error.stack = message.stack;
        reject(error);
      }
    });
    worker.on('error', (error) => {
      end();
      reject(error);
    });
    worker.on('exit', () => {
      end();
      resolve();
    });
  });
}
