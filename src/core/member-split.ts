// A large design's figure and gradient in member shares: the ensemble cut into a few
// contiguous shares, each evaluated as a problem of its own (its own block, with the
// ensemble's normalised weights), and the shares' means and drive gradients summed in share
// order. The shares depend only on the problem (memberShares), never on the threads that
// run them: a design gives the same bits whether one thread evaluates every share in turn
// (ShareEvaluator alone) or several threads share them out (a SharePool, threads.ts).
// Against the same design evaluated whole, only the order of the sums differs (a last-bit
// difference, which the optimiser may carry elsewhere): small designs are never split.
import { BUFFER, createBlock, freeBlock } from './block.ts';
import { QUBIT_NS, systemCostFactor } from './cost.ts';
import type { EncodedMembers } from './encode.ts';
import { blockSystem, encodeSystem, type SystemEncoding } from './system.ts';
import type { Problem, SharePool, ShareResult } from './types.ts';

export type { SharePool, ShareResult } from './types.ts';
import type { Core } from './wasm.ts';

/** One share: members [start, end) of the problem's ensemble. */
export interface MemberShare {
  start: number;
  end: number;
}

/**
 * The least estimated work of one share (s). Handing a share to another thread costs a
 * wake-up and two copies of the drive (15-20 us here); `npm run bench` measures one thread
 * against two: two win from about 100 us per evaluation, 50 us per share.
 */
export const MIN_SHARE_SECONDS = 50e-6;
/** At most this many shares (a design spreads them over at most as many threads). */
export const MAX_SHARES = 4;

/** The estimated time of one figure-and-gradient evaluation of the problem on one thread (s). */
export function evaluationSeconds(problem: Problem): number {
  const drive = problem.segments * (problem.line?.oversample ?? 1);
  // The qubit kernels' cost per member-sample (cost.ts), scaled to the problem's system.
  return drive * problem.members.length * QUBIT_NS * 1e-9 * systemCostFactor(problem);
}

/**
 * The shares of a problem's members: one (the whole ensemble, not split) unless each of
 * two or more shares would cost at least MIN_SHARE_SECONDS; then 2 or 4, contiguous, cut
 * at multiples of 4 members (the qubit kernels' groups). A function of the problem alone
 * (the benchmark lowers `minShareSeconds` to time splits of smaller problems).
 */
export function memberShares(problem: Problem, minShareSeconds = MIN_SHARE_SECONDS): MemberShare[] {
  const m = problem.members.length;
  const groups = Math.ceil(m / 4);
  let count = 1;
  while (count * 2 <= MAX_SHARES && count * 2 <= groups && evaluationSeconds(problem) / (count * 2) >= minShareSeconds) count *= 2;
  const shares: MemberShare[] = [];
  for (let s = 0; s < count; s++) {
    const start = Math.min(m, 4 * Math.round((s * groups) / count));
    const end = s === count - 1 ? m : Math.min(m, 4 * Math.round(((s + 1) * groups) / count));
    shares.push({ start, end });
  }
  return shares;
}

/** The encoding of members [start, end) of a whole encoding: its normalised weights kept, padded with zero-weight copies. */
export function shareEncoding(whole: SystemEncoding, share: MemberShare): SystemEncoding {
  const count = share.end - share.start;
  const multiple = whole.ladder ? 1 : 2;
  const padded = Math.ceil(count / multiple) * multiple;
  const slice = (values: Float64Array, pad: 'first' | 'zero'): Float64Array => {
    const out = new Float64Array(padded);
    out.set(values.subarray(share.start, share.end));
    for (let j = count; j < padded; j++) out[j] = pad === 'zero' ? 0 : values[share.start];
    return out;
  };
  const members: EncodedMembers = {
    count, padded, scale: slice(whole.members.scale, 'first'), detuning: slice(whole.members.detuning, 'first'), weight: slice(whole.members.weight, 'zero'),
  };
  const memberParams = whole.memberParams?.map((values, k) => (k < 2 ? [members.scale, members.detuning][k] : slice(values, 'first')));
  return { ...whole, members, ...(memberParams ? { memberParams } : {}) };
}

/**
 * Blocks of some shares of a problem in one core, each a problem of its own on the drive
 * grid (nDrive samples of driveDt, the identity map: the drive is given).
 */
export class ShareBlocks {
  private readonly blocks = new Map<number, number>();
  constructor(
    private readonly core: Core, problem: Problem, shares: readonly MemberShare[], indices: readonly number[], readonly nDrive: number, driveDt: number,
  ) {
    const whole = encodeSystem(problem.target, problem.members, problem.system);
    try {
      for (const s of indices) {
        const enc = shareEncoding(whole, shares[s]);
        this.blocks.set(s, createBlock(core, { ...blockSystem(enc), target: problem.target, segments: nDrive, dt: driveDt, held: true }));
      }
    } catch (error) {
      this.dispose();
      throw error;
    }
  }

