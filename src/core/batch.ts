// Batches: a family of designs as one manifest, a base spec and named variations, each a set
// of overrides by dotted path (in the manifest or as a CSV table, one row per variation).
// Every variation's spec is validated by the ordinary spec parser, so that any section the
// spec gains is open to overrides at once; an error names the variation and where it came
// from. Shards take variations by index (k mod N), so that N shards never overlap.
import { parseCsv } from './csv-table.ts';
import { ArgumentError, describeValue, SpecError } from './errors.ts';
import { parseSpec } from './spec.ts';
import { isObject, readObject } from './spec-fields.ts';
import type { Problem } from './types.ts';

/** One variation: its name, its overrides by dotted path, and where it was defined (for messages). */
export interface BatchVariation {
  name: string;
  set: Record<string, unknown>;
  /** Where it is defined, for messages: "chip.json: variations[3]" or "chip.csv row 5". */
  source: string;
  /** Whether it is a row of the variations CSV (its overrides are columns) or an entry of the manifest's list. */
  from: 'list' | 'csv';
}

/** A validated manifest: the base spec as given, the variations and each one's problem. */
export interface BatchManifest {
  base: Record<string, unknown>;
  variations: BatchVariation[];
  /** The CSV the variations came from, as the manifest names it (relative to the manifest). */
  variationsCsv?: string;
  /** Each variation's spec (JSON) and validated problem, in the order of `variations`. */
  specs: { json: Record<string, unknown>; problem: Problem }[];
}

/** Most variations a manifest may hold. */
export const MAX_VARIATIONS = 100000;

const NAME_RULE = /^[A-Za-z0-9][A-Za-z0-9._-]{0,99}$/;
const NAME_ALLOWED = '1 to 100 letters, digits, ".", "_" or "-", starting with a letter or digit (it names the variation\'s files)';
const PATH_STEP = /^([A-Za-z_$][\w$]*)((?:\[\d+\])*)$/;
const PATH_ALLOWED = 'a dotted path into the spec, e.g. ensemble.detuning.min or target.gate.axis[0]';

/**
 * Validates a manifest (parsed JSON). `readCsv(relativePath)` returns the text of the
 * variations CSV the manifest names and the name messages give it; `fileName` names the manifest.
 */
export function parseManifest(json: unknown, fileName: string, readCsv: (relativePath: string) => { text: string; name: string }): BatchManifest {
  const obj = readObject(json, '', ['name', 'description', 'base', 'variations', 'variationsCsv'], 'a batch manifest');
  if (!isObject(obj.base)) throw new SpecError('base', obj.base, 'required: the base design spec, a JSON object');
  if ((obj.variations === undefined) === (obj.variationsCsv === undefined)) {
    throw new SpecError('variations', obj.variations, 'exactly one of "variations" (a list of {"name", "set"}) or "variationsCsv" (a CSV file beside the manifest)');
  }
  let variations: BatchVariation[];
  let variationsCsv: string | undefined;
  if (obj.variationsCsv !== undefined) {
    if (typeof obj.variationsCsv !== 'string' || obj.variationsCsv.trim() === '') {
      throw new SpecError('variationsCsv', obj.variationsCsv, 'the path of a CSV file, relative to the manifest');
    }
    variationsCsv = obj.variationsCsv;
    const csv = readCsv(variationsCsv);
    variations = parseVariationsCsv(csv.text, csv.name);
  } else {
    variations = parseVariationList(obj.variations, fileName);
  }
  checkNames(variations);
  const base = obj.base;
  const specs = variations.map((v) => {
    const json = variationSpec(base, v);
    try {
      return { json, problem: parseSpec(json) };
    } catch (error) {
      throw inVariation(error, v);
    }
  });
  return { base, variations, ...(variationsCsv !== undefined ? { variationsCsv } : {}), specs };
}

/** The base spec with a variation's overrides applied (a copy; the base is not changed). */
export function variationSpec(base: Record<string, unknown>, variation: BatchVariation): Record<string, unknown> {
  const spec = structuredClone(base);
  for (const [path, value] of Object.entries(variation.set)) setByPath(spec, path, value, variation);
  return spec;
}

/** The indices (from 0) of the variations of shard `index` (from 0) of `count`: k mod count = index. */
export function shardIndices(variations: number, index: number, count: number): number[] {
  if (!Number.isInteger(count) || count < 1) throw new ArgumentError(`shard count: ${describeValue(count)} is not allowed; a whole number >= 1`);
  if (!Number.isInteger(index) || index < 0 || index >= count) {
    throw new ArgumentError(`shard index: ${describeValue(index)} is not allowed; a whole number from 0 to ${count - 1}`);
  }
  const out: number[] = [];
  for (let k = index; k < variations; k += count) out.push(k);
  return out;
}

/** A shard (index from 0) and where it was read from, for the progress line. */
export interface Shard {
  index: number;
  count: number;
  source: string;
}

/** The environment variable that gives the shard count of a Kubernetes indexed job (or pass --shards). */
export const SHARDS_VARIABLE = 'GATESMITH_SHARDS';

