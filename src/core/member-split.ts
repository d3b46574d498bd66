// A large design's figure and gradient in member shares: the ensemble cut into a few
// contiguous shares, each evaluated as a problem of its own (its own block, with the
// ensemble's normalised weights), and the shares' means and drive gradients summed in one
// fixed order, pairwise: (s0 + s1) + (s2 + s3). The shares depend only on the problem
// (memberShares), never on the threads that run them: a design gives the same bits whether
// one thread evaluates every share in turn or several threads share them out (a SharePool,
// share-threads.ts), each taking a contiguous block of shares and summing it first.
// Against the same design evaluated whole, only the order of the sums differs (a last-bit
// difference, which the optimiser may carry elsewhere): small designs are never split.
import { BUFFER, createBlock, freeBlock } from './block.ts';
import { QUBIT_NS, systemCostFactor } from './cost.ts';
import type { EncodedMembers } from './encode.ts';
import { blockSystem, encodeSystem, needsLadder, type SystemEncoding } from './system.ts';
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
 * at multiples of the kernels' group of members (4 on the qubit kernels, which take
 * members two and four at a time; 1 on a ladder, which takes them one at a time, so that
 * 5 members split 3 + 2, not 4 + 1). A function of the problem alone (the benchmark
 * lowers `minShareSeconds` to time splits of smaller problems).
 */
