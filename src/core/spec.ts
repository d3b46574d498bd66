// The design spec: JSON as users write it (camelCase, Hz and seconds) validated into a
// Problem. Every error is a SpecError naming the dotted field, the value and what is allowed;
// unknown keys are rejected so that a typo cannot silently fall back to a default.
// The format is described for users in docs/spec.md.
import { SpecError } from './errors.ts';
import { parseLadderSpec } from './spec-system.ts';
import { parseJsonText } from './json-text.ts';
import { parseEnsemble } from './spec-ensemble.ts';
import { parseLine } from './line-spec.ts';
import { childPath, readBoolean, readChoice, readNumber, readObject, readText, readUnitVector } from './spec-fields.ts';
import type { NumberRule } from './spec-fields.ts';
import type { Constraints, OptimizerSettings, Problem, Target } from './types.ts';

/** Most segments a pulse may have. */
export const MAX_SEGMENTS = 100000;

/** Defaults of the optional `constraints` fields. */
export const DEFAULT_CONSTRAINTS: Readonly<Constraints> = { zeroEdges: false, smoothness: 0, bound: 'disc' };

/** Defaults of the optional `optimizer` fields. */
export const DEFAULT_OPTIMIZER: Readonly<OptimizerSettings> = {
  starts: 4,
  seed: 1,
  maxIterations: 500,
  // Well below what a robust pulse reaches over a real ensemble: runs normally end on the
  // gradient tolerance or the iteration budget, and stop early only when effectively exact.
  targetInfidelity: 1e-10,
  gradientTolerance: 1e-12,
  timeLimit: Infinity,
  memory: 12,
  // Measured (npm run bench:evals, 10 seeds of each demo and of two fast transmon gates):
  // with the outpacing rule below, 200 iterations under 0.01 % cost the best start at most
  // 0.06 % of its figure; 100 iterations cost 1.6 % on one seed of the transmon demo.
  stallIterations: 200,
  stallTolerance: 1e-4,
  // Off by default: on the ion demo the order of the starts after 400 of 1000 iterations
  // was not their final order (the best figure up to 2.5 times higher when pruned). The
  // outpacing rule does the same work without that risk.
  pruneAfter: 0,
  keepStarts: 2,
  // Measured as above: 0.45 of the evaluations (median) on the transmon demo, 0.83 on the
  // ion demo, with the best figure unchanged on every seed (docs/spec.md, optimizer).
  outpaceEvery: 100,
  outpaceFactor: 2,
};

const TOP_KEYS = ['name', 'description', 'target', 'duration', 'segments', 'rabiMax', 'ensemble', 'constraints', 'optimizer', 'line', 'system'];

/**
 * Validates a design spec (parsed JSON) and returns the normalised problem: the qubit,
 * or with a `system` section of more than two levels a ladder (spec-system.ts).
 */
export function parseSpec(json: unknown): Problem {
  const { problem, system, members, freePhaseAfter } = parseLadderSpec(json);
  const errors = members.some((m) => m.anharmonicityError !== 0);
  if (system.levels === 2 && !freePhaseAfter && !errors) return problem;
  const out: Problem = { ...problem, members };
  if (system.levels > 2) out.system = system;
  if (freePhaseAfter && problem.target.kind === 'gate') out.target = { ...problem.target, freePhaseAfter: true };
  return out;
}

/** Validates a spec without its system keys (spec-system.ts strips them first). */
export function parseQubitSpec(json: unknown): Problem {
  const spec = readObject(json, '', TOP_KEYS, 'a design spec');
  readText(spec, 'name', '');
  readText(spec, 'description', '');
  const target = parseTarget(spec.target);
  const duration = readNumber(spec, 'duration', '', { min: 0, minExclusive: true, unit: 's' });
  const segments = readNumber(spec, 'segments', '', { integer: true, min: 1, max: MAX_SEGMENTS });
  const rabiMax = readNumber(spec, 'rabiMax', '', { min: 0, minExclusive: true, unit: 'Hz' });
  const dt = duration / segments;
  if (!(dt > 0)) throw new SpecError('duration', duration, `long enough that duration / segments (${segments}) is > 0 s`);
  const members = parseEnsemble(spec.ensemble);
  const constraints = parseConstraints(spec.constraints, segments);
  const optimizer = parseOptimizer(spec.optimizer);
  const line = parseLine(spec.line, dt, segments);
  return { target, duration, segments, dt, rabiMax, members, constraints, optimizer, ...(line ? { line } : {}) };
}

/** Parses spec text (a file's contents) as JSON, turning a syntax error into a SpecError. */
export function specJsonFromText(text: string): unknown {
  try {
    return parseJsonText(text);
  } catch (error) {
    // The syntax error says where; the text itself is not echoed (it may not be text at all).
    const e = new SpecError('spec', undefined, '');
    e.message = (error as Error).message;
    throw e;
  }
}

