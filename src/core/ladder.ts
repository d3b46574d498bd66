// The transmon ladder over the wasm core (assembly/ladder*.ts): evaluation of a pulse on
// d levels with leakage, average gate fidelity and the optional free phase after the
// gate, the exact gradient as arrays (tests, benchmark), and one segment's propagator.
// Validation happens here; the kernels trust their inputs.
import { ArgumentError, describeValue } from './errors.ts';
import { checkPulse, encodeTarget } from './encode.ts';
import type { LadderSystem, Member, Pulse, Target, TruncationCheck, Vec3 } from './types.ts';
import { getCore, type Core } from './wasm.ts';

/** Fewest levels of a ladder (2: the qubit). */
export const MIN_LEVELS = 2;
/** Most levels of a ladder in a spec. */
export const MAX_LEVELS = 8;

export type { LadderSystem, TruncationCheck } from './types.ts';

/** An ensemble member of a ladder: a qubit member plus an error of the anharmonicity (Hz). */
export interface LadderMember extends Member {
  anharmonicityError: number;
}

/** Options of a ladder evaluation. */
export interface LadderOptions {
  /** Gate targets: the figure up to a z rotation after the gate (a virtual Z), reported per member. */
  freePhaseAfter?: boolean;
}

/** Figures of one ladder member. */
export interface LadderMemberFigure extends LadderMember {
  /** Gate: 1 - |Tr(V^dag M)|^2/4 with M = P U P; state: 1 - |<to|U|from>|^2. */
  infidelity: number;
  /** Population that left levels 0, 1 (gate: averaged over the two basis states). */
  leakage: number;
  /** Gate: 1 - (Tr(M^dag M) + |Tr(V^dag M)|^2)/6 (Pedersen et al. 2007); state: same as infidelity. */
  averageInfidelity: number;
  /** With freePhaseAfter: the angle phi (rad) of Rz(phi) = exp(-i phi sz/2) that follows the pulse. */
  phaseAfter?: number;
}

/** The result of evaluating a pulse on a ladder ensemble. */
export interface LadderEvaluation {
  levels: number;
  members: LadderMemberFigure[];
  meanInfidelity: number;
  worstInfidelity: number;
  worstIndex: number;
  meanLeakage: number;
  worstLeakage: number;
  meanAverageInfidelity: number;
}

/** The ladder kernels the core exports (assembly/index.ts). */
interface LadderExports {
  ladderPropagator(d: number, dt: number, i: number, q: number, detuning: number, scale: number, alpha: number,
    outPtr: number, workPtr: number): void;
  ladderFigure(iPtr: number, qPtr: number, n: number, dt: number, d: number, scalePtr: number, detPtr: number,
    alphaPtr: number, wPtr: number, m: number, targetPtr: number, mode: number, outPtr: number, workPtr: number): number;
  ladderGradient(iPtr: number, qPtr: number, n: number, dt: number, d: number, scalePtr: number, detPtr: number,
    alphaPtr: number, wPtr: number, m: number, targetPtr: number, mode: number, outPtr: number,
    gIPtr: number, gQPtr: number, workPtr: number): number;
  ladderPopulations(iPtr: number, qPtr: number, n: number, dt: number, d: number, scale: number, detuning: number,
    alpha: number, targetPtr: number, outPtr: number, workPtr: number): void;
  ladderWorkspaceSize(n: number, d: number): number;
}

function ladderCore(core: Core): LadderExports {
  return core.exports as unknown as LadderExports;
}

/** Most levels of the truncation check (levels + 2 of the largest system). */
export const TRUNCATION_CHECK_MAX_LEVELS = MAX_LEVELS + 2;

