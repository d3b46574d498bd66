// Design-spec validation: the issue's example parses to the expected problem; every field's
// bad values give a SpecError naming that field; random malformed specs (fast-check) give
// a valid Problem or a SpecError, never another error.
import { describe, expect, it } from 'vitest';
import * as fc from 'fast-check';
import { SpecError } from '../../src/core/errors.ts';
import { parseSpec, specJsonFromText } from '../../src/core/spec.ts';
import type { Problem } from '../../src/core/types.ts';
import { expectClose, ulps } from '../reference/tolerance.ts';

const FC = { seed: 20240611, numRuns: 300 };

// The design spec exactly as issue 2 shows it.
const ISSUE_SPEC = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7,
  segments: 100,
  rabiMax: 1e7,
  ensemble: {
    detuning: { min: -1e6, max: 1e6, points: 5 },
    amplitudeError: { min: -0.1, max: 0.1, points: 5 },
  },
  constraints: { zeroEdges: false, smoothness: 0 },
  optimizer: { starts: 5, seed: 1, maxIterations: 2000 },
};

// Further valid specs that reach the other forms (state target, members, Gauss rules, lists).
const STATE_SPEC = {
  name: 'inversion',
  target: { state: { from: [0, 0, 1], to: [0, 0, -1] } },
  duration: 4e-5,
  segments: 80,
  rabiMax: 1e5,
  ensemble: { members: [{ detuning: 0, amplitudeError: 0.02, weight: 1 }, { detuning: 1000 }] },
  constraints: { zeroEdges: true, smoothness: 0.1, amplitudeBound: 'box' },
  optimizer: { starts: 2, seed: 9, maxIterations: 10, targetInfidelity: 1e-6, gradientTolerance: 1e-9, timeLimit: 5, memory: 7, stallIterations: 30, stallTolerance: 1e-3, pruneAfter: 5, keepStarts: 1, outpaceEvery: 50, outpaceFactor: 3 },
};
const QUADRATURE_SPEC = {
  target: { gate: { axis: [0, 1, 0], angleDeg: 180 } },
  duration: 1e-6,
  segments: 20,
  rabiMax: 2e6,
  ensemble: {
    detuning: { sigma: 1e5, points: 3, mean: 1e4 },
    amplitudeError: { min: -0.05, max: 0.05, points: 3, nodes: 'legendre' },
  },
};
const LIST_SPEC = {
  target: { gate: { axis: [1, 1, 0], angleDeg: 45 } },
  duration: 1e-7,
  segments: 10,
  rabiMax: 5e6,
  ensemble: { amplitudeError: { values: [-0.1, 0, 0.1], weights: [1, 2, 1] } },
  optimizer: { timeLimit: null },
};
const VALID_SPECS = [ISSUE_SPEC, STATE_SPEC, QUADRATURE_SPEC, LIST_SPEC];

const clone = <T>(value: T): T => structuredClone(value);

/** What every parsed problem must satisfy (the contract of src/core/types.ts). */
function expectValidProblem(p: Problem): void {
  expect(p.duration > 0 && Number.isFinite(p.duration)).toBe(true);
  expect(Number.isInteger(p.segments) && p.segments >= 1 && p.segments <= 100000).toBe(true);
  expect(p.dt).toBe(p.duration / p.segments);
  expect(p.rabiMax > 0 && Number.isFinite(p.rabiMax)).toBe(true);
  expect(p.members.length >= 1 && p.members.length <= 10000).toBe(true);
  let sum = 0;
  for (const m of p.members) {
    expect(Number.isFinite(m.detuning) && m.amplitudeError > -1 && Number.isFinite(m.amplitudeError)).toBe(true);
    expect(m.weight >= 0 && m.weight <= 1).toBe(true);
    sum += m.weight;
  }
  expectClose(sum, 1, { abs: 1e-12 }, 'sum of weights');
  const vectors = p.target.kind === 'gate' ? [p.target.axis] : [p.target.from, p.target.to];
  for (const v of vectors) expectClose(Math.hypot(...v), 1, { abs: ulps(4) }, 'unit vector norm');
  if (p.target.kind === 'gate') expect(Number.isFinite(p.target.angleRad)).toBe(true);
  expect(['disc', 'box']).toContain(p.constraints.bound);
  expect(p.constraints.smoothness >= 0).toBe(true);
  const o = p.optimizer;
  expect(o.starts >= 1 && o.starts <= 64 && o.memory >= 1 && o.memory <= 100 && o.maxIterations >= 1).toBe(true);
  expect(o.timeLimit > 0).toBe(true);
}

