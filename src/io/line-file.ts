// A measured impulse response of the line from a file: CSV (one value per fine step, one
// per row; `#` comments and one header row allowed) or NumPy .npy (a float64 array of
// shape (n,) or (n, 1)). Values are per fine step of dt / oversample from lag 0; the spec
// parser normalises them to unit gain. The command line resolves `"file"` relative to the
// spec; the app's upload calls `readImpulseBytes` and puts the values in the spec.
import { PulseFormatError, SpecError } from '../core/errors.ts';
import { readNpy } from './export/npy.ts';

/** The values of an impulse-response file's bytes, by its name's extension (.csv or .npy). */
export function readImpulseBytes(bytes: Uint8Array, name: string): number[] {
  const lower = name.toLowerCase();
  let values: number[];
  if (lower.endsWith('.npy')) {
    const array = readNpy(bytes, name);
    if (array.shape.length === 2 && array.shape[1] !== 1) {
      throw new PulseFormatError(`${name}: shape (${array.shape.join(', ')}) is not allowed; an impulse response is one column, shape (n,) or (n, 1)`);
    }
    values = Array.from(array.data);
  } else if (lower.endsWith('.csv') || lower.endsWith('.txt')) {
    values = readImpulseCsv(new TextDecoder().decode(bytes), name);
  } else {
    throw new PulseFormatError(`${name}: the file type is not allowed; an impulse response is read from .csv (one value per row) or .npy (float64)`);
  }
  if (values.length === 0) throw new PulseFormatError(`${name}: holds no values; give one value per fine step`);
  values.forEach((v, k) => {
    if (!Number.isFinite(v)) throw new PulseFormatError(`${name}: value ${k + 1} is ${v}; every value must be a finite number`);
  });
  return values;
}

/** One number per row; `#` lines skipped, a first row that is not a number taken as a header. */
export function readImpulseCsv(text: string, name = 'csv'): number[] {
  const values: number[] = [];
  let row = 0;
  for (const raw of text.split(/\r?\n/)) {
    row++;
    const line = raw.trim();
    if (line === '' || line.startsWith('#')) continue;
    if (line.includes(',') || line.includes(';') || /\s/.test(line)) {
      throw new PulseFormatError(`${name}: row ${row} "${line.slice(0, 40)}" has more than one column; give one value per row`);
    }
    const v = Number(line);
    if (line === '' || Number.isNaN(v)) {
      if (values.length === 0 && row === firstDataRow(text)) continue; // the header
      throw new PulseFormatError(`${name}: row ${row} "${line.slice(0, 40)}" is not a number`);
    }
    values.push(v);
  }
  return values;
}

function firstDataRow(text: string): number {
  const rows = text.split(/\r?\n/);
  for (let k = 0; k < rows.length; k++) {
    const t = rows[k].trim();
    if (t !== '' && !t.startsWith('#')) return k + 1;
  }
  return 0;
}

/**
 * A spec's JSON with a line impulse `"file"` replaced by its values (the file name kept
 * beside them); `read` gives a file's bytes by the name as written in the spec.
 */
export function resolveImpulseFile(json: unknown, read: (file: string) => Uint8Array): unknown {
  const impulse = (json as { line?: { response?: { impulse?: { file?: unknown; values?: unknown } } } })?.line?.response?.impulse;
  if (!impulse || typeof impulse.file !== 'string' || impulse.values !== undefined) return json;
  let values: number[];
  try {
    values = readImpulseBytes(read(impulse.file), impulse.file);
  } catch (error) {
    const why = error instanceof Error ? error.message : String(error);
    throw new SpecError('line.response.impulse.file', impulse.file, `a readable .csv or .npy file of the impulse response (${why})`);
  }
  const spec = json as { line: { response: object } };
  return { ...spec, line: { ...spec.line, response: { impulse: { file: impulse.file, values } } } };
}
