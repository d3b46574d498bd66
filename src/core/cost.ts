// What one member-sample of a problem's objective + gradient costs, relative to the qubit
// kernels': the command line's design estimate (src/cli/estimate.ts) and the member shares
// (member-split.ts) rest on the same figures.
import { needsLadder } from './system.ts';
import type { Problem } from './types.ts';

// The ladder kernels' objective + gradient per segment-member, a + b d^3 ns against the qubit
// kernels' QUBIT_NS (one member at a time in scalar f64, an eigendecomposition per sample:
// docs/transmon.md). Fitted to the least of many interleaved timings on this project's
// 2-core machine, N = 100, 25 members: 472, 816, 1211, 2066, 3000 ns at d = 3..7 against
// 8.1 to 8.8 ns for the qubit; the fit is within 5 % there, gives 334 ns at d = 2 (measured
// 366) and 4400 ns at d = 8 (measured 2900 to 5200 under load).
const LADDER_NS_A = 270;
const LADDER_NS_B = 8;
/** The qubit kernels' objective + gradient per segment-member (ns) on this project's machine. */
export const QUBIT_NS = 8.5;

/** How many times a qubit member-sample a member-sample of this problem's system costs (1 on the qubit kernels). */
export function systemCostFactor(problem: Pick<Problem, 'target' | 'system'>): number {
  if (!needsLadder(problem.target, problem.system)) return 1;
  const d = problem.system?.levels ?? 2;
  return (LADDER_NS_A + LADDER_NS_B * d ** 3) / QUBIT_NS;
}
