// A Problem built by hand (not through parseSpec) checked with the spec's rules, so the
// library refuses from every entry point what a spec would refuse: every error is a
// SpecError naming the field as a spec would spell it.
import { SpecError } from './errors.ts';
import { checkLine } from './line-spec.ts';
import { MAX_MEMBERS } from './spec-ensemble.ts';
import { checkNumber, describeRule } from './spec-fields.ts';
import { ARITHMETIC, MAX_SEGMENTS, OPTIMIZER_RULES } from './spec.ts';
import type { Problem, Target, Vec3 } from './types.ts';

function checkVector(value: unknown, field: string): void {
  const v = value as Vec3;
  const ok = Array.isArray(v) && v.length === 3 && v.every((c) => typeof c === 'number' && Number.isFinite(c)) && Math.hypot(v[0], v[1], v[2]) > 0;
  if (!ok) throw new SpecError(field, value, 'a non-zero vector [x, y, z] of three finite numbers');
}

/** Check a target as the core reads it (a gate's axis and angle, or a transfer's two states). */
export function checkTarget(target: Target, field = 'target'): void {
  if (typeof target !== 'object' || target === null) throw new SpecError(field, target, 'a target {kind: "gate", axis, angleRad} or {kind: "state", from, to}');
  if (target.kind === 'gate') {
    checkVector(target.axis, `${field}.axis`);
    checkNumber(target.angleRad, `${field}.angleRad`, { unit: 'rad' });
  } else if (target.kind === 'state') {
    checkVector(target.from, `${field}.from`);
    checkVector(target.to, `${field}.to`);
  } else {
    throw new SpecError(`${field}.kind`, (target as { kind: unknown }).kind, '"gate" or "state"');
  }
}

/** Check every field of a Problem against the rules parseSpec applies; returns it. */
export function checkProblem(problem: Problem): Problem {
  checkTarget(problem.target);
  checkNumber(problem.duration, 'duration', { min: 0, minExclusive: true, unit: 's' });
  checkNumber(problem.segments, 'segments', { integer: true, min: 1, max: MAX_SEGMENTS });
  checkNumber(problem.dt, 'dt', { min: 0, minExclusive: true, unit: 's' });
  const expected = problem.duration / problem.segments;
  if (Math.abs(problem.dt - expected) > 1e-9 * expected) {
    throw new SpecError('dt', problem.dt, `duration / segments = ${expected} s`);
  }
  checkNumber(problem.rabiMax, 'rabiMax', { min: 0, minExclusive: true, unit: 'Hz' });
  const members = problem.members;
  if (!Array.isArray(members) || members.length < 1 || members.length > MAX_MEMBERS) {
    throw new SpecError('members', Array.isArray(members) ? `${members.length} members` : members, `an array of 1 to ${MAX_MEMBERS} members`);
  }
  let total = 0;
  members.forEach((m, j) => {
    checkNumber(m.detuning, `members[${j}].detuning`, { unit: 'Hz' });
    checkNumber(m.amplitudeError, `members[${j}].amplitudeError`, { min: -1, minExclusive: true, unit: 'relative' });
    total += checkNumber(m.weight, `members[${j}].weight`, { min: 0 });
  });
  if (!(total > 0)) throw new SpecError('members', members.map((m) => m.weight), 'member weights >= 0 with at least one > 0');
  if (problem.system !== undefined) {
    const sys = problem.system;
    if (typeof sys !== 'object' || sys === null) throw new SpecError('system', sys, 'an object {levels, anharmonicity}');
    checkNumber(sys.levels, 'system.levels', { integer: true, min: 2, max: 8 });
    checkNumber(sys.anharmonicity, 'system.anharmonicity', { unit: 'Hz' });
    members.forEach((m, j) => {
      if (m.anharmonicityError !== undefined) checkNumber(m.anharmonicityError, `members[${j}].anharmonicityError`, { unit: 'Hz' });
    });
  }
  const c = problem.constraints;
  if (typeof c !== 'object' || c === null) throw new SpecError('constraints', c, 'an object {zeroEdges, smoothness, bound}');
  if (typeof c.zeroEdges !== 'boolean') throw new SpecError('constraints.zeroEdges', c.zeroEdges, 'true or false');
  if (c.zeroEdges && problem.segments < 3) {
    throw new SpecError('constraints.zeroEdges', c.zeroEdges, `false when segments (${problem.segments}) < 3: zero edges need a free sample between them`);
  }
  checkNumber(c.smoothness, 'constraints.smoothness', { min: 0 });
  if (c.bound !== 'disc' && c.bound !== 'box') throw new SpecError('constraints.bound', c.bound, 'one of "disc", "box"');
  const o = problem.optimizer;
  if (typeof o !== 'object' || o === null) throw new SpecError('optimizer', o, 'the optimizer settings');
  if (o.arithmetic !== undefined && !(ARITHMETIC as readonly string[]).includes(o.arithmetic)) {
    throw new SpecError('optimizer.arithmetic', o.arithmetic, 'one of "portable", "fused" (or leave it out: portable)');
  }
  for (const key of Object.keys(OPTIMIZER_RULES) as (keyof typeof OPTIMIZER_RULES)[]) {
    if (key === 'timeLimit' && o.timeLimit === Infinity) continue;
    const rule = OPTIMIZER_RULES[key];
    if (o[key] === undefined) throw new SpecError(`optimizer.${key}`, undefined, `required: ${describeRule(rule)}`);
    checkNumber(o[key], `optimizer.${key}`, rule);
  }
  if (problem.line !== undefined) checkLine(problem.line, problem.dt, problem.segments);
  return problem;
}
