// The `ensemble` part of a design spec: error axes sampled on grids, lists or Gauss rules,
// combined as a tensor product, or an explicit member list. Weights come out summing to 1.
import { SpecError } from './errors.ts';
import { gaussHermite, gaussLegendre, MAX_RULE_POINTS } from './quadrature.ts';
import { checkNumber, childPath, isObject, readArray, readChoice, readNumber, readObject } from './spec-fields.ts';
import type { JsonObject, NumberRule } from './spec-fields.ts';
import type { Member } from './types.ts';

/** Most members an ensemble may have (each costs a forward and backward sweep per iteration). */
export const MAX_MEMBERS = 10000;

/** Samples of one error axis: values and weights (weights sum to 1). */
export interface AxisSamples {
  values: number[];
  weights: number[];
}

/** The error axes a spec may sample. */
export type AxisName = 'detuning' | 'amplitudeError' | 'anharmonicityError';

const AXIS_FORMS =
  'one of {"min", "max", "points"} (uniform grid; add "nodes": "legendre" for Gauss-Legendre nodes), ' +
  '{"values": [...]} (a list, optional "weights"), or {"sigma", "points", "mean"?} (Gaussian, Gauss-Hermite nodes)';

const UNIT: Record<AxisName, string> = { detuning: 'Hz', amplitudeError: 'relative', anharmonicityError: 'Hz' };

// The delivered drive is (1 + amplitudeError) times the commanded one: it must stay positive.
const AMPLITUDE_ERROR_FLOOR = -1;

/** Members of a spec's `ensemble` field (absent: the single error-free member). */
export function parseEnsemble(value: unknown, path = 'ensemble'): Member[] {
  if (value === undefined) return [{ detuning: 0, amplitudeError: 0, weight: 1 }];
  const obj = readObject(value, path, ['detuning', 'amplitudeError', 'members'], 'the ensemble');
  if (obj.members !== undefined) {
    if (obj.detuning !== undefined || obj.amplitudeError !== undefined) {
      throw new SpecError(path, Object.keys(obj), 'either "members" or the axes "detuning" and "amplitudeError", not both');
    }
    return parseMemberList(obj.members, childPath(path, 'members'));
  }
  const detuning = parseAxis(obj.detuning, childPath(path, 'detuning'), 'detuning');
  const amplitudeError = parseAxis(obj.amplitudeError, childPath(path, 'amplitudeError'), 'amplitudeError');
  const count = detuning.values.length * amplitudeError.values.length;
  if (count > MAX_MEMBERS) {
    throw new SpecError(
      path,
      `${detuning.values.length} x ${amplitudeError.values.length} = ${count} members`,
      `at most ${MAX_MEMBERS} members in all (detuning samples x amplitudeError samples)`,
    );
  }
  return tensorMembers(detuning, amplitudeError);
}

/** The tensor product of two axes, detuning varying fastest; weights multiplied and renormalised. */
export function tensorMembers(detuning: AxisSamples, amplitudeError: AxisSamples): Member[] {
  const members: Member[] = [];
  for (let a = 0; a < amplitudeError.values.length; a++) {
    for (let d = 0; d < detuning.values.length; d++) {
      members.push({
        detuning: detuning.values[d],
        amplitudeError: amplitudeError.values[a],
        weight: detuning.weights[d] * amplitudeError.weights[a],
      });
    }
  }
  // Never null: each axis's largest weight is at least 1/points, so their product is > 0.
  const weights = normaliseWeights(members.map((m) => m.weight)) as number[];
  members.forEach((m, k) => (m.weight = weights[k]));
  return members;
}

/** Weights scaled to sum 1 (by the largest first, so huge weights cannot overflow); null if all are 0. */
export function normaliseWeights(weights: readonly number[]): number[] | null {
  const largest = Math.max(...weights);
  if (!(largest > 0)) return null;
  const scaled = weights.map((w) => w / largest);
  const sum = scaled.reduce((s, w) => s + w, 0);
  return scaled.map((w) => w / sum);
}

/** One error axis of an ensemble (absent: the single value 0). */
export function parseAxis(value: unknown, path: string, axis: AxisName): AxisSamples {
  if (value === undefined) return { values: [0], weights: [1] };
  if (!isObject(value)) throw new SpecError(path, value, AXIS_FORMS);
  if ('values' in value) return parseList(value, path, axis);
  if ('sigma' in value) return parseGaussian(value, path, axis);
  if ('min' in value || 'max' in value || 'points' in value || 'nodes' in value) return parseRange(value, path, axis);
  throw new SpecError(path, value, AXIS_FORMS);
}

function valueRule(axis: AxisName): NumberRule {
  return axis === 'amplitudeError'
    ? { min: AMPLITUDE_ERROR_FLOOR, minExclusive: true, unit: UNIT[axis] }
    : { unit: UNIT[axis] };
}

const POINTS_RULE: NumberRule = { integer: true, min: 1, max: MAX_RULE_POINTS };

