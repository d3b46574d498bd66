// One helper thread of a share pool (share-threads.ts): places the blocks of its member
// shares, says it is ready, then for every evaluation the pool posts reads the drive from
// shared memory, evaluates its shares and writes their sum back, until told to end.
import { parentPort, workerData } from 'node:worker_threads';
import { ShareBlocks, sumShares } from './member-split.ts';
import { awaitChange, resultOffset, SLOT, type ShareThreadData } from './share-threads.ts';
import { getCore } from './wasm.ts';

const { problem, memberShares, shares, helper, nDrive, driveDt, control, data, spinMs } = workerData as ShareThreadData;
const ctl = new Int32Array(control), f = new Float64Array(data);
let blocks: ShareBlocks;
try {
  blocks = new ShareBlocks(getCore(problem.optimizer.arithmetic), problem, memberShares, shares, nDrive, driveDt);
  // One evaluation before the first real one sets the engine optimising this thread's
  // kernels (a cold thread's first evaluations run 2 to 3.5 times slower).
  const zero = new Float64Array(nDrive);
  for (const s of shares) blocks.evaluate(s, zero, zero);
} catch (error) {
  const e = error instanceof Error ? error : new Error(String(error));
  parentPort!.postMessage({ kind: 'error', name: e.name, message: e.message });
  throw e;
}
parentPort!.postMessage({ kind: 'ready' });
for (let seen = 0; ;) {
  const generation = awaitChange(ctl, SLOT.generation, seen, spinMs);
  if (generation < 0) break;
  seen = generation;
  try {
    const driveI = f.subarray(0, nDrive), driveQ = f.subarray(nDrive, 2 * nDrive);
    // The block's sum, in the order every split uses (sumShares), straight into shared memory.
    const o = resultOffset(helper, nDrive);
    f[o] = sumShares(shares.map((s) => blocks.evaluate(s, driveI, driveQ)), f.subarray(o + 1, o + 1 + nDrive), f.subarray(o + 1 + nDrive, o + 1 + 2 * nDrive));
  } catch (error) {
    process.stderr.write(`member-share thread: ${(error as Error).message}\n`);
    Atomics.store(ctl, SLOT.failed, 1);
  }
  Atomics.add(ctl, SLOT.done, 1);
  Atomics.notify(ctl, SLOT.done);
}
blocks.dispose();
parentPort!.close();
