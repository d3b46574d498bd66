// The `system` section of a design spec and what comes with it: the anharmonicity-error
// axis of the ensemble (or a member's `anharmonicityError`) and the gate target's
// `freePhaseAfter`. Without a system section everything stays the two-level qubit.
// parseLadderSpec reads those keys, hands the rest to parseSpec, and combines the two;
// errors are SpecErrors naming the dotted field, the value and what is allowed.
import { SpecError } from './errors.ts';
import { MAX_LEVELS, MIN_LEVELS, type LadderMember, type LadderSystem } from './ladder.ts';
import { MAX_MEMBERS, normaliseWeights, parseAxis } from './spec-ensemble.ts';
import { childPath, isObject, readBoolean, readNumber, readObject, type JsonObject } from './spec-fields.ts';
import { parseQubitSpec } from './spec.ts';
import type { Problem } from './types.ts';

/** The qubit: what a spec without a system section describes. */
export const QUBIT_SYSTEM: Readonly<LadderSystem> = { levels: 2, anharmonicity: 0 };

/** A design spec with its system: the problem, the ladder, members with their anharmonicity errors. */
export interface LadderSpec {
  problem: Problem;
  system: LadderSystem;
  /** The problem's members crossed with the anharmonicity-error samples; weights sum to 1. */
  members: LadderMember[];
  /** Gate targets: the figure up to a z rotation after the gate (a virtual Z). */
  freePhaseAfter: boolean;
}

/** Validates a spec's `system` section: levels 2..8, anharmonicity in Hz (required above 2 levels). */
export function parseSystem(value: unknown, path = 'system'): LadderSystem {
  if (value === undefined) return { ...QUBIT_SYSTEM };
  const obj = readObject(value, path, ['levels', 'anharmonicity'], 'the system');
  const levels = readNumber(obj, 'levels', path, { integer: true, min: MIN_LEVELS, max: MAX_LEVELS });
  if (levels === 2 && obj.anharmonicity === undefined) return { levels, anharmonicity: 0 };
  const anharmonicity = readNumber(obj, 'anharmonicity', path, { unit: 'Hz' });
  if (anharmonicity === 0 && levels > 2) {
    throw new SpecError(childPath(path, 'anharmonicity'), anharmonicity,
      'a non-zero finite number (Hz; negative for a transmon): with none, levels 0 and 1 are no qubit');
  }
  return { levels, anharmonicity };
}

/** Validates a whole spec that may carry a system section (see the file comment). */
export function parseLadderSpec(json: unknown): LadderSpec {
  if (!isObject(json)) return fromProblem(parseQubitSpec(json));
  const { system: systemJson, ...rest } = json;
  const stripped: JsonObject = { ...rest };
  let freePhaseAfter = false;
  if (isObject(rest.target) && isObject(rest.target.gate)) {
    const { freePhaseAfter: free, ...gate } = rest.target.gate;
    freePhaseAfter = readBoolean({ freePhaseAfter: free }, 'freePhaseAfter', 'target.gate', false);
    stripped.target = { ...rest.target, gate };
  }
  let anharmonicityErrors: { values: number[]; weights: number[] } | null = null;
  let memberErrors: number[] | null = null;
  if (isObject(rest.ensemble)) {
    const { anharmonicityError: axis, ...ensemble } = rest.ensemble;
    if (axis !== undefined && ensemble.members !== undefined) {
      throw new SpecError('ensemble', Object.keys(rest.ensemble), 'either "members" or the axes "detuning", "amplitudeError" and "anharmonicityError", not both');
    }
    if (Array.isArray(ensemble.members)) {
      memberErrors = [];
      ensemble.members = ensemble.members.map((entry: unknown, k: number) => {
        if (!isObject(entry)) return entry;
        const { anharmonicityError, ...member } = entry;
        memberErrors!.push(readNumber({ anharmonicityError }, 'anharmonicityError', childPath('ensemble.members', k), { unit: 'Hz' }, 0));
        return member;
      });
    } else {
      anharmonicityErrors = parseAxis(axis, 'ensemble.anharmonicityError', 'anharmonicityError');
    }
    stripped.ensemble = ensemble;
  }
  const problem = parseQubitSpec(stripped);
  const system = parseSystem(systemJson);
  if (memberErrors) {
    const members = problem.members.map((m, k) => ({ ...m, anharmonicityError: memberErrors![k] }));
    return { problem, system, members, freePhaseAfter };
  }
  const axis = anharmonicityErrors ?? { values: [0], weights: [1] };
  const count = problem.members.length * axis.values.length;
  if (count > MAX_MEMBERS) {
    throw new SpecError('ensemble', `${problem.members.length} x ${axis.values.length} = ${count} members`,
      `at most ${MAX_MEMBERS} members in all (detuning x amplitudeError x anharmonicityError samples)`);
  }
  // The anharmonicity error varies slowest; weights multiply and are renormalised.
  const members: LadderMember[] = [];
  axis.values.forEach((value, a) => {
    for (const m of problem.members) members.push({ ...m, anharmonicityError: value, weight: m.weight * axis.weights[a] });
  });
  const weights = normaliseWeights(members.map((m) => m.weight)) as number[];
  members.forEach((m, k) => (m.weight = weights[k]));
  return { problem, system, members, freePhaseAfter };
}

function fromProblem(problem: Problem): LadderSpec {
  return { problem, system: { ...QUBIT_SYSTEM }, members: problem.members.map((m) => ({ ...m, anharmonicityError: 0 })), freePhaseAfter: false };
}