/** Runs parseSpec and returns the SpecError it must throw. */
function specError(spec: unknown): SpecError {
  try {
    parseSpec(spec);
  } catch (error) {
    expect(error).toBeInstanceOf(SpecError);
    return error as SpecError;
  }
  throw new Error(`parseSpec accepted ${JSON.stringify(spec)}`);
}

/** A copy of a spec with the value at a dotted path replaced (undefined deletes it). */
function withField(base: unknown, path: string, value: unknown): unknown {
  const spec = clone(base) as Record<string, unknown>;
  const keys = path.split('.');
  let obj = spec;
  for (const key of keys.slice(0, -1)) {
    if (typeof obj[key] !== 'object' || obj[key] === null) obj[key] = {};
    obj = obj[key] as Record<string, unknown>;
  }
  const last = keys[keys.length - 1];
  if (value === undefined) delete obj[last];
  else obj[last] = value;
  return spec;
}

describe('valid specs', () => {
  it('parses the issue example into the expected problem', () => {
    const p = parseSpec(ISSUE_SPEC);
    expectValidProblem(p);
    expect(p.target).toEqual({ kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 });
    expect(p.dt).toBe(2e-7 / 100);
    expect(p.members).toHaveLength(25);
    // Detuning varies fastest (the row-major order of a robustness map).
    expect(p.members.slice(0, 5).map((m) => m.detuning)).toEqual([-1e6, -5e5, 0, 5e5, 1e6]);
    expect(p.members.filter((_, k) => k % 5 === 0).map((m) => m.amplitudeError)).toEqual([-0.1, -0.05, 0, 0.05, 0.1]);
    for (const m of p.members) expectClose(m.weight, 1 / 25, { rel: ulps(4) }, 'grid weight');
    expect(p.constraints).toEqual({ zeroEdges: false, smoothness: 0, bound: 'disc' });
    expect(p.optimizer).toEqual({
      starts: 5, seed: 1, maxIterations: 2000, targetInfidelity: 1e-10, gradientTolerance: 1e-12, timeLimit: Infinity, memory: 12,
      stallIterations: 200, stallTolerance: 1e-4, pruneAfter: 0, keepStarts: 2, outpaceEvery: 100, outpaceFactor: 2,
    });
  });

  it('normalises axes and Bloch vectors and converts degrees to radians', () => {
    const gate = parseSpec(withField(ISSUE_SPEC, 'target', { gate: { axis: [0, 3, 4], angleDeg: -270 } }));
    expect(gate.target).toEqual({ kind: 'gate', axis: [0, 0.6, 0.8], angleRad: (-3 * Math.PI) / 2 });
    const state = parseSpec(withField(ISSUE_SPEC, 'target', { state: { from: [0, 0, 2], to: [1e-300, 1e-300, 0] } }));
    expect(state.target.kind).toBe('state');
    if (state.target.kind === 'state') {
      expect(state.target.from).toEqual([0, 0, 1]);
      expectClose(state.target.to[0], Math.SQRT1_2, { rel: ulps(2) }, 'tiny vector normalised');
    }
  });

  it('reads explicit members, defaults and all optional settings', () => {
    const p = parseSpec(STATE_SPEC);
    expectValidProblem(p);
    expect(p.members).toEqual([
      { detuning: 0, amplitudeError: 0.02, weight: 0.5 },
      { detuning: 1000, amplitudeError: 0, weight: 0.5 },
    ]);
    expect(p.constraints).toEqual({ zeroEdges: true, smoothness: 0.1, bound: 'box' });
    expect(p.optimizer).toEqual({ starts: 2, seed: 9, maxIterations: 10, targetInfidelity: 1e-6, gradientTolerance: 1e-9, timeLimit: 5, memory: 7, stallIterations: 30, stallTolerance: 1e-3, pruneAfter: 5, keepStarts: 1, outpaceEvery: 50, outpaceFactor: 3 });
  });

  it('samples a Gaussian at Gauss-Hermite nodes and a range at Gauss-Legendre nodes, weights multiplied', () => {
    const p = parseSpec(QUADRATURE_SPEC);
    expectValidProblem(p);
    expect(p.members).toHaveLength(9);
    // 3-point rules in closed form: He_3 nodes 0, +-sqrt(3), probabilities 2/3, 1/6;
    // Legendre nodes 0, +-sqrt(3/5), weights 8/9, 5/9 of 2 (A&S 25.4 and 25.10).
    const detunings = p.members.slice(0, 3).map((m) => m.detuning);
    const expectedDetunings = [1e4 - Math.sqrt(3) * 1e5, 1e4, 1e4 + Math.sqrt(3) * 1e5];
    detunings.forEach((d, k) => expectClose(d, expectedDetunings[k], { rel: 1e-15, abs: 1e-9 }, `detuning ${k}`));
    const errors = [0, 3, 6].map((k) => p.members[k].amplitudeError);
    const expectedErrors = [-0.05 * Math.sqrt(3 / 5), 0, 0.05 * Math.sqrt(3 / 5)];
    errors.forEach((e, k) => expectClose(e, expectedErrors[k], { abs: 1e-17 }, `amplitude error ${k}`));
    const dw = [1 / 6, 2 / 3, 1 / 6];
    const aw = [5 / 18, 4 / 9, 5 / 18];
    p.members.forEach((m, k) => expectClose(m.weight, dw[k % 3] * aw[Math.floor(k / 3)], { rel: 1e-14 }, `weight ${k}`));
  });

  it('reads a list axis with weights; a missing axis is the single value 0; a 1-point range is its midpoint', () => {
    const p = parseSpec(LIST_SPEC);
    expect(p.members).toEqual([
      { detuning: 0, amplitudeError: -0.1, weight: 0.25 },
      { detuning: 0, amplitudeError: 0, weight: 0.5 },
      { detuning: 0, amplitudeError: 0.1, weight: 0.25 },
    ]);
    expect(p.optimizer.timeLimit).toBe(Infinity);
    const mid = parseSpec(withField(ISSUE_SPEC, 'ensemble.detuning', { min: -3, max: 5, points: 1 }));
    expect(new Set(mid.members.map((m) => m.detuning))).toEqual(new Set([1]));
    const nominal = parseSpec(withField(ISSUE_SPEC, 'ensemble', undefined));
    expect(nominal.members).toEqual([{ detuning: 0, amplitudeError: 0, weight: 1 }]);
  });

  it('spaces a range symmetric about 0 exactly symmetrically, ends exact (random ranges and sizes)', () => {
    // An invariant of the grid: member k mirrors member n-1-k to the last bit.
    const grid = fc.record({ half: fc.double({ min: 1e-300, max: 1e300, noNaN: true }), points: fc.integer({ min: 2, max: 401 }) });
    fc.assert(
      fc.property(grid, ({ half, points }) => {
        const p = parseSpec(withField(ISSUE_SPEC, 'ensemble', { detuning: { min: -half, max: half, points } }));
        const d = p.members.map((m) => m.detuning);
        expect(d[0]).toBe(-half);
        expect(d[points - 1]).toBe(half);
        for (let k = 0; k < points; k++) expect(d[k]).toBe(-d[points - 1 - k] || 0);
        for (let k = 1; k < points; k++) expect(d[k]).toBeGreaterThan(d[k - 1]);
      }),
      { ...FC, numRuns: 100 },
    );
  });

  it('accepts a range axis whose 1-point midpoint is above -1 even though min is not', () => {
    const p = parseSpec(withField(ISSUE_SPEC, 'ensemble.amplitudeError', { min: -1.5, max: 0.5, points: 1 }));
    expect(p.members[0].amplitudeError).toBe(-0.5);
  });
});