function parseList(value: unknown, path: string, axis: AxisName): AxisSamples {
  const obj = readObject(value, path, ['values', 'weights'], 'a list axis');
  const valuesPath = childPath(path, 'values');
  const values = readArray(obj.values, valuesPath, MAX_MEMBERS, 'numbers').map((v, k) =>
    checkNumber(v, childPath(valuesPath, k), valueRule(axis)),
  );
  if (obj.weights === undefined) return { values, weights: values.map(() => 1 / values.length) };
  const weightsPath = childPath(path, 'weights');
  const raw = readArray(obj.weights, weightsPath, MAX_MEMBERS, 'numbers >= 0');
  if (raw.length !== values.length) {
    throw new SpecError(weightsPath, `${raw.length} weights`, `one weight per value (${values.length})`);
  }
  const given = raw.map((w, k) => checkNumber(w, childPath(weightsPath, k), { min: 0 }));
  const weights = normaliseWeights(given);
  if (!weights) throw new SpecError(weightsPath, given, 'weights >= 0, at least one > 0');
  return { values, weights };
}

function parseGaussian(value: unknown, path: string, axis: AxisName): AxisSamples {
  const obj = readObject(value, path, ['sigma', 'points', 'mean'], 'a Gaussian axis');
  const sigma = readNumber(obj, 'sigma', path, { min: 0, minExclusive: true, unit: UNIT[axis] });
  const points = readNumber(obj, 'points', path, POINTS_RULE);
  const mean = readNumber(obj, 'mean', path, valueRule(axis), 0);
  const rule = gaussHermite(points);
  const values = Array.from(rule.nodes, (x) => mean + sigma * x);
  const lowest = values[0];
  if (!values.every(Number.isFinite)) {
    throw new SpecError(childPath(path, 'sigma'), sigma, `small enough that mean + node * sigma stays finite`);
  }
  if (axis === 'amplitudeError' && !(lowest > AMPLITUDE_ERROR_FLOOR)) {
    throw new SpecError(
      childPath(path, 'sigma'),
      sigma,
      `with ${points} Gauss-Hermite points the lowest sample is mean - ${(-rule.nodes[0]).toFixed(3)} sigma = ${lowest}; ` +
        `amplitude errors must stay > ${AMPLITUDE_ERROR_FLOOR} (use a smaller sigma or fewer points)`,
    );
  }
  return { values, weights: normaliseWeights(Array.from(rule.weights)) as number[] };
}

function parseRange(value: unknown, path: string, axis: AxisName): AxisSamples {
  const obj: JsonObject = readObject(value, path, ['min', 'max', 'points', 'nodes'], 'a range axis');
  const rule = { unit: UNIT[axis] };
  const min = readNumber(obj, 'min', path, rule);
  const max = readNumber(obj, 'max', path, { ...rule, min });
  const points = readNumber(obj, 'points', path, POINTS_RULE);
  const nodes = readChoice(obj, 'nodes', path, ['uniform', 'legendre'] as const, 'uniform');
  // Halves first: min/2 + max/2 cannot overflow where (min + max)/2 can.
  const mid = min / 2 + max / 2;
  const half = max / 2 - min / 2;
  let samples: AxisSamples;
  if (nodes === 'legendre') {
    const gl = gaussLegendre(points);
    samples = {
      values: Array.from(gl.nodes, (t) => mid + half * t),
      weights: normaliseWeights(Array.from(gl.weights)) as number[],
    };
  } else {
    // One point is the midpoint; more are spaced evenly with both ends included exactly.
    const values = points === 1 ? [mid] : Array.from({ length: points }, (_, k) => gridValue(min, max, k, points));
    samples = { values, weights: values.map(() => 1 / points) };
  }
  if (axis === 'amplitudeError' && !(samples.values[0] > AMPLITUDE_ERROR_FLOOR)) {
    throw new SpecError(
      childPath(path, 'min'),
      min,
      `the lowest sample (${samples.values[0]}) must be > ${AMPLITUDE_ERROR_FLOOR}: the delivered drive is (1 + amplitudeError) times the commanded one`,
    );
  }
  return samples;
}

// Spaced about the midpoint with exactly antisymmetric offsets, so that a range symmetric
// about 0 gives a grid symmetric to the last bit (-0.1..0.1 in 5 points is exactly
// -0.1, -0.05, 0, 0.05, 0.1); halves are used so that no range can overflow; ends exact.
function gridValue(min: number, max: number, k: number, points: number): number {
  if (k === 0) return min;
  if (k === points - 1) return max;
  const offset = (2 * k - (points - 1)) / (points - 1);
  return min / 2 + max / 2 + (max / 2 - min / 2) * offset;
}

function parseMemberList(value: unknown, path: string): Member[] {
  const list = readArray(value, path, MAX_MEMBERS, 'members {"detuning", "amplitudeError", "weight"}');
  const members = list.map((entry, k) => {
    const memberPath = childPath(path, k);
    const obj = readObject(entry, memberPath, ['detuning', 'amplitudeError', 'weight'], 'a member');
    return {
      detuning: readNumber(obj, 'detuning', memberPath, valueRule('detuning'), 0),
      amplitudeError: readNumber(obj, 'amplitudeError', memberPath, valueRule('amplitudeError'), 0),
      weight: readNumber(obj, 'weight', memberPath, { min: 0 }, 1),
    };
  });
  const weights = normaliseWeights(members.map((m) => m.weight));
  if (!weights) throw new SpecError(path, members.map((m) => m.weight), 'member weights >= 0 with at least one > 0');
  members.forEach((m, k) => (m.weight = weights[k]));
  return members;
}
