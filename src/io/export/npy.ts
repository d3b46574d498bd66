// NumPy .npy files, written and read by hand after NumPy's own format documentation
// (numpy.lib.format, "NPY format"): the magic string \x93NUMPY, a major and minor version
// byte, the header length (little-endian uint16 in version 1.0, uint32 in 2.0 and 3.0),
// then an ASCII Python dict literal {'descr': ..., 'fortran_order': ..., 'shape': ...}
// padded with spaces and ended by '\n' so that magic + version + length + header is a
// multiple of 64 bytes; the array's bytes follow.
import { ExportError, PulseFormatError } from '../../core/errors.ts';
import type { WaveformDescription } from './description.ts';
import { checkSamples, type WaveformSamples } from './playback.ts';

/** The element types this module writes and reads: little-endian float64 and int16. */
export type NpyDescr = '<f8' | '<i2';

/** A one- or two-dimensional array in C (row-major) order. */
export interface NpyArray {
  descr: NpyDescr;
  shape: number[];
  data: Float64Array | Int16Array;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93NUMPY
const ALIGN = 64;

/** The .npy bytes (version 1.0) of a C-order array. */
export function writeNpy(array: NpyArray): Uint8Array {
  const { descr, shape, data } = array;
  const count = shape.reduce((a, b) => a * b, 1);
  if (count !== data.length) throw new ExportError(`npy: shape (${shape.join(', ')}) holds ${count} values, the data has ${data.length}`);
  if ((descr === '<f8') !== (data instanceof Float64Array)) throw new ExportError(`npy: descr ${descr} does not match the data's element type`);
  // Python's repr of a tuple: "(3,)" for one element, "(3, 2)" for two.
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let header = `{'descr': '${descr}', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const preamble = MAGIC.length + 2 + 2;
  header += ' '.repeat((ALIGN - ((preamble + header.length + 1) % ALIGN)) % ALIGN) + '\n';
  const itemSize = descr === '<f8' ? 8 : 2;
  const out = new Uint8Array(preamble + header.length + count * itemSize);
  out.set(MAGIC, 0);
  out[6] = 1; // major version
  out[7] = 0; // minor version
  const view = new DataView(out.buffer);
  view.setUint16(8, header.length, true);
  for (let k = 0; k < header.length; k++) out[preamble + k] = header.charCodeAt(k);
  const base = preamble + header.length;
  for (let k = 0; k < count; k++) {
    if (descr === '<f8') view.setFloat64(base + 8 * k, data[k], true);
    else view.setInt16(base + 2 * k, data[k], true);
  }
  return out;
}

/** Read a .npy file of float64 or int16, one or two dimensions (C or Fortran order); the result is in C order. */
export function readNpy(bytes: Uint8Array, source = 'npy'): NpyArray {
  const fail = (why: string): never => {
    throw new PulseFormatError(`${source}: ${why}`);
  };
  if (bytes.length < 10 || MAGIC.some((b, k) => bytes[k] !== b)) fail('not a NumPy .npy file (the magic string \\x93NUMPY is missing)');
  const major = bytes[6];
  const minor = bytes[7];
  if (![1, 2, 3].includes(major) || minor !== 0) fail(`.npy version ${major}.${minor} is not one of 1.0, 2.0, 3.0`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const lengthBytes = major === 1 ? 2 : 4;
  if (bytes.length < 8 + lengthBytes) fail('truncated before the header length');
  const headerLength = major === 1 ? view.getUint16(8, true) : view.getUint32(8, true);
  const start = 8 + lengthBytes;
  if (bytes.length < start + headerLength) fail(`truncated: the header should be ${headerLength} bytes, the file ends after ${bytes.length - start}`);
  const headerBytes = bytes.subarray(start, start + headerLength);
  let header = '';
  if (major === 3) header = new TextDecoder().decode(headerBytes);
  else for (const b of headerBytes) header += String.fromCharCode(b);
  if (!header.endsWith('\n')) fail('the header does not end with a newline');
  const dict = parseHeader(header, fail);
  const keys = Object.keys(dict).sort().join(',');
  if (keys !== 'descr,fortran_order,shape') fail(`the header's keys are ${keys}; NumPy's are descr, fortran_order, shape`);
  const descr = dict.descr as NpyDescr;
  if (descr !== '<f8' && descr !== '<i2') fail(`descr ${JSON.stringify(descr)} is not read here; '<f8' (float64) or '<i2' (int16)`);
  if (typeof dict.fortran_order !== 'boolean') fail('fortran_order is not True or False');
  const shape = dict.shape;
  if (!Array.isArray(shape) || shape.length < 1 || shape.length > 2) fail(`shape ${JSON.stringify(shape)} is not (n,) or (n, channels)`);
  const dims = shape as number[];
  const count = dims.reduce((a, b) => a * b, 1);
  const itemSize = descr === '<f8' ? 8 : 2;
  const dataStart = start + headerLength;
  if (bytes.length - dataStart !== count * itemSize) {
    fail(`shape (${dims.join(', ')}) needs ${count * itemSize} data bytes, the file has ${bytes.length - dataStart} (truncated or mismatched)`);
  }
  const stored = descr === '<f8' ? new Float64Array(count) : new Int16Array(count);
  for (let k = 0; k < count; k++) {
    const v = descr === '<f8' ? view.getFloat64(dataStart + 8 * k, true) : view.getInt16(dataStart + 2 * k, true);
    if (!Number.isFinite(v)) fail(`value ${k} is ${v}; samples must be finite`);
    stored[k] = v;
  }
  if (!dict.fortran_order || dims.length === 1) return { descr, shape: dims, data: stored };
  // Fortran order stores column after column; turn it into rows.
  const [rows, cols] = dims;
  const data = descr === '<f8' ? new Float64Array(count) : new Int16Array(count);
  for (let r = 0; r < rows; r++) for (let c = 0; c < cols; c++) data[r * cols + c] = stored[c * rows + r];
  return { descr, shape: dims, data };
}

/** Header values: strings, booleans, whole numbers and tuples of whole numbers. */
type HeaderValue = string | boolean | number | number[];

/** A small reader of the Python dict literal NumPy writes (strings, True/False, tuples of ints). */
function parseHeader(text: string, fail: (why: string) => never): Record<string, HeaderValue> {
  let k = 0;
  const space = () => {
    while (k < text.length && /\s/.test(text[k])) k++;
  };
  const expect = (c: string) => {
    space();
    if (text[k] !== c) fail(`header: expected "${c}" at character ${k} of ${JSON.stringify(text.trim())}`);
    k++;
  };
  const integer = (): number => {
    space();
    const m = /^\d+L?/.exec(text.slice(k));
    if (!m) fail(`header: expected a whole number at character ${k}`);
    k += m![0].length;
    return Number(m![0].replace('L', ''));
  };
  const value = (): HeaderValue => {
    space();
    const c = text[k];
    if (c === "'" || c === '"') {
      const end = text.indexOf(c, k + 1);
      if (end < 0) fail('header: a string is not closed');
      const s = text.slice(k + 1, end);
      k = end + 1;
      return s;
    }
    if (text.startsWith('True', k)) {
      k += 4;
      return true;
    }
    if (text.startsWith('False', k)) {
      k += 5;
      return false;
    }
    if (c === '(') {
      k++;
      const items: number[] = [];
      space();
      while (text[k] !== ')') {
        items.push(integer());
        space();
        if (text[k] === ',') k++;
        else if (text[k] !== ')') fail(`header: expected "," or ")" in the shape at character ${k}`);
        space();
      }
      k++;
      return items;
    }
    if (/\d/.test(c ?? '')) return integer();
    return fail(`header: unexpected ${JSON.stringify(c ?? 'end')} at character ${k}`);
  };
  const dict: Record<string, HeaderValue> = {};
  expect('{');
  space();
  while (text[k] !== '}') {
    const key = value();
    if (typeof key !== 'string') fail('header: a dict key is not a string');
    expect(':');
    dict[key as string] = value();
    space();
    if (text[k] === ',') k++;
    else if (text[k] !== '}') fail(`header: expected "," or "}" at character ${k}`);
    space();
    if (k >= text.length) fail('header: the dict is not closed');
  }
  k++;
  if (text.slice(k).trim() !== '') fail('header: text after the dict');
  return dict;
}

/** The .npy of waveform samples: shape (n,) for one channel, (n, channels) otherwise; int16 codes or float64 Hz. */
export function writeNpyWaveform(samples: WaveformSamples): Uint8Array {
  const n = samples.description.length;
  const c = samples.data.length;
  const data = samples.units === 'codes' ? new Int16Array(n * c) : new Float64Array(n * c);
  for (let s = 0; s < n; s++) for (let k = 0; k < c; k++) data[s * c + k] = samples.data[k][s];
  return writeNpy({ descr: samples.units === 'codes' ? '<i2' : '<f8', shape: c === 1 ? [n] : [n, c], data });
}

/** Read waveform samples from a .npy; the file holds only the array, so its description comes from beside it. */
export function readNpyWaveform(bytes: Uint8Array, description: WaveformDescription, source = 'npy'): WaveformSamples {
  const array = readNpy(bytes, source);
  const c = description.channels.length;
  const [n, cols = 1] = array.shape;
  if (n !== description.length || cols !== c || (array.shape.length === 1) !== (c === 1)) {
    const want = c === 1 ? `(${description.length},)` : `(${description.length}, ${c})`;
    throw new PulseFormatError(`${source}: shape (${array.shape.join(', ')}) does not match the description: ${want} for channels ${description.channels.join(', ')}`);
  }
  const units = array.descr === '<i2' ? 'codes' : 'hz';
  const data = description.channels.map(() => (units === 'codes' ? new Int16Array(n) : new Float64Array(n)));
  for (let s = 0; s < n; s++) for (let k = 0; k < c; k++) data[k][s] = array.data[s * c + k];
  return checkSamples({ description, units, data }, source);
}