/** Check a system description (levels 2..maxLevels, finite anharmonicity). */
export function checkSystem(system: LadderSystem, maxLevels = MAX_LEVELS): void {
  if (!Number.isInteger(system.levels) || system.levels < MIN_LEVELS || system.levels > maxLevels) {
    throw new ArgumentError(`system.levels: ${describeValue(system.levels)} is not allowed; an integer from ${MIN_LEVELS} to ${maxLevels}`);
  }
  if (!Number.isFinite(system.anharmonicity)) {
    throw new ArgumentError(`system.anharmonicity: ${describeValue(system.anharmonicity)} is not a finite number of Hz`);
  }
}

/** Figure mode of the ladder kernels: 0 gate, 1 state, 2 gate with a free phase after. */
export function ladderMode(target: Target, options: LadderOptions = {}): number {
  if (target.kind === 'state') return 1;
  return options.freePhaseAfter ? 2 : 0;
}

interface EncodedLadderMembers {
  scale: Float64Array;
  detuning: Float64Array;
  alpha: Float64Array;
  weight: Float64Array;
}

/** Members as the ladder kernels read them (no padding: one member at a time); weights normalised. */
export function encodeLadderMembers(members: readonly LadderMember[], system: LadderSystem): EncodedLadderMembers {
  if (members.length === 0) throw new ArgumentError('members: the ensemble is empty; give at least one member');
  const m = members.length;
  const out = { scale: new Float64Array(m), detuning: new Float64Array(m), alpha: new Float64Array(m), weight: new Float64Array(m) };
  let total = 0;
  members.forEach((member, j) => {
    if (!Number.isFinite(member.detuning)) throw new ArgumentError(`members[${j}].detuning: ${describeValue(member.detuning)} is not a finite number of Hz`);
    if (!Number.isFinite(member.amplitudeError) || member.amplitudeError <= -1) {
      throw new ArgumentError(`members[${j}].amplitudeError: ${describeValue(member.amplitudeError)} is not allowed; it must be a finite number above -1`);
    }
    if (!Number.isFinite(member.anharmonicityError)) {
      throw new ArgumentError(`members[${j}].anharmonicityError: ${describeValue(member.anharmonicityError)} is not a finite number of Hz`);
    }
    if (!Number.isFinite(member.weight) || member.weight < 0) {
      throw new ArgumentError(`members[${j}].weight: ${describeValue(member.weight)} is not allowed; it must be finite and >= 0`);
    }
    out.scale[j] = 1 + member.amplitudeError;
    out.detuning[j] = member.detuning;
    out.alpha[j] = system.anharmonicity + member.anharmonicityError;
    out.weight[j] = member.weight;
    total += member.weight;
  });
  if (!(total > 0)) throw new ArgumentError('members: the weights sum to 0; at least one must be positive');
  for (let j = 0; j < m; j++) out.weight[j] /= total;
  return out;
}

/** Qubit members as ladder members with no anharmonicity error. */
export function asLadderMembers(members: readonly Member[]): LadderMember[] {
  return members.map((m) => ({ ...m, anharmonicityError: 'anharmonicityError' in m ? (m as LadderMember).anharmonicityError : 0 }));
}

/** Evaluate a pulse on a ladder: infidelity, leakage and average gate infidelity per member and over the ensemble. */
export function evaluateLadder(
  target: Target, pulse: Pulse, members: readonly LadderMember[], system: LadderSystem, options: LadderOptions = {},
): LadderEvaluation {
  return evaluateUpTo(target, pulse, members, system, options, MAX_LEVELS);
}

/** Re-evaluate on two more levels (up to 10) and compare with the evaluation on the system's levels. */
export function truncationCheck(
  target: Target, pulse: Pulse, members: readonly LadderMember[], system: LadderSystem, options: LadderOptions = {},
  evaluation = evaluateLadder(target, pulse, members, system, options),
): TruncationCheck {
  const more = evaluateUpTo(target, pulse, members, { ...system, levels: system.levels + 2 }, options, TRUNCATION_CHECK_MAX_LEVELS);
  // Below 1e-15 a change is rounding, not truncation.
  const apart = (a: number, b: number): boolean => a > 2 * b + 1e-15 || b > 2 * a + 1e-15;
  return {
    levels: more.levels, meanInfidelity: more.meanInfidelity, meanLeakage: more.meanLeakage,
    differs: apart(more.meanInfidelity, evaluation.meanInfidelity) || apart(more.meanLeakage, evaluation.meanLeakage),
  };
}

