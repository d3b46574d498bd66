// One helper thread of a share pool (share-threads.ts): places the blocks of its member
// shares, says it is ready, then for every evaluation the pool posts reads the drive from
// shared memory, evaluates its shares and writes their results back, until told to end.
import { parentPort, workerData } from 'node:worker_threads';
import { ShareBlocks } from './member-split.ts';
import { resultOffset, SLOT, type ShareThreadData } from './share-threads.ts';
import { getCore } from './wasm.ts';

const { problem, memberShares, shares, nDrive, driveDt, control, data } = workerData as ShareThreadData;
const ctl = new Int32Array(control), f = new Float64Array(data);
let blocks: ShareBlocks;
try {
  blocks = new ShareBlocks(getCore(problem.optimizer.arithmetic), problem, memberShares, shares, nDrive, driveDt);
} catch (error) {
  const e = error instanceof Error ? error : new Error(String(error));
  parentPort!.postMessage({ kind: 'error', name: e.name, message: e.message });
  throw e;
}
parentPort!.postMessage({ kind: 'ready' });
for (let seen = 0; ;) {
  Atomics.wait(ctl, SLOT.generation, seen);
  const generation = Atomics.load(ctl, SLOT.generation);
  if (generation < 0) break;
  if (generation === seen) continue;
  seen = generation;
  try {
    const driveI = f.subarray(0, nDrive), driveQ = f.subarray(nDrive, 2 * nDrive);
    for (const s of shares) {
      const r = blocks.evaluate(s, driveI, driveQ);
      const o = resultOffset(s, nDrive);
      f[o] = r.mean;
      f.set(r.gradI, o + 1);
      f.set(r.gradQ, o + 1 + nDrive);
    }
  } catch (error) {
    process.stderr.write(`member-share thread: ${(error as Error).message}\n`);
    Atomics.store(ctl, SLOT.failed, 1);
  }
  Atomics.add(ctl, SLOT.done, 1);
  Atomics.notify(ctl, SLOT.done);
}
blocks.dispose();
parentPort!.close();
