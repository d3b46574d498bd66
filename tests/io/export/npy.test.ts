// Tests of src/io/export/npy.ts against NumPy's format documentation (numpy.lib.format,
// "NPY format", versions 1.0 and 2.0), the independent npm reader/writer npyjs, bytes
// written by NumPy 2.4.6's np.save, and NumPy itself when python3 with numpy is present.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { dump, parse } from 'npyjs';
import { describe, expect, it } from 'vitest';
import { PulseFormatError } from '../../../src/core/errors.ts';
import { readNpy, readNpyWaveform, writeNpy, writeNpyWaveform } from '../../../src/io/export/npy.ts';
import { waveformSamples } from '../../../src/io/export/playback.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { shapedPulse } from './helpers.ts';

const ascii = (text: string) => Array.from(text, (c) => c.charCodeAt(0));
const arrayBuffer = (bytes: Uint8Array) => bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
const fromHex = (hex: string) => Uint8Array.from(hex.match(/../g)!.map((h) => parseInt(h, 16)));

describe('writeNpy: the layout of NumPy format documentation, version 1.0', () => {
  const bytes = writeNpy({ descr: '<f8', shape: [3], data: new Float64Array([1, -2.5, 1e-9]) });
  const headerLength = bytes[8] | (bytes[9] << 8);
  const header = String.fromCharCode(...bytes.subarray(10, 10 + headerLength));

  it('starts with the magic string \\x93NUMPY and version 1.0', () => {
    expect(Array.from(bytes.subarray(0, 8))).toEqual([0x93, ...ascii('NUMPY'), 1, 0]);
  });
  it('pads the header with spaces and a newline so that 6 + 2 + 2 + HEADER_LEN is a multiple of 64', () => {
    expect((10 + headerLength) % 64).toBe(0);
    expect(header.endsWith('\n')).toBe(true);
    expect(/^[^\n]* *\n$/.test(header)).toBe(true);
  });
  it("writes the dict as Python's repr: {'descr': '<f8', 'fortran_order': False, 'shape': (3,), }", () => {
    expect(header.trimEnd()).toBe("{'descr': '<f8', 'fortran_order': False, 'shape': (3,), }");
  });
  it('stores the values little-endian after the header', () => {
    const view = new DataView(bytes.buffer, 10 + headerLength);
    expect([view.getFloat64(0, true), view.getFloat64(8, true), view.getFloat64(16, true)]).toEqual([1, -2.5, 1e-9]);
    expect(bytes.length).toBe(10 + headerLength + 24);
  });
});

describe('npyjs (independent reader and writer from npm)', () => {
  it('reads our float64 (n,) array to the same values, shape and dtype', () => {
    const data = new Float64Array([0, 1.5e7, -3.25e6, Number.MIN_VALUE, -0.1]);
    const parsed = parse(arrayBuffer(writeNpy({ descr: '<f8', shape: [5], data })));
    expect(parsed.dtype).toBe('f8');
    expect(parsed.shape).toEqual([5]);
    expect(parsed.fortranOrder).toBe(false);
    expect(Array.from(parsed.data as Float64Array)).toEqual(Array.from(data));
  });
  it('reads our int16 (n, 3) array of waveform codes to the same codes', () => {
    const waveform = exportWaveform(shapedPulse(8e6, 12, 4e-9), { sampleRate: 1e9, bits: 16, fullScale: 1e7, marker: true, granularity: 64 });
    const bytes = writeNpyWaveform(waveformSamples(waveform, 'codes'));
    const parsed = parse(arrayBuffer(bytes));
    expect(parsed.dtype).toBe('i2');
    expect(parsed.shape).toEqual([64, 3]);
    const flat = parsed.data as Int16Array;
    for (let n = 0; n < 64; n++) for (let c = 0; c < 3; c++) expect(flat[3 * n + c]).toBe(waveform.codes[c][n]);
  });
  it('writes arrays (npyjs.dump) that our reader reads to the same values', () => {
    const data = new Float64Array([1, 2, 3, 4, 5, 6]);
    const ours = readNpy(new Uint8Array(dump(data, [3, 2])), 'npyjs.npy');
    expect(ours.shape).toEqual([3, 2]);
    expect(Array.from(ours.data)).toEqual([1, 2, 3, 4, 5, 6]);
  });
});

describe('readNpy: headers built by hand, byte by byte, from the format documentation', () => {
  it('reads a version 1.0 int16 (2, 3) array', () => {
    // {'descr': '<i2', 'fortran_order': False, 'shape': (2, 3), } is 59 characters; 10 + 59 + 1
    // = 70, so 58 spaces and '\n' bring the total to 128: HEADER_LEN = 118 = 0x76.
    const dict = "{'descr': '<i2', 'fortran_order': False, 'shape': (2, 3), }";
    const header = [...ascii(dict), ...new Array(58).fill(0x20), 0x0a];
    expect(header.length).toBe(118);
    // Six int16 values little-endian: 1, -1, 256, -32767, 32767, 0.
    const data = [0x01, 0x00, 0xff, 0xff, 0x00, 0x01, 0x01, 0x80, 0xff, 0x7f, 0x00, 0x00];
    const bytes = Uint8Array.from([0x93, ...ascii('NUMPY'), 0x01, 0x00, 0x76, 0x00, ...header, ...data]);
    const array = readNpy(bytes, 'hand.npy');
    expect(array.descr).toBe('<i2');
    expect(array.shape).toEqual([2, 3]);
    expect(Array.from(array.data)).toEqual([1, -1, 256, -32767, 32767, 0]);
  });
  it('reads a version 2.0 header (uint32 HEADER_LEN) in Fortran order, returned in C order', () => {
    // 12-byte preamble + 58-character dict + '\n' = 71: 57 spaces give 128, HEADER_LEN = 116 = 0x74.
    const dict = "{'descr': '<f8', 'fortran_order': True, 'shape': (3, 2), }";
    const header = [...ascii(dict), ...new Array(57).fill(0x20), 0x0a];
    expect(12 + header.length).toBe(128);
    // Column-major storage of [[1, 4], [2, 5], [3, 6]]: 1, 2, 3, 4, 5, 6 as float64.
    const values = new Uint8Array(new Float64Array([1, 2, 3, 4, 5, 6]).buffer); // little-endian on every platform we run on
    const bytes = Uint8Array.from([0x93, ...ascii('NUMPY'), 0x02, 0x00, 0x74, 0x00, 0x00, 0x00, ...header, ...values]);
    const array = readNpy(bytes, 'hand-v2.npy');
    expect(array.shape).toEqual([3, 2]);
    expect(Array.from(array.data)).toEqual([1, 4, 2, 5, 3, 6]);
  });
});

