// What the core computes exactly, checked before any kernel runs. The kernels take the
// sine and cosine of each segment's half angle a = pi dt sqrt((1+eps)^2 (I^2+Q^2) + Delta^2)
// from power series after halving a until it is at most 1 (assembly/su2.ts). Measured
// against the plain-TypeScript oracle (Math.sin, Math.cos), the figure agrees to 2e-12 and
// the gradient to 1e-11 relative up to a = 1e4 rad, i.e. to the conditioning of the angle
// itself (a times the rounding unit); beyond, each halving loses accuracy, and above
// about 2e9 rad the halving count overflows (NaN). So no segment may turn by more.
import { SegmentAngleError } from './errors.ts';
import { kernelOf } from './line-spec.ts';
import type { Member, Problem, Pulse } from './types.ts';

/** Largest half angle a segment may have (rad). */
export const MAX_SEGMENT_ANGLE = 1e4;

/** Largest |detuning| and amplitude scale (1 + amplitude error) over members. */
function extremes(members: readonly Member[]): { detuning: number; scale: number } {
  let detuning = 0, scale = 0;
  for (const m of members) {
    detuning = Math.max(detuning, Math.abs(m.detuning));
    scale = Math.max(scale, Math.abs(1 + m.amplitudeError));
  }
  return { detuning, scale };
}

/** The largest segment half angle for drive amplitudes up to `rabi` (Hz) over members. */
export function segmentAngle(dt: number, rabi: number, members: readonly Member[]): number {
  const { detuning, scale } = extremes(members);
  return Math.PI * dt * Math.hypot(scale * rabi, detuning);
}

function allowed(dt: number): string {
  return `a segment of ${dt} s may turn the qubit by at most ${MAX_SEGMENT_ANGLE} rad (pi dt sqrt(((1 + amplitudeError) rabi)^2 + detuning^2)); ` +
    `use shorter segments or smaller values`;
}

/** Refuse a pulse whose segments turn some member by more than the core computes exactly. */
export function checkPulseAngles(pulse: Pulse, members: readonly Member[]): void {
  let worst = 0;
  for (let k = 1; k < pulse.i.length; k++) {
    if (Math.hypot(pulse.i[k], pulse.q[k]) > Math.hypot(pulse.i[worst], pulse.q[worst])) worst = k;
  }
  const rabi = Math.hypot(pulse.i[worst], pulse.q[worst]);
  const angle = segmentAngle(pulse.dt, rabi, members);
  if (angle <= MAX_SEGMENT_ANGLE) return;
  const { detuning } = extremes(members);
  if (Math.PI * pulse.dt * detuning > MAX_SEGMENT_ANGLE) {
    throw new SegmentAngleError('detuning', `detuning: ${detuning} Hz is not allowed with this pulse; ${allowed(pulse.dt)}`);
  }
  throw new SegmentAngleError(`pulse.i[${worst}]`,
    `pulse.i[${worst}], pulse.q[${worst}]: (${pulse.i[worst]}, ${pulse.q[worst]}) Hz is not allowed; ${allowed(pulse.dt)} (this sample turns by ${angle.toPrecision(3)} rad)`);
}

/** Refuse a design problem whose bound lets a segment turn some member by more than the core computes exactly. */
export function checkProblemAngles(problem: Problem): void {
  let peak = problem.constraints.bound === 'box' ? Math.SQRT2 * problem.rabiMax : problem.rabiMax;
  let dt = problem.dt;
  if (problem.line) {
    // Through a line the qubit sees steps of dt / oversample of at most the peak times sum |h|.
    dt /= problem.line.oversample;
    let gain = 0;
    for (const v of kernelOf(problem.line, dt).h) gain += Math.abs(v);
    peak *= gain;
  }
  const angle = segmentAngle(dt, peak, problem.members);
  if (angle <= MAX_SEGMENT_ANGLE) return;
  const { detuning } = extremes(problem.members);
  if (Math.PI * dt * detuning > MAX_SEGMENT_ANGLE) {
    throw new SegmentAngleError('ensemble.detuning', `ensemble.detuning: ${detuning} Hz is not allowed; ${allowed(dt)}`);
  }
  throw new SegmentAngleError('rabiMax', `rabiMax: ${problem.rabiMax} Hz is not allowed; ${allowed(dt)} (this turns by ${angle.toPrecision(3)} rad)`);
}
