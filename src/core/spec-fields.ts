// Field readers shared by the spec validators: each checks one JSON value and throws a
// SpecError naming the dotted path, the value and what is allowed.
import { SpecError } from './errors.ts';
import type { Vec3 } from './types.ts';

/** A JSON object as read from a spec. */
export type JsonObject = Record<string, unknown>;

/** Path of a key below `path` ("" is the spec's root). */
export function childPath(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  // A key that is not a plain name (empty, spaces, dots) is quoted so the path stays readable.
  if (!/^[A-Za-z_$][\w$]*$/.test(key)) return `${path}[${JSON.stringify(key)}]`;
  return path === '' ? key : `${path}.${key}`;
}

/** True for a plain JSON object (not an array, not null). */
export function isObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value) && !ArrayBuffer.isView(value);
}

/** The value as an object whose keys are all in `allowed`; a stray key is named with a suggestion. */
export function readObject(value: unknown, path: string, allowed: readonly string[], what: string): JsonObject {
  if (!isObject(value)) {
    throw new SpecError(path === '' ? 'spec' : path, value, `${what}: a JSON object with keys ${allowed.join(', ')}`);
  }
  for (const key of Object.keys(value)) {
    if (!allowed.includes(key)) {
      const guess = closestKey(key, allowed);
      const hint = guess ? ` (did you mean "${guess}"?)` : '';
      throw new SpecError(childPath(path, key), value[key], `unknown key${hint}; ${what} allows only ${allowed.join(', ')}`);
    }
  }
  return value;
}

/** Limits of a number field; `unit` is printed after the range ("Hz", "s"). */
export interface NumberRule {
  min?: number;
  max?: number;
  /** Exclude `min` itself (a strict lower bound). */
  minExclusive?: boolean;
  integer?: boolean;
  unit?: string;
}

/** Words for what a rule allows, e.g. "an integer from 1 to 64" or "a number > 0 (s)". */
export function describeRule(rule: NumberRule): string {
  const kind = rule.integer ? 'an integer' : 'a finite number';
  let range = '';
  if (rule.min !== undefined && rule.max !== undefined && !rule.minExclusive) range = ` from ${rule.min} to ${rule.max}`;
  else if (rule.min !== undefined && rule.max !== undefined) range = ` > ${rule.min} and <= ${rule.max}`;
  else if (rule.min !== undefined) range = rule.minExclusive ? ` > ${rule.min}` : ` >= ${rule.min}`;
  else if (rule.max !== undefined) range = ` <= ${rule.max}`;
  return `${kind}${range}${rule.unit ? ` (${rule.unit})` : ''}`;
}

/** A number obeying `rule`; `fallback` is used when the key is absent (undefined = required). */
export function readNumber(obj: JsonObject, key: string, path: string, rule: NumberRule, fallback?: number): number {
  const field = childPath(path, key);
  const value = obj[key];
  if (value === undefined) {
    if (fallback !== undefined) return fallback;
    throw new SpecError(field, value, `required: ${describeRule(rule)}`);
  }
  return checkNumber(value, field, rule);
}

/** Checks one value against a number rule and returns it. */
export function checkNumber(value: unknown, field: string, rule: NumberRule): number {
  const ok =
    typeof value === 'number' &&
    Number.isFinite(value) &&
    (!rule.integer || Number.isInteger(value)) &&
    (rule.min === undefined || (rule.minExclusive ? value > rule.min : value >= rule.min)) &&
    (rule.max === undefined || value <= rule.max);
  if (!ok) throw new SpecError(field, value, describeRule(rule));
  return value as number;
}

/** A boolean, or `fallback` when absent. */
export function readBoolean(obj: JsonObject, key: string, path: string, fallback: boolean): boolean {
  const value = obj[key];
  if (value === undefined) return fallback;
  if (typeof value !== 'boolean') throw new SpecError(childPath(path, key), value, 'true or false');
  return value;
}

/** One of a fixed set of strings, or `fallback` when absent. */
export function readChoice<T extends string>(obj: JsonObject, key: string, path: string, choices: readonly T[], fallback: T): T {
  const value = obj[key];
  if (value === undefined) return fallback;
  if (typeof value !== 'string' || !(choices as readonly string[]).includes(value)) {
    throw new SpecError(childPath(path, key), value, `one of ${choices.map((c) => `"${c}"`).join(', ')}`);
  }
  return value as T;
}

/** An optional free-text string (names, descriptions). */
export function readText(obj: JsonObject, key: string, path: string): string | undefined {
  const value = obj[key];
  if (value === undefined) return undefined;
  if (typeof value !== 'string') throw new SpecError(childPath(path, key), value, 'a string');
  return value;
}

/** An array of at most `maxLength` (and at least one) elements. */
export function readArray(value: unknown, field: string, maxLength: number, what: string): unknown[] {
  if (!Array.isArray(value) || value.length < 1 || value.length > maxLength) {
    const size = Array.isArray(value) ? `${value.length} elements` : value;
    throw new SpecError(field, size, `an array of 1 to ${maxLength} ${what}`);
  }
  return value;
}

/** A non-zero 3-vector [x, y, z] of finite numbers, returned with unit length. */
export function readUnitVector(obj: JsonObject, key: string, path: string): Vec3 {
  const field = childPath(path, key);
  const value = obj[key];
  const allowed = 'a non-zero vector [x, y, z] of three finite numbers (it is normalised)';
  if (!Array.isArray(value) || value.length !== 3 || !value.every((c) => typeof c === 'number' && Number.isFinite(c))) {
    throw new SpecError(field, value, value === undefined ? `required: ${allowed}` : allowed);
  }
  const [x, y, z] = value as number[];
  // Scale by the largest component first so that huge or tiny inputs neither overflow nor underflow.
  const scale = Math.max(Math.abs(x), Math.abs(y), Math.abs(z));
  if (scale === 0) throw new SpecError(field, value, allowed);
  const norm = Math.hypot(x / scale, y / scale, z / scale);
  return [x / scale / norm, y / scale / norm, z / scale / norm];
}

// Edit distance, for "did you mean" on a misspelt key.
function editDistance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diagonal = row[0];
    row[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const above = row[j];
      row[j] = Math.min(row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1].toLowerCase() === b[j - 1].toLowerCase() ? 0 : 1));
      diagonal = above;
    }
  }
  return row[b.length];
}

function closestKey(key: string, allowed: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const candidate of allowed) {
    const d = editDistance(key, candidate);
    if (d < bestDistance) {
      best = candidate;
      bestDistance = d;
    }
  }
  // Only a near miss is worth suggesting: at most a third of the word changed.
  return bestDistance <= Math.max(1, Math.floor(key.length / 3)) ? best : undefined;
}
