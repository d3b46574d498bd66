// Editing a design spec (the JSON users write) from the form: reading and replacing values
// at dotted paths without mutating the original, the shapes an error axis can take, and
// Bloch vectors typed as "+x" or "0, 0.6, 0.8".
import type { Vec3 } from '../core/types.ts';

/** A spec as JSON. */
export type SpecJson = Record<string, unknown>;

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** The value at a dotted path ("ensemble.detuning.min"), or undefined. */
export function getAt(spec: unknown, path: string): unknown {
  let node: unknown = spec;
  for (const key of path.split('.')) {
    if (!isRecord(node)) return undefined;
    node = node[key];
  }
  return node;
}

/** A copy of the spec with the value at `path` replaced (undefined removes the key); parents are created. */
export function setAt(spec: SpecJson, path: string, value: unknown): SpecJson {
  const [key, ...rest] = path.split('.');
  const copy: SpecJson = { ...spec };
  if (rest.length === 0) {
    if (value === undefined) delete copy[key];
    else copy[key] = value;
    return copy;
  }
  const child = isRecord(spec[key]) ? (spec[key] as SpecJson) : {};
  const updated = setAt(child, rest.join('.'), value);
  if (Object.keys(updated).length === 0 && value === undefined) delete copy[key];
  else copy[key] = updated;
  return copy;
}

/** How one error axis of the ensemble is sampled. */
export type AxisMode = 'none' | 'range' | 'gaussian' | 'list';

/** The sampling of an axis value as written in a spec. */
export function axisMode(axis: unknown): AxisMode {
  if (!isRecord(axis)) return 'none';
  if ('values' in axis) return 'list';
  if ('sigma' in axis) return 'gaussian';
  return 'range';
}

/** A starting value for an axis switched to `mode`, scaled to the typical size `scale` (Hz or relative). */
export function axisDefault(mode: AxisMode, scale: number): Record<string, unknown> | undefined {
  switch (mode) {
    case 'none':
      return undefined;
    case 'range':
      return { min: -scale, max: scale, points: 5 };
    case 'gaussian':
      return { sigma: scale / 2, points: 5 };
    case 'list':
      return { values: [-scale, 0, scale] };
  }
}

/** A target spec switched to the other kind, with a sensible default. */
export function targetDefault(kind: 'gate' | 'state'): Record<string, unknown> {
  return kind === 'gate' ? { gate: { axis: [1, 0, 0], angleDeg: 90 } } : { state: { from: [0, 0, 1], to: [0, 0, -1] } };
}

const NAMED: Record<string, Vec3> = {
  '+x': [1, 0, 0],
  '-x': [-1, 0, 0],
  '+y': [0, 1, 0],
  '-y': [0, -1, 0],
  '+z': [0, 0, 1],
  '-z': [0, 0, -1],
};

/** A Bloch vector or axis typed as a name (+x, -z, y) or three numbers "x, y, z". */
export function parseVector(text: string): { ok: true; value: Vec3 } | { ok: false; message: string } {
  const clean = text.trim().toLowerCase().replace(/\u2212/g, '-');
  const named = NAMED[clean] ?? NAMED[`+${clean}`];
  if (named) return { ok: true, value: [...named] };
  const parts = clean.replace(/^\[|\]$/g, '').split(/[\s,;]+/).filter((p) => p !== '');
  const numbers = parts.map(Number);
  if (parts.length !== 3 || !numbers.every(Number.isFinite)) {
    return { ok: false, message: `${JSON.stringify(text.trim())} is not a vector; write +x, -x, +y, -y, +z, -z or three numbers "x, y, z"` };
  }
  if (numbers.every((n) => n === 0)) return { ok: false, message: 'the zero vector has no direction; give a non-zero vector' };
  return { ok: true, value: numbers as Vec3 };
}

/** A vector as typed back: its name when it is a signed unit axis, else "x, y, z". */
export function formatVector(value: unknown): string {
  if (!Array.isArray(value)) return '';
  for (const [name, axis] of Object.entries(NAMED)) if (axis.every((c, k) => c === value[k])) return name;
  return value.join(', ');
}

/** Duration (s) after the sample period is set to `dt`, keeping the number of samples. */
export function durationForSamplePeriod(dt: number, segments: number): number {
  // Rounded to 15 significant digits so that 2 ns x 100 prints as 200 ns, not 200.00000000000003 ns.
  return Number((dt * segments).toPrecision(15));
}

/** The sample period of a spec (s), or NaN while duration or segments is not a usable number. */
export function samplePeriod(spec: SpecJson): number {
  const duration = spec.duration;
  const segments = spec.segments;
  if (typeof duration !== 'number' || typeof segments !== 'number' || !(segments > 0)) return NaN;
  return Number((duration / segments).toPrecision(15));
}

/** The top-level keys a whole spec has: a JSON object with all of them replaces the spec, one without is merged into it. */
export const WHOLE_SPEC_KEYS = ['target', 'duration', 'segments', 'rabiMax'] as const;

/** Sections whose keys are merged one by one (each key given replaces that key only). */
const MERGED_SECTIONS = ['optimizer', 'constraints', 'ensemble'];

/** True when a JSON object gives every key of a whole spec. */
export function isWholeSpec(value: SpecJson): boolean {
  return WHOLE_SPEC_KEYS.every((key) => key in value);
}

/**
 * A partial spec merged into `spec`: each top-level key given replaces the spec's, except in
 * the optimizer, constraints and ensemble sections, where each key given replaces that key
 * only (so {"optimizer": {"starts": 3}} keeps the other optimizer settings). Returns the
 * merged spec and the dotted keys that were set.
 */
export function mergeSpec(spec: SpecJson, partial: SpecJson): { spec: SpecJson; keys: string[] } {
  const out: SpecJson = { ...spec };
  const keys: string[] = [];
  for (const [key, value] of Object.entries(partial)) {
    if (MERGED_SECTIONS.includes(key) && isRecord(value) && isRecord(spec[key])) {
      out[key] = { ...(spec[key] as SpecJson), ...value };
      keys.push(...Object.keys(value).map((k) => `${key}.${k}`));
    } else {
      out[key] = value;
      keys.push(key);
    }
  }
  return { spec: out, keys };
}