describe('readNpy: files written by NumPy 2.4.6 np.save (bytes recorded as hex)', () => {
  it('reads an int16 (3, 2) array', () => {
    const hex =
      '934e554d5059010076007b276465736372273a20273c6932272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028332c2032292c207d20' +
      '2020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a0100feff2c010180ff7f0000';
    const array = readNpy(fromHex(hex), 'numpy-i2.npy');
    expect(array.shape).toEqual([3, 2]);
    expect(Array.from(array.data)).toEqual([1, -2, 300, -32767, 32767, 0]);
  });
  it('reads a float64 (4,) array', () => {
    const hex =
      '934e554d5059010076007b276465736372273a20273c6638272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028342c292c207d2020' +
      '202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a000000000000e03f0000000084d767c1df413adc11c5293e000000000000703d';
    expect(Array.from(readNpy(fromHex(hex), 'numpy-f8.npy').data)).toEqual([0.5, -1.25e7, 3.0e-9, 2 ** -40]);
  });
});

const hasNumpy = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' }).status === 0;

describe.skipIf(!hasNumpy)('NumPy itself (np.load) reads what we write', () => {
  it('gives the same float64 (n, 2) values', () => {
    const data = new Float64Array([0.25, -7e6, 1e-300, 3, -0, 123456.789]);
    const dir = mkdtempSync(join(tmpdir(), 'gatesmith-npy-'));
    const file = join(dir, 'ours.npy');
    writeFileSync(file, writeNpy({ descr: '<f8', shape: [3, 2], data }));
    const run = spawnSync('python3', ['-c', `import numpy, json; a = numpy.load(${JSON.stringify(file)}); print(json.dumps([list(a.shape), str(a.dtype), a.ravel().tolist()]))`], { encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    const [shape, dtype, values] = JSON.parse(run.stdout) as [number[], string, number[]];
    expect(shape).toEqual([3, 2]);
    expect(dtype).toBe('float64');
    expect(values).toEqual(Array.from(data));
  });
});

describe('readNpy refuses malformed files with a PulseFormatError', () => {
  const good = writeNpy({ descr: '<f8', shape: [2], data: new Float64Array([1, 2]) });
  const cases: [string, Uint8Array, RegExp][] = [
    ['a wrong magic string', Uint8Array.from([0x92, ...good.subarray(1)]), /magic/],
    ['an unknown version', Uint8Array.from([...good.subarray(0, 6), 9, 0, ...good.subarray(8)]), /version 9\.0/],
    ['truncated data', good.subarray(0, good.length - 3), /truncated/],
    ['extra bytes', Uint8Array.from([...good, 0, 0]), /needs 16 data bytes, the file has 18/],
    ['a truncated header', good.subarray(0, 40), /truncated/],
  ];
  for (const [what, bytes, message] of cases) {
    it(`such as ${what}`, () => {
      expect(() => readNpy(bytes, 'bad.npy')).toThrow(PulseFormatError);
      expect(() => readNpy(bytes, 'bad.npy')).toThrow(message);
    });
  }
  it('such as a dtype it does not read (float32) or wrong keys', () => {
    const f4 = Uint8Array.from(good);
    f4[String.fromCharCode(...good).indexOf("'<f8'") + 3] = '4'.charCodeAt(0);
    expect(() => readNpy(f4, 'f4.npy')).toThrow(/descr "<f4"/);
    const keys = Uint8Array.from(good);
    keys.set(ascii("'desc_'"), 11);
    expect(() => readNpy(keys, 'keys.npy')).toThrow(/keys/);
  });
  it('such as NaN among the values', () => {
    const bytes = writeNpy({ descr: '<f8', shape: [2], data: new Float64Array([1, NaN]) });
    expect(() => readNpy(bytes, 'nan.npy')).toThrow(/value 1 is NaN/);
  });
  it('such as a shape that does not match the waveform description', () => {
    const waveform = exportWaveform(shapedPulse(8e6, 4, 4e-9), { sampleRate: 1e9, bits: 14, fullScale: 1e7 });
    const bytes = writeNpy({ descr: '<i2', shape: [16], data: new Int16Array(16) });
    expect(() => readNpyWaveform(bytes, waveform.description, 'short.npy')).toThrow(/shape \(16\) does not match the description: \(16, 2\)/);
  });
});
