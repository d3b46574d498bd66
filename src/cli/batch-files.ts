// The files of a batch: the manifest (and its CSV) read with errors naming the file, and the
// output folder: a copy of the manifest and CSV (so that `collect` knows every variation,
// and a rerun can check it continues the same batch), pulses/NAME.json and results/NAME.json.
// A result file is the mark of a finished variation: it is written last and whole.
import { existsSync, mkdirSync, readdirSync, statSync, unlinkSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { parseManifest } from '../core/batch.ts';
import type { BatchManifest } from '../core/batch.ts';
import { ArgumentError, SpecError } from '../core/errors.ts';
import { parseJsonText } from '../core/json-text.ts';
import { readText, writeFilesTogether } from './files.ts';

/** The copy of the manifest in a batch folder. */
export const MANIFEST_COPY = 'manifest.json';
/** The copy of the variations CSV in a batch folder (the copied manifest names it). */
export const CSV_COPY = 'variations.csv';
/** Format name of a result file. */
export const RESULT_FORMAT = 'gatesmith.batch-result';

/** A manifest file as read: its JSON, the CSV text it names (if any) and the validated manifest. */
export interface LoadedManifest {
  path: string;
  json: Record<string, unknown>;
  csvText?: string;
  manifest: BatchManifest;
}

/** What results/NAME.json holds. */
export interface BatchResult {
  format: typeof RESULT_FORMAT;
  version: 1;
  name: string;
  status: 'done' | 'failed';
  set: Record<string, unknown>;
  meanInfidelity: number | null;
  worstInfidelity: number | null;
  /** The pulse file, relative to the batch folder. */
  pulse: string | null;
  iterations?: number;
  stopReason?: string;
  elapsedS?: number;
  error?: string;
}

/** Reads and validates a manifest file; the CSV it names is read relative to it. */
export function loadManifest(path: string): LoadedManifest {
  const text = readText(path, 'manifest file', 'a batch manifest (JSON text)');
  let json: unknown;
  try {
    json = parseJsonText(text);
  } catch (error) {
    throw new ArgumentError(`${path}: ${(error as Error).message}`);
  }
  let csvText: string | undefined;
  const readCsv = (relative: string): { text: string; name: string } => {
    // Named as a path from here, like the manifest, so that the user can open it as named.
    const name = join(dirname(path), relative);
    csvText = readText(name, 'variations CSV', 'a CSV table (text)');
    return { text: csvText, name };
  };
  try {
    const manifest = parseManifest(json, path, readCsv);
    return { path, json: json as Record<string, unknown>, csvText, manifest };
  } catch (error) {
    // The manifest's own fields are named with the file; CSV and variation errors already name theirs.
    if (error instanceof SpecError) throw new ArgumentError(`${path}: ${error.message}`);
    throw error;
  }
}

/** The manifest copy of a batch folder, with errors that say what the folder lacks. */
export function loadBatchFolder(dir: string): LoadedManifest {
  if (!existsSync(dir)) throw new ArgumentError(`DIR ${dir}: no such folder`);
  if (!statSync(dir).isDirectory()) throw new ArgumentError(`DIR ${dir}: is a file, not a batch folder`);
  const copy = join(dir, MANIFEST_COPY);
  if (!existsSync(copy)) {
    throw new ArgumentError(`DIR ${dir}: has no ${MANIFEST_COPY}, so it is not a batch folder (the first "gatesmith batch run MANIFEST --out ${dir}" writes it)`);
  }
  return loadManifest(copy);
}

/** results/NAME.json in a batch folder. */
export function resultPath(dir: string, name: string): string {
  return join(dir, 'results', `${name}.json`);
}

/** pulses/NAME.json, relative to the batch folder (as results record it). */
export function pulseFile(name: string): string {
  return `pulses/${name}.json`;
}

/** A variation's result, or null when there is none (or it cannot be read: it is then redone). */
export function readResult(dir: string, name: string): BatchResult | null {
  const path = resultPath(dir, name);
  if (!existsSync(path)) return null;
  try {
    const r = parseJsonText(readText(path, 'result file', 'a batch result (JSON)')) as BatchResult;
    return r && r.format === RESULT_FORMAT && r.name === name && (r.status === 'done' || r.status === 'failed') ? r : null;
  } catch {
    return null;
  }
}

/** Writes a variation's pulse and then its result, each whole (a killed run leaves neither half-written). */
export function writeResult(dir: string, result: BatchResult, pulseText: string | null): void {
  const files = [];
  if (pulseText !== null) files.push({ path: join(dir, pulseFile(result.name)), data: pulseText });
  files.push({ path: resultPath(dir, result.name), data: JSON.stringify(result, null, 2) + '\n' });
  writeFilesTogether(files, '--out');
}

/**
 * Prepares the batch folder: creates it with results/ and pulses/, and writes the copy of the
 * manifest (and CSV) on the first run; on later runs checks that the copy describes the same
 * batch, so that results of two different manifests never mix.
 */
export function prepareBatchFolder(dir: string, loaded: LoadedManifest): void {
  if (existsSync(dir) && !statSync(dir).isDirectory()) throw new ArgumentError(`--out ${dir}: is a file, not a folder`);
  try {
    for (const sub of ['results', 'pulses']) mkdirSync(join(dir, sub), { recursive: true });
  } catch (error) {
    throw new ArgumentError(`--out ${dir}: cannot create the folder (${(error as Error).message})`);
  }
  const copyPath = join(dir, MANIFEST_COPY);
  if (existsSync(copyPath)) {
    const copy = loadManifest(copyPath);
    const difference = firstDifference(copy.manifest, loaded.manifest, loaded.path);
    if (difference !== null) {
      throw new ArgumentError(`--out ${dir}: holds the results of another batch: ${difference}; give another --out, or remove the folder to start over`);
    }
    return;
  }
  const json = loaded.manifest.variationsCsv !== undefined ? { ...loaded.json, variationsCsv: CSV_COPY } : loaded.json;
  const files = [];
  if (loaded.csvText !== undefined) files.push({ path: join(dir, CSV_COPY), data: loaded.csvText });
  files.push({ path: copyPath, data: JSON.stringify(json, null, 2) + '\n' });
  writeFilesTogether(files, '--out');
}

/** Removes temporary files a killed run left for these variations (hidden names ending in .tmp). */
export function removeStaleTemporaries(dir: string, names: string[]): void {
  const wanted = new Set(names.map((n) => `${n}.json`));
  for (const sub of ['results', 'pulses']) {
    const folder = join(dir, sub);
    for (const file of readdirSync(folder)) {
      const m = /^\.(.+)\.[\w-]+\.(tmp|old)$/.exec(file);
      if (m && wanted.has(m[1])) {
        try {
          unlinkSync(join(folder, file));
        } catch {
          // another process removed it first
        }
      }
    }
  }
}

function firstDifference(copy: BatchManifest, given: BatchManifest, givenPath: string): string | null {
  const there = "the folder's manifest.json";
  if (JSON.stringify(copy.base) !== JSON.stringify(given.base)) return `the base spec of ${givenPath} differs from ${there}`;
  if (copy.variations.length !== given.variations.length) {
    return `${givenPath} has ${given.variations.length} variations, ${there} ${copy.variations.length}`;
  }
  for (let k = 0; k < copy.variations.length; k++) {
    const [x, y] = [copy.variations[k], given.variations[k]];
    if (x.name !== y.name) return `variation ${k + 1} is "${y.name}" in ${givenPath}, "${x.name}" in ${there}`;
    if (JSON.stringify(x.set) !== JSON.stringify(y.set)) return `the overrides of variation "${y.name}" differ between ${givenPath} and ${there}`;
  }
  return null;
}