// [field path to change, bad value, the field the error must name]. `undefined` deletes.
const BAD_FIELDS: [string, unknown, string][] = [
  ['name', 5, 'name'],
  ['description', {}, 'description'],
  ['target', undefined, 'target'],
  ['target', 'X90', 'target'],
  ['target', {}, 'target'],
  ['target', { gate: { axis: [1, 0, 0], angleDeg: 90 }, state: { from: [0, 0, 1], to: [1, 0, 0] } }, 'target'],
  ['target.gate.axis', [0, 0, 0], 'target.gate.axis'],
  ['target.gate.axis', [1, 0], 'target.gate.axis'],
  ['target.gate.axis', ['1', 0, 0], 'target.gate.axis'],
  ['target.gate.axis', undefined, 'target.gate.axis'],
  ['target.gate.angleDeg', '90', 'target.gate.angleDeg'],
  ['target.gate.angleDeg', undefined, 'target.gate.angleDeg'],
  ['target.gate.angle', 90, 'target.gate.angle'],
  ['target.gate', [1, 0, 0], 'target.gate'],
  ['duration', 0, 'duration'],
  ['duration', -2e-7, 'duration'],
  ['duration', '2e-7', 'duration'],
  ['duration', undefined, 'duration'],
  ['duration', 5e-324, 'duration'],
  ['segments', 0, 'segments'],
  ['segments', 1.5, 'segments'],
  ['segments', 100001, 'segments'],
  ['segments', undefined, 'segments'],
  ['rabiMax', 0, 'rabiMax'],
  ['rabiMax', -1e7, 'rabiMax'],
  ['rabiMax', Infinity, 'rabiMax'],
  ['rabiMax', NaN, 'rabiMax'],
  ['rabiMax', null, 'rabiMax'],
  ['ensemble', 'grid', 'ensemble'],
  ['ensemble.spread', 1, 'ensemble.spread'],
  ['ensemble.members', [{ detuning: 0 }], 'ensemble'],
  ['ensemble.detuning', 5, 'ensemble.detuning'],
  ['ensemble.detuning', {}, 'ensemble.detuning'],
  ['ensemble.detuning.points', 0, 'ensemble.detuning.points'],
  ['ensemble.detuning.points', 402, 'ensemble.detuning.points'],
  ['ensemble.detuning.points', 2.5, 'ensemble.detuning.points'],
  ['ensemble.detuning.points', undefined, 'ensemble.detuning.points'],
  ['ensemble.detuning.max', -2e6, 'ensemble.detuning.max'],
  ['ensemble.detuning.min', undefined, 'ensemble.detuning.min'],
  ['ensemble.detuning.min', '-1e6', 'ensemble.detuning.min'],
  ['ensemble.detuning.nodes', 'chebyshev', 'ensemble.detuning.nodes'],
  ['ensemble.detuning.step', 1, 'ensemble.detuning.step'],
  ['ensemble.detuning', { values: [] }, 'ensemble.detuning.values'],
  ['ensemble.detuning', { values: 3 }, 'ensemble.detuning.values'],
  ['ensemble.detuning', { values: [1, 'a'] }, 'ensemble.detuning.values[1]'],
  ['ensemble.detuning', { values: [1, 2], weights: [1] }, 'ensemble.detuning.weights'],
  ['ensemble.detuning', { values: [1, 2], weights: [-1, 1] }, 'ensemble.detuning.weights[0]'],
  ['ensemble.detuning', { values: [1, 2], weights: [0, 0] }, 'ensemble.detuning.weights'],
  ['ensemble.detuning', { sigma: 0, points: 3 }, 'ensemble.detuning.sigma'],
  ['ensemble.detuning', { sigma: -1, points: 3 }, 'ensemble.detuning.sigma'],
  ['ensemble.detuning', { sigma: 1e5 }, 'ensemble.detuning.points'],
  ['ensemble.detuning', { sigma: 1e5, points: 3, min: 0 }, 'ensemble.detuning.min'],
  ['ensemble.detuning', { sigma: 1e5, points: 3, mean: 'zero' }, 'ensemble.detuning.mean'],
  ['ensemble.detuning', { sigma: 1.5e308, points: 3 }, 'ensemble.detuning.sigma'],
  ['ensemble.amplitudeError.min', -1, 'ensemble.amplitudeError.min'],
  ['ensemble.amplitudeError', { min: -3, max: -1, points: 4, nodes: 'legendre' }, 'ensemble.amplitudeError.min'],
  ['ensemble.amplitudeError', { values: [0, -1.5] }, 'ensemble.amplitudeError.values[1]'],
  ['ensemble.amplitudeError', { sigma: 0.5, points: 5 }, 'ensemble.amplitudeError.sigma'],
  ['ensemble.amplitudeError', { sigma: 0.01, points: 3, mean: -1 }, 'ensemble.amplitudeError.mean'],
  ['ensemble', { members: [] }, 'ensemble.members'],
  ['ensemble', { members: {} }, 'ensemble.members'],
  ['ensemble', { members: [5] }, 'ensemble.members[0]'],
  ['ensemble', { members: [{ amplitudeError: -1 }] }, 'ensemble.members[0].amplitudeError'],
  ['ensemble', { members: [{ detuning: '0' }] }, 'ensemble.members[0].detuning'],
  ['ensemble', { members: [{ weight: -1 }] }, 'ensemble.members[0].weight'],
  ['ensemble', { members: [{ weight: 0 }, { weight: 0 }] }, 'ensemble.members'],
  ['ensemble', { members: [{ detunning: 5 }] }, 'ensemble.members[0].detunning'],
  ['constraints', 'none', 'constraints'],
  ['constraints.zeroEdges', 'yes', 'constraints.zeroEdges'],
  ['constraints.zeroEdge', true, 'constraints.zeroEdge'],
  ['constraints.smoothness', -1, 'constraints.smoothness'],
  ['constraints.amplitudeBound', 'square', 'constraints.amplitudeBound'],
  ['optimizer', [], 'optimizer'],
  ['optimizer.starts', 0, 'optimizer.starts'],
  ['optimizer.starts', 65, 'optimizer.starts'],
  ['optimizer.starts', 1.5, 'optimizer.starts'],
  ['optimizer.seed', -1, 'optimizer.seed'],
  ['optimizer.seed', 0.5, 'optimizer.seed'],
  ['optimizer.seed', 2 ** 32, 'optimizer.seed'],
  ['optimizer.maxIterations', 0, 'optimizer.maxIterations'],
  ['optimizer.maxIterations', 100001, 'optimizer.maxIterations'],
  ['optimizer.targetInfidelity', -1e-3, 'optimizer.targetInfidelity'],
  ['optimizer.targetInfidelity', 2, 'optimizer.targetInfidelity'],
  ['optimizer.gradientTolerance', -1, 'optimizer.gradientTolerance'],
  ['optimizer.timeLimit', 0, 'optimizer.timeLimit'],
  ['optimizer.timeLimit', 'forever', 'optimizer.timeLimit'],
  ['optimizer.memory', 0, 'optimizer.memory'],
  ['optimizer.memory', 101, 'optimizer.memory'],
  ['optimizer.iterations', 100, 'optimizer.iterations'],
  ['duraton', 2e-7, 'duraton'],
];