/**
 * The shard of this process from a scheduler's environment: a Slurm job array
 * (SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_COUNT, SLURM_ARRAY_TASK_MIN, SLURM_ARRAY_TASK_STEP)
 * or a Kubernetes indexed job (JOB_COMPLETION_INDEX with `shards` or GATESMITH_SHARDS);
 * null when neither is present (the whole batch).
 */
export function shardFromEnvironment(env: Record<string, string | undefined>, shards?: number): Shard | null {
  const whole = (name: string, text: string | undefined, min: number): number => {
    const n = Number(text);
    if (text === undefined || text.trim() === '' || !Number.isInteger(n) || n < min) {
      throw new ArgumentError(`${name}=${text ?? ''} is not allowed; a whole number >= ${min}`);
    }
    return n;
  };
  if (env.SLURM_ARRAY_TASK_ID !== undefined) {
    const id = whole('SLURM_ARRAY_TASK_ID', env.SLURM_ARRAY_TASK_ID, 0);
    if (env.SLURM_ARRAY_TASK_COUNT === undefined) {
      throw new ArgumentError('SLURM_ARRAY_TASK_ID is set but SLURM_ARRAY_TASK_COUNT is not (a Slurm before 17.11?): give --shard I/N');
    }
    const count = whole('SLURM_ARRAY_TASK_COUNT', env.SLURM_ARRAY_TASK_COUNT, 1);
    // --array=1-8 and --array=0-7 are both common; --array=0-15:4 steps by 4.
    const min = env.SLURM_ARRAY_TASK_MIN === undefined ? 0 : whole('SLURM_ARRAY_TASK_MIN', env.SLURM_ARRAY_TASK_MIN, 0);
    const step = env.SLURM_ARRAY_TASK_STEP === undefined ? 1 : whole('SLURM_ARRAY_TASK_STEP', env.SLURM_ARRAY_TASK_STEP, 1);
    const index = (id - min) / step;
    const vars = `SLURM_ARRAY_TASK_ID=${id}, SLURM_ARRAY_TASK_MIN=${min}, SLURM_ARRAY_TASK_STEP=${step}, SLURM_ARRAY_TASK_COUNT=${count}`;
    if (!Number.isInteger(index) || index < 0 || index >= count) {
      throw new ArgumentError(`${vars}: not a task of an evenly spaced array (such as --array=0-${count - 1} or 1-${count}); give --shard I/N`);
    }
    return { index, count, source: vars };
  }
  if (env.JOB_COMPLETION_INDEX !== undefined) {
    const index = whole('JOB_COMPLETION_INDEX', env.JOB_COMPLETION_INDEX, 0);
    const count = shards ?? (env[SHARDS_VARIABLE] !== undefined ? whole(SHARDS_VARIABLE, env[SHARDS_VARIABLE], 1) : undefined);
    if (count === undefined) {
      throw new ArgumentError(`JOB_COMPLETION_INDEX is set (a Kubernetes indexed job) but the shard count is not: give --shards N or set ${SHARDS_VARIABLE} (the job's completions)`);
    }
    if (index >= count) throw new ArgumentError(`JOB_COMPLETION_INDEX=${index} is not allowed with ${count} shards; it must be below the shard count (the job's completions)`);
    return { index, count, source: `JOB_COMPLETION_INDEX=${index} of ${count}` };
  }
  return null;
}

function parseVariationList(value: unknown, fileName: string): BatchVariation[] {
  if (!Array.isArray(value) || value.length < 1 || value.length > MAX_VARIATIONS) {
    throw new SpecError('variations', Array.isArray(value) ? `${value.length} entries` : value, `a list of 1 to ${MAX_VARIATIONS} {"name", "set"} objects`);
  }
  return value.map((entry, k) => {
    const field = `variations[${k}]`;
    const v = readObject(entry, field, ['name', 'set'], 'a variation');
    if (typeof v.name !== 'string') throw new SpecError(`${field}.name`, v.name, `required: ${NAME_ALLOWED}`);
    const set = v.set === undefined ? {} : v.set;
    if (!isObject(set)) throw new SpecError(`${field}.set`, set, 'an object of overrides by dotted path, e.g. {"ensemble.detuning.min": -2e6}');
    for (const path of Object.keys(set)) checkPath(path, `${fileName}: ${field}.set`);
    return { name: v.name, set, source: `${fileName}: ${field}`, from: 'list' as const };
  });
}