function evaluateUpTo(
  target: Target, pulse: Pulse, members: readonly LadderMember[], system: LadderSystem, options: LadderOptions, maxLevels: number,
): LadderEvaluation {
  checkPulse(pulse);
  checkSystem(system, maxLevels);
  const enc = encodeLadderMembers(members, system);
  const core = getCore();
  const ex = ladderCore(core);
  const n = pulse.i.length, m = members.length, d = system.levels;
  const mode = ladderMode(target, options);
  const out = core.job(() => {
    const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
    const sPtr = core.put(enc.scale), dPtr = core.put(enc.detuning), aPtr = core.put(enc.alpha), wPtr = core.put(enc.weight);
    const tPtr = core.put(encodeTarget(target));
    const outPtr = core.alloc(3 * m);
    const workPtr = core.alloc(ex.ladderWorkspaceSize(1, d));
    ex.ladderFigure(iPtr, qPtr, n, pulse.dt, d, sPtr, dPtr, aPtr, wPtr, m, tPtr, mode, outPtr, workPtr);
    return core.read(outPtr, 3 * m);
  });
  return summarise(members, enc.weight, out, d, target, mode === 2);
}

function summarise(
  members: readonly LadderMember[], weight: Float64Array, out: Float64Array, levels: number, target: Target, freePhase: boolean,
): LadderEvaluation {
  const m = members.length;
  let meanInfidelity = 0, meanLeakage = 0, meanAverageInfidelity = 0, worstIndex = 0, worstLeakage = 0;
  const figures = members.map((member, j) => {
    const infidelity = out[j], leakage = out[m + j];
    // 1 - F_avg = L + (2/3)|w|^2 = (L + 2 J)/3: a sum of non-negative terms.
    const averageInfidelity = target.kind === 'gate' ? (leakage + 2 * infidelity) / 3 : infidelity;
    meanInfidelity += weight[j] * infidelity;
    meanLeakage += weight[j] * leakage;
    meanAverageInfidelity += weight[j] * averageInfidelity;
    if (infidelity > out[worstIndex]) worstIndex = j;
    worstLeakage = Math.max(worstLeakage, leakage);
    const figure: LadderMemberFigure = {
      detuning: member.detuning, amplitudeError: member.amplitudeError, anharmonicityError: member.anharmonicityError,
      weight: weight[j], infidelity, leakage, averageInfidelity,
    };
    if (freePhase) figure.phaseAfter = out[2 * m + j];
    return figure;
  });
  return {
    levels, members: figures, meanInfidelity, worstInfidelity: out[worstIndex], worstIndex,
    meanLeakage, worstLeakage, meanAverageInfidelity,
  };
}

/** Figure and exact gradient on a ladder (per Hz), with every member's figure and leakage. */
export interface LadderFigureGradient {
  mean: number;
  perMember: Float64Array;
  leakage: Float64Array;
  gradI: Float64Array;
  gradQ: Float64Array;
}

/** A ladder gradient job placed in wasm memory once; `run` recomputes it until `dispose`. */
export interface LadderGradientJob {
  run(): number;
  result(): LadderFigureGradient;
  dispose(): void;
}