describe('bad fields', () => {
  it.each(BAD_FIELDS)('%s = %j is a SpecError naming the field', (path, value, field) => {
    const error = specError(withField(ISSUE_SPEC, path, value));
    expect(error.field).toBe(field);
    expect(error.name).toBe('SpecError');
    expect(error.message.startsWith(`${field}: `)).toBe(true);
  });

  it('quotes a key that is not a plain name in the path', () => {
    expect(specError({ ...ISSUE_SPEC, '': 1 }).field).toBe('[""]');
    expect(specError(withField(ISSUE_SPEC, 'optimizer', { 'max iterations': 5 })).field).toBe('optimizer["max iterations"]');
  });

  it('rejects a root that is not an object under the field "spec"', () => {
    for (const root of [5, 'spec', null, [], undefined, true]) expect(specError(root).field).toBe('spec');
  });

  it('says what is allowed and echoes the value', () => {
    const points = specError(withField(ISSUE_SPEC, 'ensemble.detuning.points', 0));
    expect(points.message).toBe('ensemble.detuning.points: 0 is not allowed; an integer from 1 to 401');
    const rabi = specError(withField(ISSUE_SPEC, 'rabiMax', -5));
    expect(rabi.message).toBe('rabiMax: -5 is not allowed; a finite number > 0 (Hz)');
  });

  it('names the allowed keys of a misspelt key and suggests the near miss', () => {
    const error = specError(withField(ISSUE_SPEC, 'ensemble.amplitudeEror', { min: 0, max: 0, points: 1 }));
    expect(error.field).toBe('ensemble.amplitudeEror');
    expect(error.message).toContain('did you mean "amplitudeError"?');
    expect(error.message).toContain('detuning, amplitudeError, members');
  });

  it('needs segments >= 3 for zero edges', () => {
    const spec = withField(withField(ISSUE_SPEC, 'segments', 2), 'constraints.zeroEdges', true);
    expect(specError(spec).field).toBe('constraints.zeroEdges');
    expect(parseSpec(withField(spec, 'segments', 3)).constraints.zeroEdges).toBe(true);
  });

  it('caps the ensemble at 10000 members (100 x 100 passes, 101 x 100 does not)', () => {
    const grid = (n: number) => withField(withField(ISSUE_SPEC, 'ensemble.detuning.points', n), 'ensemble.amplitudeError.points', 100);
    expect(parseSpec(grid(100)).members).toHaveLength(10000);
    expect(specError(grid(101)).message).toContain('101 x 100 = 10100 members');
  });

  it('turns a JSON syntax error into a SpecError', () => {
    expect(() => specJsonFromText('{"target": ')).toThrow(SpecError);
    expect(specJsonFromText(JSON.stringify(ISSUE_SPEC))).toEqual(ISSUE_SPEC);
  });
});