function parseTarget(value: unknown): Target {
  const path = 'target';
  const obj = readObject(value, path, ['gate', 'state'], 'the target');
  if ((obj.gate === undefined) === (obj.state === undefined)) {
    throw new SpecError(path, value, 'exactly one of {"gate": {"axis", "angleDeg"}} or {"state": {"from", "to"}}');
  }
  if (obj.gate !== undefined) {
    const gatePath = childPath(path, 'gate');
    const gate = readObject(obj.gate, gatePath, ['axis', 'angleDeg'], 'a gate target');
    const axis = readUnitVector(gate, 'axis', gatePath);
    const angleDeg = readNumber(gate, 'angleDeg', gatePath, { unit: 'degrees' });
    return { kind: 'gate', axis, angleRad: (angleDeg * Math.PI) / 180 };
  }
  const statePath = childPath(path, 'state');
  const state = readObject(obj.state, statePath, ['from', 'to'], 'a state target');
  return { kind: 'state', from: readUnitVector(state, 'from', statePath), to: readUnitVector(state, 'to', statePath) };
}

function parseConstraints(value: unknown, segments: number): Constraints {
  const path = 'constraints';
  if (value === undefined) return { ...DEFAULT_CONSTRAINTS };
  const obj = readObject(value, path, ['zeroEdges', 'smoothness', 'amplitudeBound'], 'the constraints');
  const zeroEdges = readBoolean(obj, 'zeroEdges', path, DEFAULT_CONSTRAINTS.zeroEdges);
  // With fewer than three samples, zero edges would leave no sample free to drive.
  if (zeroEdges && segments < 3) {
    throw new SpecError(childPath(path, 'zeroEdges'), zeroEdges, `false when segments (${segments}) < 3: zero edges need a free sample between them`);
  }
  return {
    zeroEdges,
    smoothness: readNumber(obj, 'smoothness', path, { min: 0 }, DEFAULT_CONSTRAINTS.smoothness),
    bound: readChoice(obj, 'amplitudeBound', path, ['disc', 'box'] as const, DEFAULT_CONSTRAINTS.bound),
  };
}

/** The rules of the `optimizer` fields, shared by parseSpec and checkProblem. */
export const OPTIMIZER_RULES: Readonly<Record<Exclude<keyof OptimizerSettings, 'arithmetic'>, NumberRule>> = {
  starts: { integer: true, min: 1, max: 64 },
  // A 32-bit unsigned seed fits every generator the core may use.
  seed: { integer: true, min: 0, max: 4294967295 },
  maxIterations: { integer: true, min: 1, max: 100000 },
  targetInfidelity: { min: 0, max: 1 },
  gradientTolerance: { min: 0 },
  timeLimit: { min: 0, minExclusive: true, unit: 's' },
  memory: { integer: true, min: 1, max: 100 },
  stallIterations: { integer: true, min: 0, max: 100000 },
  stallTolerance: { min: 0, max: 1 },
  pruneAfter: { integer: true, min: 0, max: 100000 },
  keepStarts: { integer: true, min: 1, max: 64 },
  outpaceEvery: { integer: true, min: 0, max: 100000 },
  outpaceFactor: { min: 0, minExclusive: true, max: 1000 },
};

/** The core builds a design may ask for (`optimizer.arithmetic`). */
export const ARITHMETIC = ['portable', 'fused'] as const;

function parseOptimizer(value: unknown): OptimizerSettings {
  const path = 'optimizer';
  if (value === undefined) return { ...DEFAULT_OPTIMIZER };
  const keys = [...Object.keys(OPTIMIZER_RULES), 'arithmetic'];
  const obj = readObject(value, path, keys, 'the optimizer settings');
  // Present only when given, so that a spec without it reads as before.
  const arithmetic = obj.arithmetic === undefined ? {} : { arithmetic: readChoice(obj, 'arithmetic', path, ARITHMETIC, 'portable') };
  const d = DEFAULT_OPTIMIZER;
  const r = OPTIMIZER_RULES;
  return {
    starts: readNumber(obj, 'starts', path, r.starts, d.starts),
    seed: readNumber(obj, 'seed', path, r.seed, d.seed),
    maxIterations: readNumber(obj, 'maxIterations', path, r.maxIterations, d.maxIterations),
    targetInfidelity: readNumber(obj, 'targetInfidelity', path, r.targetInfidelity, d.targetInfidelity),
    gradientTolerance: readNumber(obj, 'gradientTolerance', path, r.gradientTolerance, d.gradientTolerance),
    // null is accepted as "no limit" because JSON cannot spell Infinity.
    timeLimit: obj.timeLimit === null ? Infinity : readNumber(obj, 'timeLimit', path, r.timeLimit, d.timeLimit),
    memory: readNumber(obj, 'memory', path, r.memory, d.memory),
    stallIterations: readNumber(obj, 'stallIterations', path, r.stallIterations, d.stallIterations),
    stallTolerance: readNumber(obj, 'stallTolerance', path, r.stallTolerance, d.stallTolerance),
    pruneAfter: readNumber(obj, 'pruneAfter', path, r.pruneAfter, d.pruneAfter),
    keepStarts: readNumber(obj, 'keepStarts', path, r.keepStarts, d.keepStarts),
    outpaceEvery: readNumber(obj, 'outpaceEvery', path, r.outpaceEvery, d.outpaceEvery),
    outpaceFactor: readNumber(obj, 'outpaceFactor', path, r.outpaceFactor, d.outpaceFactor),
    ...arithmetic,
  };
}