/** Place pulse, members, system and target in the core for repeated gradient evaluations. */
export function prepareLadderGradientJob(
  target: Target, pulse: Pulse, members: readonly LadderMember[], system: LadderSystem, options: LadderOptions = {},
): LadderGradientJob {
  checkPulse(pulse);
  checkSystem(system);
  const enc = encodeLadderMembers(members, system);
  const core = getCore();
  const ex = ladderCore(core);
  const n = pulse.i.length, m = members.length, d = system.levels;
  const mode = ladderMode(target, options);
  const mark = core.mark();
  const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
  const sPtr = core.put(enc.scale), dPtr = core.put(enc.detuning), aPtr = core.put(enc.alpha), wPtr = core.put(enc.weight);
  const tPtr = core.put(encodeTarget(target));
  const outPtr = core.alloc(3 * m), gIPtr = core.alloc(n), gQPtr = core.alloc(n);
  const workPtr = core.alloc(ex.ladderWorkspaceSize(n, d));
  const run = (): number => ex.ladderGradient(iPtr, qPtr, n, pulse.dt, d, sPtr, dPtr, aPtr, wPtr, m, tPtr, mode, outPtr, gIPtr, gQPtr, workPtr);
  return {
    run,
    result: () => {
      const mean = run();
      return { mean, perMember: core.read(outPtr, m), leakage: core.read(outPtr + 8 * m, m), gradI: core.read(gIPtr, n), gradQ: core.read(gQPtr, n) };
    },
    dispose: () => core.release(mark),
  };
}

/** Figure and exact gradient of a pulse on a ladder ensemble (weights normalised). */
export function ladderFigureAndGradient(
  target: Target, pulse: Pulse, members: readonly LadderMember[], system: LadderSystem, options: LadderOptions = {},
): LadderFigureGradient {
  const job = prepareLadderGradientJob(target, pulse, members, system, options);
  try {
    return job.result();
  } finally {
    job.dispose();
  }
}

/** One segment's exact propagator exp(-i H dt) on `levels` levels: [row][column] = [re, im]. */
export function ladderSegmentPropagator(
  levels: number, dt: number, iHz: number, qHz: number, member: LadderMember, anharmonicity: number,
): [number, number][][] {
  checkSystem({ levels, anharmonicity });
  checkPulse({ dt, i: Float64Array.of(iHz), q: Float64Array.of(qHz), metadata: {} });
  const core = getCore();
  const ex = ladderCore(core);
  const d = levels;
  const flat = core.job(() => {
    const outPtr = core.alloc(2 * d * d);
    const workPtr = core.alloc(ex.ladderWorkspaceSize(1, d));
    ex.ladderPropagator(d, dt, iHz, qHz, member.detuning, 1 + member.amplitudeError,
      anharmonicity + member.anharmonicityError, outPtr, workPtr);
    return core.read(outPtr, 2 * d * d);
  });
  return Array.from({ length: d }, (_, r) => Array.from({ length: d }, (_, c) => [flat[2 * (r * d + c)], flat[2 * (r * d + c) + 1]] as [number, number]));
}

/** Population of every level after each sample for one member, from the qubit state with Bloch vector `from`: (N+1) x levels, sample-major. */
export function ladderPopulations(pulse: Pulse, member: LadderMember, system: LadderSystem, from: Vec3 = [0, 0, 1]): Float64Array {
  checkPulse(pulse);
  checkSystem(system);
  const norm = Math.hypot(from[0], from[1], from[2]);
  if (!(norm > 0) || !Number.isFinite(norm)) throw new ArgumentError(`from: ${describeValue(from)} is not allowed; give a non-zero Bloch vector`);
  const enc = encodeLadderMembers([{ ...member, weight: 1 }], system);
  const core = getCore();
  const ex = ladderCore(core);
  const n = pulse.i.length, d = system.levels;
  return core.job(() => {
    const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
    // H rotates |0> onto `from`; G is unused.
    const tPtr = core.put(encodeTarget({ kind: 'state', from, to: from }));
    const outPtr = core.alloc((n + 1) * d);
    const workPtr = core.alloc(ex.ladderWorkspaceSize(1, d));
    ex.ladderPopulations(iPtr, qPtr, n, pulse.dt, d, enc.scale[0], enc.detuning[0], enc.alpha[0], tPtr, outPtr, workPtr);
    return core.read(outPtr, (n + 1) * d);
  });
}