// Every path (list of keys) inside a JSON value, the root excluded.
function paths(value: unknown, prefix: (string | number)[] = []): (string | number)[][] {
  if (typeof value !== 'object' || value === null) return [];
  const entries = Array.isArray(value) ? value.map((v, k) => [k, v] as const) : Object.entries(value);
  return entries.flatMap(([k, v]) => [[...prefix, k], ...paths(v, [...prefix, k])]);
}

type Mutation = { kind: 'replace'; value: unknown } | { kind: 'delete' } | { kind: 'add'; key: string; value: unknown };

function mutate(base: unknown, path: (string | number)[], mutation: Mutation): unknown {
  const spec = clone(base);
  let parent = spec as Record<string | number, unknown>;
  for (const key of path.slice(0, -1)) parent = parent[key] as Record<string | number, unknown>;
  const last = path[path.length - 1];
  if (mutation.kind === 'replace') parent[last] = mutation.value;
  else if (mutation.kind === 'delete') {
    if (Array.isArray(parent)) parent.splice(last as number, 1);
    else delete parent[last];
  } else {
    const target = parent[last];
    if (typeof target === 'object' && target !== null && !Array.isArray(target)) (target as Record<string, unknown>)[mutation.key] = mutation.value;
    else parent[last] = { [mutation.key]: mutation.value };
  }
  return spec;
}