export function memberShares(problem: Problem, minShareSeconds = MIN_SHARE_SECONDS): MemberShare[] {
  const m = problem.members.length;
  const unit = needsLadder(problem.target, problem.system) ? 1 : 4;
  let count = 1;
  while (count * 2 <= MAX_SHARES && count * 2 <= Math.ceil(m / unit) && evaluationSeconds(problem) / (count * 2) >= minShareSeconds) count *= 2;
  // Cut s of count at the multiple of the unit nearest to s m / count (no share empty): the
  // halves of 4 shares are the 2 shares', so a thread's contiguous block of them is as
  // even as 2 shares can be (1000 x 121: 60 + 61 members; 10000 x 25: 12 + 13).
  const groups = Math.ceil(m / unit);
  const cut = (s: number): number => (s === count ? m : unit * Math.min(groups - count + s, Math.max(s, Math.round((s * m) / (count * unit)))));
  const shares: MemberShare[] = [];
  for (let s = 0; s < count; s++) shares.push({ start: s === 0 ? 0 : cut(s), end: cut(s + 1) });
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
 * never changes a bit (ShareRoute picks by measured time). Returns what frees it.
 */
export function splitObjective(
  core: Core, p: number, problem: Problem, shares: readonly MemberShare[], nDrive: number, driveDt: number, pool?: SharePool,
): () => void {
  const all = shares.map((_, s) => s);
  const blocks = new ShareBlocks(core, problem, shares, all, nDrive, driveDt);
  const ex = core.exports;
  const route = new ShareRoute();
  core.shareEvaluators.set(p, () => {
    const driveI = core.view(ex.problemBuffer(p, BUFFER.driveI), nDrive);
    const driveQ = core.view(ex.problemBuffer(p, BUFFER.driveQ), nDrive);
    const gradI = core.view(ex.problemBuffer(p, BUFFER.gradDriveI), nDrive);
    const gradQ = core.view(ex.problemBuffer(p, BUFFER.gradDriveQ), nDrive);
    const usePool = pool !== undefined && (pool.always || route.next());
    const t0 = performance.now();
    if (usePool) pool.post(driveI, driveQ);
    // Views of each share's own block: nothing allocates until the sum has read them.
    const own = (usePool ? pool.local : all).map((s) => blocks.evaluate(s, driveI, driveQ));
    // This thread's block summed while the helpers work; then the blocks' sums, in thread order.
    let mean = sumShares(own, gradI, gradQ);
    if (usePool) mean = sumShares([{ mean, gradI, gradQ }, ...pool.collect()], gradI, gradQ);
    if (pool && !pool.always) route.took(usePool, performance.now() - t0);
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
 * both routes give the same bits, so the faster one is taken. The first WINDOW
 * evaluations go to the pool and the next WINDOW run here (a run of each: a helper's
 * engine warms up over its first evaluations); after them each evaluation takes the route
 * whose last WINDOW times have the lower median, and now and then a try of the
 * other one, since the machine's load changes (a busy machine can make the helper threads
 * wait for a core and two threads slower than one): a try of this thread is one
 * evaluation, judged by its time; a try of the pool is a burst of WINDOW evaluations,
 * judged by their median, since helpers that sat idle for a while are slow over their
 * first evaluations (measured in a 1000 x 121 design: 1.5 ms for the first after idling,
 * 0.9 ms over bursts of 3, 0.65-0.75 ms in a long run, against 0.8-1.1 ms on one
 * thread), and single tries of the pool always lost and kept designs on one thread. Tries come
 * EXPLORE_EVERY evaluations after the last, an interval that doubles (to EXPLORE_MOST)
 * while they lose, as they cost most on a busy machine; a try that wins while the medians
 * still say otherwise is followed by another at once, so a change of load is followed
 * within a few evaluations.
 */
export class ShareRoute {
  static readonly WINDOW = 5;
  static readonly WARM_UP = 2 * ShareRoute.WINDOW;
  static readonly EXPLORE_EVERY = 20;
  static readonly EXPLORE_MOST = 320;
  private count = 0;
  private readonly pooled: number[] = [];
  private readonly alone: number[] = [];
  /** Evaluations left in the current burst, its route, and whether the last one taken ends it. */
  private burstLeft = 0;
  private burstRoute = false;
  private judging = false;
  private again = false;
  private interval = ShareRoute.EXPLORE_EVERY;
  /** The first burst comes soon after the warm-up: a cold helper's slow first times can have decided it. */
  private nextTry = ShareRoute.WARM_UP + ShareRoute.WINDOW;
  /** True: use the pool for the next evaluation. */
  next(): boolean {
    const k = this.count++;
    this.judging = false;
    if (k < ShareRoute.WARM_UP) return k < ShareRoute.WINDOW;
    if (this.burstLeft === 0 && (this.again || k >= this.nextTry)) {
      this.burstRoute = !(lowerMedian(this.pooled) <= lowerMedian(this.alone));
      this.burstLeft = this.burstRoute ? ShareRoute.WINDOW : 1;
      this.again = false;
    }
    if (this.burstLeft > 0) {
      this.judging = --this.burstLeft === 0;
      return this.burstRoute;
    }
    return lowerMedian(this.pooled) <= lowerMedian(this.alone);
  }
  /** The time (ms) the last evaluation took on its route. */
  took(pooled: boolean, ms: number): void {
    const times = pooled ? this.pooled : this.alone, other = pooled ? this.alone : this.pooled;
    times.push(ms);
    if (times.length > ShareRoute.WINDOW) times.shift();
    if (!this.judging) return;
    // A burst on the pool fills its window and is judged by its median; a try of this thread by its time.
    const won = (pooled ? lowerMedian(times) : ms) < lowerMedian(other);
    this.again = won && lowerMedian(times) > lowerMedian(other);
    this.interval = won ? ShareRoute.EXPLORE_EVERY : Math.min(2 * this.interval, ShareRoute.EXPLORE_MOST);
    this.nextTry = this.count + this.interval;
  }
}

/** The lower median of some values (Infinity for none). */
function lowerMedian(values: readonly number[]): number {
  if (values.length === 0) return Infinity;
  const s = [...values].sort((a, b) => a - b);
  return s[(s.length - 1) >> 1];
}

/**
 * The sum of 1, 2 or 4 consecutive shares (or of the sums of consecutive blocks of them),
 * pairwise: a, a + b, or (a + b) + (c + d), element by element. The one order every split
 * of a problem uses: a thread summing its block of two first and the blocks' sums added
 * after give the same bits as one thread summing all four. The gradient goes into gradI/Q
 * (which may be the first part's own arrays), the mean is returned.
 */
export function sumShares(parts: readonly ShareResult[], gradI: Float64Array, gradQ: Float64Array): number {
  const [a, b, c, d] = parts;
  switch (parts.length) {
    case 1:
      if (a.gradI !== gradI) gradI.set(a.gradI);
      if (a.gradQ !== gradQ) gradQ.set(a.gradQ);
      return a.mean;
    case 2:
      for (let k = 0; k < gradI.length; k++) {
        gradI[k] = a.gradI[k] + b.gradI[k];
        gradQ[k] = a.gradQ[k] + b.gradQ[k];
      }
      return a.mean + b.mean;
    case 4:
      for (let k = 0; k < gradI.length; k++) {
        gradI[k] = (a.gradI[k] + b.gradI[k]) + (c.gradI[k] + d.gradI[k]);
        gradQ[k] = (a.gradQ[k] + b.gradQ[k]) + (c.gradQ[k] + d.gradQ[k]);
      }
      return (a.mean + b.mean) + (c.mean + d.mean);
    default:
      throw new RangeError(`member shares: ${parts.length} parts to sum; 1, 2 or 4 are summed`);
  }
}

/** The shares thread j of `threads` evaluates: a contiguous block (threads divides the count of shares, both powers of two). */
export function threadShares(count: number, threads: number, j: number): number[] {
  if (count % threads !== 0) throw new RangeError(`member shares: ${count} shares do not divide among ${threads} threads`);
  const per = count / threads;
  return Array.from({ length: per }, (_, k) => j * per + k);
}
