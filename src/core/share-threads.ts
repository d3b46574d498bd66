// Member shares of a large design evaluated on Node worker threads (member-split.ts): the
// thread that runs the optimiser evaluates some shares itself and hands the drive to one
// helper thread per other part (share-thread.ts) through shared memory, waking them and
// waiting for them with Atomics, since the core asks for the figure synchronously from
// inside an optimiser step. Shares go round-robin: thread j (0 = the optimiser's) takes
// the shares s with s mod threads = j. Node only (browsers block Atomics.wait on the page
// and give no shared memory to a page that is not cross-origin isolated).
import { Worker } from 'node:worker_threads';
import { lineLayout } from './line.ts';
import type { MemberShare, ShareResult, SharePool } from './member-split.ts';
import { threadEntry } from './thread-entry.ts';
import type { Problem } from './types.ts';

/** Slots of the control array: the evaluation's number (-1: end), helpers done, a helper's failure. */
export const SLOT = { generation: 0, done: 1, failed: 2 } as const;

/** What a helper thread is given (share-thread.ts). */
export interface ShareThreadData {
  problem: Problem;
  /** Every share of the problem, and the indices this thread evaluates. */
  memberShares: MemberShare[];
  shares: number[];
  nDrive: number;
  driveDt: number;
  control: SharedArrayBuffer;
  data: SharedArrayBuffer;
}

/** The drive grid of a problem's blocks: samples and their length (s). */
export function driveGrid(problem: Problem): { nDrive: number; driveDt: number } {
  if (!problem.line) return { nDrive: problem.segments, driveDt: problem.dt };
  const layout = lineLayout(problem.line, problem.segments, problem.dt);
  return { nDrive: layout.samples, driveDt: layout.dt };
}

/** Offset (f64) of share s's result in the data array: the drive (2 nDrive), then per share mean, gradI, gradQ. */
export function resultOffset(s: number, nDrive: number): number {
  return 2 * nDrive + s * (1 + 2 * nDrive);
}

/**
 * Start `threads - 1` helper threads for the member shares `shares` of `problem` (at least
 * `threads` of them); resolves once each has placed its blocks.
 */
export async function startSharePool(problem: Problem, shares: MemberShare[], threads: number): Promise<SharePool> {
  const count = shares.length;
  const { nDrive, driveDt } = driveGrid(problem);
  const control = new SharedArrayBuffer(4 * 4);
  const data = new SharedArrayBuffer(8 * resultOffset(count, nDrive));
  const ctl = new Int32Array(control), f = new Float64Array(data);
  const owned = (j: number): number[] => Array.from({ length: count }, (_, s) => s).filter((s) => s % threads === j);
  const workers: Worker[] = [];
  const entry = threadEntry('share-thread');
  const ready = Array.from({ length: threads - 1 }, (_, h) => new Promise<void>((resolve, reject) => {
    const workerData: ShareThreadData = { problem, memberShares: shares, shares: owned(h + 1), nDrive, driveDt, control, data };
    const worker = new Worker(entry.url, { eval: entry.eval, workerData });
    workers.push(worker);
    worker.once('message', (message: { kind: 'ready' } | { kind: 'error'; name: string; message: string }) => {
      if (message.kind === 'ready') return resolve();
      const error = new Error(message.message);
      error.name = message.name;
      reject(error);
    });
    worker.once('error', reject);
  }));
  const close = (): void => {
    Atomics.store(ctl, SLOT.generation, -1);
    Atomics.notify(ctl, SLOT.generation);
    for (const w of workers) void w.terminate();
  };
  try {
    await Promise.all(ready);
  } catch (error) {
    close();
    throw error;
  }
  const helpers = threads - 1;
  const remote = Array.from({ length: helpers }, (_, h) => owned(h + 1)).flat();
  return {
    local: owned(0),
    post(driveI, driveQ) {
      f.set(driveI, 0);
      f.set(driveQ, nDrive);
      Atomics.store(ctl, SLOT.done, 0);
      Atomics.add(ctl, SLOT.generation, 1);
      Atomics.notify(ctl, SLOT.generation);
    },
    collect() {
      for (let done = Atomics.load(ctl, SLOT.done); done < helpers; done = Atomics.load(ctl, SLOT.done)) Atomics.wait(ctl, SLOT.done, done);
      if (Atomics.load(ctl, SLOT.failed) !== 0) throw new Error('a member-share thread failed (its message is on stderr)');
      const results = new Map<number, ShareResult>();
      for (const s of remote) {
        const o = resultOffset(s, nDrive);
        results.set(s, { mean: f[o], gradI: f.subarray(o + 1, o + 1 + nDrive), gradQ: f.subarray(o + 1 + nDrive, o + 1 + 2 * nDrive) });
      }
      return results;
    },
    close,
  };
}
