// Which system of the core a problem drives, and its encodings for a problem block
// (assembly/system.ts): the two-level qubit unless the problem has a ladder of more than
// two levels or a gate target with a free phase after (which the ladder kernels compute,
// on two levels exactly the qubit). Validation of the ladder's values lives here.
import { ArgumentError, describeValue } from './errors.ts';
import { encodeMembers, encodeTarget, type EncodedMembers } from './encode.ts';
import type { LadderSystem, Member, Target } from './types.ts';

/** System kinds of the core (assembly/system.ts). */
export const SYSTEM_QUBIT = 0;
export const SYSTEM_LADDER = 1;
/** Most levels of a ladder in a spec; the truncation check goes two above. */
export const MAX_LEVELS = 8;
export const MAX_CHECK_LEVELS = MAX_LEVELS + 2;

/** A problem's system as the block takes it, with its members encoded. */
export interface SystemEncoding {
  /** True for the ladder kernels (per member: figure, leakage, phase after). */
  ladder: boolean;
  levels: number;
  system: number;
  dim: number;
  mode: number;
  members: EncodedMembers;
  memberParams?: Float64Array[];
  targetValues?: Float64Array;
}

/** Whether a target and system need the ladder kernels. */
export function needsLadder(target: Target, system?: LadderSystem): boolean {
  return (system !== undefined && system.levels > 2) || (target.kind === 'gate' && target.freePhaseAfter === true);
}

/** Encode target, members and system for createBlock (throws ArgumentError on bad values). */
export function encodeSystem(target: Target, members: readonly Member[], system?: LadderSystem, maxLevels = MAX_LEVELS): SystemEncoding {
  if (!needsLadder(target, system)) {
    return { ladder: false, levels: 2, system: SYSTEM_QUBIT, dim: 2, mode: target.kind === 'gate' ? 0 : 1, members: encodeMembers(members, 2, true) };
  }
  return encodeLadder(target, members, system, maxLevels);
}

/** The ladder kernels' encoding, also on two levels (where they compute the qubit exactly). */
export function encodeLadder(target: Target, members: readonly Member[], system?: LadderSystem, maxLevels = MAX_LEVELS): SystemEncoding {
  const levels = system?.levels ?? 2;
  const anharmonicity = system?.anharmonicity ?? 0;
  if (!Number.isInteger(levels) || levels < 2 || levels > maxLevels) {
    throw new ArgumentError(`system.levels: ${describeValue(levels)} is not allowed; an integer from 2 to ${maxLevels}`);
  }
  if (!Number.isFinite(anharmonicity)) throw new ArgumentError(`system.anharmonicity: ${describeValue(anharmonicity)} is not a finite number of Hz`);
  const enc = encodeMembers(members, 1, true);
  const alpha = new Float64Array(enc.padded);
  members.forEach((m, j) => {
    const error = m.anharmonicityError ?? 0;
    if (!Number.isFinite(error)) throw new ArgumentError(`members[${j}].anharmonicityError: ${describeValue(error)} is not a finite number of Hz`);
    alpha[j] = anharmonicity + error;
  });
  const mode = target.kind === 'state' ? 1 : target.freePhaseAfter ? 2 : 0;
  return {
    ladder: true, levels, system: SYSTEM_LADDER, dim: levels, mode, members: enc,
    memberParams: [enc.scale, enc.detuning, alpha], targetValues: encodeTarget(target),
  };
}

/** The block fields of an encoding (createBlock's system, dim, mode, members and encodings). */
export function blockSystem(enc: SystemEncoding): Pick<SystemEncoding, 'system' | 'dim' | 'mode' | 'members' | 'memberParams' | 'targetValues'> {
  const { system, dim, mode, members, memberParams, targetValues } = enc;
  return { system, dim, mode, members, memberParams, targetValues };
}
