// Member shares of a large design evaluated on Node worker threads (member-split.ts): the
// thread that runs the optimiser evaluates some shares itself and hands the drive to one
// helper thread per other part (share-thread.ts) through shared memory, waking them and
// waiting for them with Atomics, since the core asks for the figure synchronously from
// inside an optimiser step. Thread j (0 = the optimiser's) takes the j-th contiguous block
// of shares (threadShares) and a helper hands back its block's sum, so that after the wait
// only the blocks' sums are added (member-split.ts sumShares). Node only (browsers block
// Atomics.wait on the page and give no shared memory to a page that is not cross-origin
// isolated).
import { Worker } from 'node:worker_threads';
import { lineLayout } from './line.ts';
import { threadShares, type MemberShare, type ShareResult, type SharePool } from './member-split.ts';
import { threadEntry } from './thread-entry.ts';
import type { Problem } from './types.ts';

/** Slots of the control array: the evaluation's number (-1: end), helpers done, a helper's failure. */
export const SLOT = { generation: 0, done: 1, failed: 2 } as const;

/**
 * How long (ms) a thread polls shared memory before it sleeps in Atomics.wait: a helper
 * for the next evaluation, the optimiser's thread for the helpers' results. Waking a
 * sleeping thread costs 15 to 50 us here; the optimiser's own work between two
 * evaluations of a 1000 x 121 design is about 0.1 ms. Polling longer is worse on a busy
 * machine: measured on a one-start 1000 x 121 design with every evaluation on the pool,
 * under a load average of 8 on the 2 cores, polling 0.5 / 0.2 ms ran 0.79 times as fast as
 * one thread, against 1.66 for sleeping at once and 1.68 for these (a polling thread holds
 * the core its partner waits for).
 */
export const SPIN_MS = { helper: 0.1, collect: 0.03 } as const;

/** Poll slot `slot` of `ctl` while it holds `value`, for up to `ms`; then sleep until it changes. Returns its new value. */
export function awaitChange(ctl: Int32Array, slot: number, value: number, ms: number): number {
  const until = performance.now() + ms;
  let now = Atomics.load(ctl, slot);
  while (now === value && performance.now() < until) now = Atomics.load(ctl, slot);
  while (now === value) {
    Atomics.wait(ctl, slot, value);
    now = Atomics.load(ctl, slot);
  }
  return now;
}

/** What a helper thread is given (share-thread.ts). */
export interface ShareThreadData {
  problem: Problem;
  /** Every share of the problem, and the indices this thread evaluates (a contiguous block). */
  memberShares: MemberShare[];
  shares: number[];
  /** This helper's number: where its block's sum goes (resultOffset). */
  helper: number;
  nDrive: number;
  driveDt: number;
  control: SharedArrayBuffer;
  data: SharedArrayBuffer;
  /** How long the helper polls for the next evaluation before it sleeps (ms). */
  spinMs: number;
}

/** The drive grid of a problem's blocks: samples and their length (s). */
export function driveGrid(problem: Problem): { nDrive: number; driveDt: number } {
  if (!problem.line) return { nDrive: problem.segments, driveDt: problem.dt };
  const layout = lineLayout(problem.line, problem.segments, problem.dt);
  return { nDrive: layout.samples, driveDt: layout.dt };
}

/** Offset (f64) of helper h's result (the sum of its block of shares) in the data array: the drive (2 nDrive), then per helper mean, gradI, gradQ. */
export function resultOffset(h: number, nDrive: number): number {
  return 2 * nDrive + h * (1 + 2 * nDrive);
}

/** Options of a share pool (tests and the benchmark; the library uses the defaults). */
export interface SharePoolOptions {
  /** How long the helpers and the optimiser's thread poll before they sleep (default SPIN_MS; 0: sleep at once). */
  spinMs?: { helper: number; collect: number };
  /** Every evaluation on the pool, never the one-thread route (default: the faster route, ShareRoute). */
  always?: boolean;
}

/**
 * Start `threads - 1` helper threads for the member shares `shares` of `problem` (`threads`
 * divides their count: 2 or 4 of 2 or 4 shares); resolves once each has placed its blocks.
 */
export async function startSharePool(problem: Problem, shares: MemberShare[], threads: number, options: SharePoolOptions = {}): Promise<SharePool> {
  const spin = options.spinMs ?? SPIN_MS;
  const count = shares.length;
  const { nDrive, driveDt } = driveGrid(problem);
  const control = new SharedArrayBuffer(4 * 4);
  const helpers = threads - 1;
  const data = new SharedArrayBuffer(8 * resultOffset(helpers, nDrive));
  const ctl = new Int32Array(control), f = new Float64Array(data);
  const owned = (j: number): number[] => threadShares(count, threads, j);
  const workers: Worker[] = [];
  const entry = threadEntry('share-thread');
  const ready = Array.from({ length: helpers }, (_, h) => new Promise<void>((resolve, reject) => {
    const workerData: ShareThreadData = { problem, memberShares: shares, shares: owned(h + 1), helper: h, nDrive, driveDt, control, data, spinMs: spin.helper };
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
  const results: ShareResult[] = Array.from({ length: helpers }, (_, h) => {
    const o = resultOffset(h, nDrive);
    return { mean: NaN, gradI: f.subarray(o + 1, o + 1 + nDrive), gradQ: f.subarray(o + 1 + nDrive, o + 1 + 2 * nDrive) };
  });
  let posted = 0;
  return {
    local: owned(0),
    always: options.always ?? false,
    get posted() { return posted; },
    post(driveI, driveQ) {
      posted++;
      f.set(driveI, 0);
      f.set(driveQ, nDrive);
      Atomics.store(ctl, SLOT.done, 0);
      Atomics.add(ctl, SLOT.generation, 1);
      Atomics.notify(ctl, SLOT.generation);
    },
    collect() {
      for (let done = Atomics.load(ctl, SLOT.done); done < helpers;) done = awaitChange(ctl, SLOT.done, done, spin.collect);
      if (Atomics.load(ctl, SLOT.failed) !== 0) throw new Error('a member-share thread failed (its message is on stderr)');
      for (let h = 0; h < helpers; h++) results[h].mean = f[resultOffset(h, nDrive)];
      return results;
    },
    close,
  };
}