/** Variations from CSV text: the first column is `name`, the other header cells are dotted paths. */
export function parseVariationsCsv(text: string, fileName: string): BatchVariation[] {
  const rows = parseCsv(text, fileName);
  if (rows.length === 0) throw new ArgumentError(`${fileName}: the file is empty; a header row (name, then dotted paths) and one row per variation`);
  const [header, ...body] = rows;
  const columns = header.cells.map((c) => c.trim());
  if (columns[0] !== 'name') {
    throw new ArgumentError(`${fileName} row ${header.line}: the first header cell is ${describeValue(header.cells[0])}; it must be "name", then one dotted path per column`);
  }
  const seen = new Set<string>();
  columns.slice(1).forEach((path, c) => {
    checkPath(path, `${fileName} row ${header.line}, column ${c + 2}`);
    if (seen.has(path)) throw new ArgumentError(`${fileName} row ${header.line}: the column ${path} appears twice`);
    seen.add(path);
  });
  if (body.length === 0) throw new ArgumentError(`${fileName}: no variations; one row per variation below the header`);
  if (body.length > MAX_VARIATIONS) throw new ArgumentError(`${fileName}: ${body.length} variations; at most ${MAX_VARIATIONS}`);
  return body.map((row) => {
    const source = `${fileName} row ${row.line}`;
    if (row.cells.length !== columns.length) {
      throw new ArgumentError(`${source}: ${row.cells.length} cells, but the header has ${columns.length}; give one cell per column (an empty cell keeps the base value)`);
    }
    const set: Record<string, unknown> = {};
    for (let c = 1; c < columns.length; c++) {
      const cell = row.cells[c].trim();
      if (cell === '') continue;
      set[columns[c]] = cellValue(cell, `${source}, column ${columns[c]}`);
    }
    return { name: row.cells[0].trim(), set, source, from: 'csv' as const };
  });
}

/** A CSV cell as a JSON value: numbers, true/false/null, JSON arrays, objects and quoted strings; other text as a string. */
function cellValue(cell: string, where: string): unknown {
  if (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(cell)) return Number(cell);
  if (cell === 'true' || cell === 'false' || cell === 'null') return JSON.parse(cell);
  if (/^[[{"]/.test(cell)) {
    try {
      return JSON.parse(cell);
    } catch (error) {
      throw new ArgumentError(`${where}: ${describeValue(cell)} is not allowed; a cell starting with [, { or " must be JSON (${(error as Error).message})`);
    }
  }
  return cell;
}

function checkPath(path: string, where: string): void {
  if (!path.split('.').every((step) => PATH_STEP.test(step))) {
    throw new ArgumentError(`${where}: ${describeValue(path)} is not allowed; ${PATH_ALLOWED}`);
  }
}

function checkNames(variations: BatchVariation[]): void {
  // Case-insensitive: the names become file names, and some file systems ignore case.
  const seen = new Map<string, BatchVariation>();
  for (const v of variations) {
    if (!NAME_RULE.test(v.name)) throw new ArgumentError(`${v.source}: the name ${describeValue(v.name)} is not allowed; ${NAME_ALLOWED}`);
    const other = seen.get(v.name.toLowerCase());
    if (other) throw new ArgumentError(`${v.source}: the name "${v.name}" is already used by ${other.source}; names must differ (ignoring case)`);
    seen.set(v.name.toLowerCase(), v);
  }
}

function setByPath(spec: Record<string, unknown>, path: string, value: unknown, v: BatchVariation): void {
  // "a.b[2].c" -> ["a", "b", 2, "c"]
  const steps: (string | number)[] = [];
  for (const part of path.split('.')) {
    const m = PATH_STEP.exec(part)!;
    steps.push(m[1]);
    for (const index of m[2].matchAll(/\[(\d+)\]/g)) steps.push(Number(index[1]));
  }
  let node: unknown = spec;
  let walked = '';
  for (let s = 0; s < steps.length; s++) {
    const step = steps[s];
    const last = s === steps.length - 1;
    if (typeof step === 'number') {
      if (!Array.isArray(node) || step >= node.length) {
        throw new ArgumentError(`${v.source} (variation "${v.name}"): ${path}: ${walked} has no element [${step}] in the base (${describeValue(node)}); an index can only change an element that is there`);
      }
    } else if (!isObject(node)) {
      throw new ArgumentError(`${v.source} (variation "${v.name}"): ${path}: ${walked} is ${describeValue(node)} in the base, not an object with fields`);
    }
    const container = node as Record<string | number, unknown>;
    if (last) {
      container[step] = value;
    } else {
      // A missing section is created, so that an override may fill in what the base leaves to its default.
      if (container[step] === undefined) container[step] = {};
      node = container[step];
      walked = typeof step === 'number' ? `${walked}[${step}]` : walked === '' ? step : `${walked}.${step}`;
    }
  }
}

// A spec error inside a variation names the variation, where it is defined and the override behind it.
function inVariation(error: unknown, v: BatchVariation): unknown {
  if (!(error instanceof SpecError)) return error;
  const field = error.field;
  // The override that set the field, or one inside it, or the section holding it (the parser's paths use the same steps).
  const within = (a: string, b: string): boolean => a === b || a.startsWith(`${b}.`) || a.startsWith(`${b}[`);
  const override = Object.keys(v.set).find((p) => within(p, field) || within(field, p));
  const cause = override === undefined ? '' : v.from === 'list' ? `, set ${override}` : `, column ${override}`;
  return new ArgumentError(`${v.source} (variation "${v.name}"${cause}): ${error.message}`);
}