  /** Share s on the drive (I, Q): its weighted mean, and its gradient as live views of the core's memory. */
  evaluate(s: number, driveI: ArrayLike<number>, driveQ: ArrayLike<number>): ShareResult {
    const core = this.core, p = this.blocks.get(s)!;
    core.view(core.exports.problemBuffer(p, BUFFER.samplesI), this.nDrive).set(driveI);
    core.view(core.exports.problemBuffer(p, BUFFER.samplesQ), this.nDrive).set(driveQ);
    const mean = core.exports.problemGradient(p);
    return { mean, gradI: core.view(core.exports.problemBuffer(p, BUFFER.gradI), this.nDrive), gradQ: core.view(core.exports.problemBuffer(p, BUFFER.gradQ), this.nDrive) };
  }

  /** Free the blocks (idempotent). */
  dispose(): void {
    for (const p of this.blocks.values()) freeBlock(this.core, p);
    this.blocks.clear();
  }
}

/**
 * Split the design objective of block `p` into the member shares `shares` (memberShares):
 * this core evaluates them on blocks of its own, or, with a pool, its own part while the
 * pool's threads evaluate the rest; the sums run in share order either way, so the choice
 * never changes a bit (chooseShareRoute picks by measured time). Returns what frees it.
 */
export function splitObjective(
  core: Core, p: number, problem: Problem, shares: readonly MemberShare[], nDrive: number, driveDt: number, pool?: SharePool,
): () => void {
  const count = shares.length;
  const all = Array.from({ length: count }, (_, s) => s);
  const blocks = new ShareBlocks(core, problem, shares, all, nDrive, driveDt);
  const ex = core.exports;
  const route = new ShareRoute();
  core.shareEvaluators.set(p, () => {
    const driveI = core.view(ex.problemBuffer(p, BUFFER.driveI), nDrive);
    const driveQ = core.view(ex.problemBuffer(p, BUFFER.driveQ), nDrive);
    const usePool = pool !== undefined && route.next();
    const t0 = performance.now();
    if (usePool) pool.post(driveI, driveQ);
    const results = new Map<number, ShareResult>();
    // Views of each share's own block: nothing allocates until the sum has read them.
    for (const s of usePool ? pool.local : all) results.set(s, blocks.evaluate(s, driveI, driveQ));
    if (usePool) for (const [s, r] of pool.collect()) results.set(s, r);
    const mean = sumShares(results, count, core.view(ex.problemBuffer(p, BUFFER.gradDriveI), nDrive), core.view(ex.problemBuffer(p, BUFFER.gradDriveQ), nDrive));
    if (pool) route.took(usePool, performance.now() - t0);
    return mean;
  });
  ex.problemSetShares(p, 1);
  return () => {
    core.shareEvaluators.delete(p);
    blocks.dispose();
  };
}

/**
 * Whether the next evaluation hands shares to the pool's threads or runs them all here:
 * both routes give the same bits, so the faster one is taken, from running means of each
 * route's times. The first evaluations alternate; later every EXPLORE_EVERY-th takes the
 * other route, since the machine's load changes (a busy machine can make the helper
 * threads wait for a core and two threads slower than one).
 */
export class ShareRoute {
  static readonly EXPLORE_EVERY = 32;
  private count = 0;
  private pooled = NaN;
  private alone = NaN;
  private last = true;
  /** True: use the pool for the next evaluation. */
  next(): boolean {
    const k = this.count++;
    if (k < 6) this.last = k % 2 === 0;
    else {
      const faster = this.pooled < this.alone;
      this.last = k % ShareRoute.EXPLORE_EVERY === 0 ? !faster : faster;
    }
    return this.last;
  }
  /** The time (ms) an evaluation took on its route. */
  took(pooled: boolean, ms: number): void {
    const mean = (old: number): number => (Number.isNaN(old) ? ms : 0.7 * old + 0.3 * ms);
    if (pooled) this.pooled = mean(this.pooled);
    else this.alone = mean(this.alone);
  }
}

/** The shares' sum, in share order (the one order every split of a problem uses): gradient into gradI/Q, the mean returned. */
export function sumShares(results: ReadonlyMap<number, ShareResult>, count: number, gradI: Float64Array, gradQ: Float64Array): number {
  let mean = 0;
  for (let s = 0; s < count; s++) {
    const r = results.get(s);
    if (!r) throw new Error(`member share ${s} of ${count} was not evaluated`);
    if (s === 0) {
      gradI.set(r.gradI);
      gradQ.set(r.gradQ);
      mean = r.mean;
      continue;
    }
    for (let k = 0; k < gradI.length; k++) {
      gradI[k] += r.gradI[k];
      gradQ[k] += r.gradQ[k];
    }
    mean += r.mean;
  }
  return mean;
}