/** parseSpec must return a valid problem or throw a SpecError: nothing else. */
function parsesOrSpecError(spec: unknown): void {
  let problem: Problem;
  try {
    problem = parseSpec(spec);
  } catch (error) {
    if (!(error instanceof SpecError)) throw error;
    expect(error.field.length).toBeGreaterThan(0);
    return;
  }
  expectValidProblem(problem);
}

const oddValue = fc.oneof(
  fc.jsonValue(),
  fc.double(),
  fc.integer({ min: -1000, max: 1000 }),
  fc.constantFrom(0, -1, 1, 401, 402, 10001, 2 ** 32, -0, NaN, Infinity, -Infinity, 5e-324, 1e308, null, '', [], {}),
);

describe('random malformed specs (fast-check)', () => {
  it('random JSON values never crash the validator', () => {
    fc.assert(fc.property(fc.jsonValue(), parsesOrSpecError), FC);
  });

  it('random values under the top-level keys never crash it', () => {
    const keys = ['target', 'duration', 'segments', 'rabiMax', 'ensemble', 'constraints', 'optimizer'];
    fc.assert(fc.property(fc.dictionary(fc.constantFrom(...keys), oddValue), parsesOrSpecError), FC);
  });

  it('mutations of valid specs (replace, delete, add a key) give a valid problem or a SpecError', () => {
    const mutation: fc.Arbitrary<Mutation> = fc.oneof(
      oddValue.map((value) => ({ kind: 'replace' as const, value })),
      fc.constant({ kind: 'delete' as const }),
      fc.tuple(fc.oneof(fc.string(), fc.constantFrom('points', 'sigma', 'values', 'min', 'gate', 'members')), oddValue)
        .map(([key, value]) => ({ kind: 'add' as const, key, value })),
    );
    const mutated = fc
      .tuple(fc.constantFrom(...VALID_SPECS), fc.nat(), fc.array(mutation, { minLength: 1, maxLength: 3 }))
      .map(([base, pick, mutations]) => {
        let spec: unknown = base;
        for (const m of mutations) {
          const all = paths(spec);
          if (all.length === 0) break;
          spec = mutate(spec, all[pick % all.length], m);
        }
        return spec;
      });
    fc.assert(fc.property(mutated, parsesOrSpecError), FC);
  });

  it('every valid example still parses (the mutation bases are valid)', () => {
    for (const spec of VALID_SPECS) expectValidProblem(parseSpec(spec));
  });
});
