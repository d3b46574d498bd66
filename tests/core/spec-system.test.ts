// The spec's system section (docs/spec.md, docs/transmon.md): the example parses;
// the anharmonicity-error axis multiplies the ensemble with product weights; every bad
// value gives a SpecError naming its field, the value and what is allowed.
import { describe, expect, it } from 'vitest';
import { SpecError } from '../../src/core/errors.ts';
import { parseLadderSpec, parseSystem } from '../../src/core/spec-system.ts';
import { expectClose } from '../reference/tolerance.ts';

const BASE = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } },
  duration: 6.25e-9, segments: 15, rabiMax: 2.5e8,
  ensemble: { amplitudeError: { min: -0.02, max: 0.02, points: 3 } },
};

function specError(fn: () => unknown): SpecError {
  try {
    fn();
  } catch (error) {
    if (error instanceof SpecError) return error;
    throw error;
  }
  throw new Error('expected a SpecError');
}

describe('system section', () => {
  // The example of the system section as the format describes it.
  it('parses levels and anharmonicity', () => {
    expect(parseSystem({ levels: 5, anharmonicity: -2.12e8 })).toEqual({ levels: 5, anharmonicity: -2.12e8 });
    const spec = parseLadderSpec({ ...BASE, system: { levels: 5, anharmonicity: -2.12e8 } });
    expect(spec.system).toEqual({ levels: 5, anharmonicity: -2.12e8 });
    expect(spec.members.map((m) => m.amplitudeError)).toEqual([-0.02, 0, 0.02]);
    expect(spec.members.every((m) => m.anharmonicityError === 0)).toBe(true);
    expect(spec.freePhaseAfter).toBe(false);
  });

  // Without a system section everything stays the qubit (levels 2).
  it('is the qubit when absent', () => {
    const spec = parseLadderSpec(BASE);
    expect(spec.system.levels).toBe(2);
    expect(spec.members).toHaveLength(3);
  });

  it('names the field, the value and what is allowed', () => {
    const cases: [unknown, string, RegExp][] = [
      [{ levels: 9, anharmonicity: -2e8 }, 'system.levels', /9 is not allowed; an integer from 2 to 8/],
      [{ levels: 2.5 }, 'system.levels', /an integer from 2 to 8/],
      [{ anharmonicity: -2e8 }, 'system.levels', /required/],
      [{ levels: 3 }, 'system.anharmonicity', /required: a finite number \(Hz\)/],
      [{ levels: 3, anharmonicity: 0 }, 'system.anharmonicity', /non-zero/],
      [{ levels: 3, anharmonicity: '-200 MHz' }, 'system.anharmonicity', /a finite number \(Hz\)/],
      [{ levels: 3, anharmonicty: -2e8 }, 'system.anharmonicty', /did you mean "anharmonicity"/],
      [[3], 'system', /a JSON object with keys levels, anharmonicity/],
    ];
    for (const [system, field, message] of cases) {
      const error = specError(() => parseLadderSpec({ ...BASE, system }));
      expect(error.field).toBe(field);
      expect(error.message).toMatch(message);
    }
  });
});

describe('anharmonicity error and free phase', () => {
  // Tensor product with weights multiplied (the same rule as the other axes, docs/spec.md).
  it('crosses the ensemble with the anharmonicity-error axis, weights multiplied', () => {
    const spec = parseLadderSpec({
      ...BASE, system: { levels: 3, anharmonicity: -2e8 },
      ensemble: { ...BASE.ensemble, anharmonicityError: { values: [-1e6, 1e6], weights: [1, 3] } },
    });
    expect(spec.members).toHaveLength(6);
    expect(spec.members.map((m) => m.anharmonicityError)).toEqual([-1e6, -1e6, -1e6, 1e6, 1e6, 1e6]);
    expectClose(spec.members[0].weight, 1 / 12, { rel: 1e-15 }, 'weight');
    expectClose(spec.members[5].weight, 3 / 12, { rel: 1e-15 }, 'weight');
    expect(spec.problem.members).toHaveLength(3);
  });

  it('reads anharmonicityError of listed members and rejects a bad one by name', () => {
    const spec = parseLadderSpec({
      ...BASE, system: { levels: 3, anharmonicity: -2e8 },
      ensemble: { members: [{ amplitudeError: 0.01, anharmonicityError: 2e6 }, { detuning: 1e5 }] },
    });
    expect(spec.members.map((m) => m.anharmonicityError)).toEqual([2e6, 0]);
    const bad = specError(() => parseLadderSpec({ ...BASE, ensemble: { members: [{}, { anharmonicityError: 'x' }] } }));
    expect(bad.field).toBe('ensemble.members[1].anharmonicityError');
    const points = specError(() => parseLadderSpec({ ...BASE, ensemble: { anharmonicityError: { min: -1e6, max: 1e6, points: 0 } } }));
    expect(points.field).toBe('ensemble.anharmonicityError.points');
    const both = specError(() => parseLadderSpec({ ...BASE, ensemble: { members: [{}], anharmonicityError: { values: [0] } } }));
    expect(both.field).toBe('ensemble');
  });

  it('reads freePhaseAfter on a gate target only', () => {
    expect(parseLadderSpec({ ...BASE, target: { gate: { ...BASE.target.gate, freePhaseAfter: true } } }).freePhaseAfter).toBe(true);
    const notBoolean = specError(() => parseLadderSpec({ ...BASE, target: { gate: { ...BASE.target.gate, freePhaseAfter: 'yes' } } }));
    expect(notBoolean.field).toBe('target.gate.freePhaseAfter');
    const onState = specError(() => parseLadderSpec({ ...BASE, target: { state: { from: [0, 0, 1], to: [1, 0, 0], freePhaseAfter: true } } }));
    expect(onState.field).toBe('target.state.freePhaseAfter');
  });
});
