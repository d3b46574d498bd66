// Reading and writing the command line's files, with errors that name the file once and say
// what went wrong in words (exit code 1), never a stack trace. Every file is written to a
// temporary name beside it and renamed into place, so that a reader never sees half a file,
// and a data file with its description is replaced as a pair or not at all.
import { existsSync, readFileSync, renameSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { ArgumentError, PulseFormatError, SpecError } from '../core/errors.ts';
import { parseSpec, specJsonFromText } from '../core/spec.ts';
import type { Problem, Pulse } from '../core/types.ts';
import { resolveImpulseFile } from '../io/line-file.ts';
import type { CliIO } from './command.ts';
import { specUnitWarnings } from './unit-warnings.ts';

/** A spec file as given (parsed JSON, passed on to the API), as validated, and its unit warnings. */
export interface LoadedSpec {
  json: unknown;
  problem: Problem;
  warnings: string[];
}

/** Reads and validates a design spec file; errors carry the file name. */
export function loadSpec(path: string): LoadedSpec {
  const text = readText(path, 'spec file', 'a design spec (JSON text)');
  try {
    // A measured line response named by file is read relative to the spec.
    const json = resolveImpulseFile(specJsonFromText(text), (file) => readBytes(resolve(dirname(path), file), 'line response file'));
    const problem = parseSpec(json);
    return { json, problem, warnings: specUnitWarnings(problem).map((w) => `${path}: ${w}`) };
  } catch (error) {
    throw withFileName(error, path);
  }
}

/** Reads a pulse file or any exported waveform (csv, npy, raw + description, wav, json) as a Pulse. */
export async function loadWaveform(path: string): Promise<Pulse> {
  const bytes = readBytes(path, 'pulse file');
  // Text formats that turn out to be binary are described here rather than parsed as garbage.
  const head = String.fromCharCode(...bytes.subarray(0, 6));
  const binaryFormat = head === '\x93NUMPY' || head.startsWith('RIFF') || /\.(bin|raw|i16|dat)$/i.test(path);
  if (!binaryFormat && isBinary(bytes)) {
    throw new ArgumentError(`pulse file ${path}: ${describeBinary(bytes)}, not a pulse or waveform this program reads (pulse JSON, csv, npy, raw .bin with its .json, wav)`);
  }
  const { readWaveformFile } = await import('../io/export/read-file.ts');
  try {
    return await readWaveformFile(path);
  } catch (error) {
    throw withFileName(error, path);
  }
}

/** Fails early (before a long job) when `path` cannot be written, or would write over one of `inputs`. */
export function checkWritable(path: string, flag: string, inputs: string[] = []): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new ArgumentError(`${flag} ${path}: the folder ${dir} does not exist`);
  }
  if (existsSync(path) && statSync(path).isDirectory()) {
    throw new ArgumentError(`${flag} ${path}: is a folder, not a file`);
  }
  for (const input of inputs) {
    if (sameFile(path, input)) throw new ArgumentError(`${flag} ${path}: is the input ${input}; refusing to write over it (choose another name)`);
  }
}

/** The extensions of the formats this program writes, and what each says a file holds. */
const EXTENSION_MEANS: Record<string, string> = {
  '.json': 'JSON',
  '.csv': 'CSV',
  '.npy': 'NumPy .npy',
  '.wav': 'WAV',
  '.bin': 'raw binary',
  '.raw': 'raw binary',
  '.i16': 'raw binary',
  '.dat': 'raw binary',
};

/** Refuses an output name whose extension says another format than the one written (an unknown extension is left alone). */
export function checkOutputName(path: string, flag: string, allowed: string[], what: string): void {
  const ext = extname(path).toLowerCase();
  if (EXTENSION_MEANS[ext] === undefined || allowed.includes(ext)) return;
  throw new ArgumentError(
    `${flag} ${path}: the extension ${ext} says ${EXTENSION_MEANS[ext]}, but this writes ${what}; name it ${basename(path, extname(path))}${allowed[0]}`,
  );
}

/** One file to write: where, and its bytes or text. */
export interface FileToWrite {
  path: string;
  data: string | Uint8Array;
}

/**
 * Writes files so that all are in place or none is: each goes to a temporary name beside
 * it, old files are set aside, the new ones renamed in, and on any failure the old ones
 * come back. Errors are ArgumentErrors naming the file and the flag.
 */
export function writeFilesTogether(files: FileToWrite[], flag: string): void {
  const tag = `${process.pid}-${Date.now().toString(36)}`;
  const staged = files.map((f) => ({ ...f, temp: join(dirname(f.path), `.${basename(f.path)}.${tag}.tmp`), aside: join(dirname(f.path), `.${basename(f.path)}.${tag}.old`) }));
  const removeQuietly = (p: string): void => {
    try {
      unlinkSync(p);
    } catch {
      // already gone
    }
  };
  let current = files[0].path;
  try {
    for (const f of staged) {
      current = f.path;
      writeFileSync(f.temp, f.data);
    }
  } catch (error) {
    for (const f of staged) removeQuietly(f.temp);
    throw new ArgumentError(`${flag} ${current}: cannot write (${systemReason(error)})`);
  }
  const setAside: typeof staged = [];
  const placed: typeof staged = [];
  try {
    for (const f of staged) {
      current = f.path;
      if (existsSync(f.path)) {
        renameSync(f.path, f.aside);
        setAside.push(f);
      }
    }
    for (const f of staged) {
      current = f.path;
      renameSync(f.temp, f.path);
      placed.push(f);
    }
  } catch (error) {
    for (const f of placed) removeQuietly(f.path);
    for (const f of setAside) renameSync(f.aside, f.path);
    for (const f of staged) removeQuietly(f.temp);
    throw new ArgumentError(`${flag} ${current}: cannot write (${systemReason(error)}); the files there are unchanged`);
  }
  for (const f of setAside) removeQuietly(f.aside);
}

/** Prints warnings on stderr, one line each. */
export function printWarnings(io: CliIO, warnings: string[]): void {
  for (const w of warnings) io.stderr(`warning: ${w}\n`);
}

function sameFile(a: string, b: string): boolean {
  if (resolve(a) === resolve(b)) return true;
  try {
    const sa = statSync(a), sb = statSync(b);
    return sa.ino === sb.ino && sa.dev === sb.dev;
  } catch {
    return false;
  }
}

function readBytes(path: string, what: string): Uint8Array {
  try {
    return readFileSync(path);
  } catch (error) {
    throw new ArgumentError(`${what} ${path}: cannot read (${systemReason(error)})`);
  }
}

/** A text file's content (UTF-8, a byte-order mark dropped later by the JSON reader); binary data is described, not shown. */
export function readText(path: string, what: string, expected: string): string {
  const bytes = readBytes(path, what);
  if (isBinary(bytes)) throw new ArgumentError(`${what} ${path}: ${describeBinary(bytes)}, not ${expected}`);
  return new TextDecoder().decode(bytes);
}

/** Bytes that are not UTF-8 text, or hold NUL or other control characters text files do not. */
function isBinary(bytes: Uint8Array): boolean {
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return true;
  }
  for (let k = 0; k < Math.min(bytes.length, 4096); k++) {
    const b = bytes[k];
    if (b < 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d && b !== 0x0c) return true;
  }
  return false;
}

/** "binary data (1234 bytes, a NumPy .npy file)". */
function describeBinary(bytes: Uint8Array): string {
  const head = String.fromCharCode(...bytes.subarray(0, 12));
  const kinds: [boolean, string][] = [
    [head.startsWith('\x93NUMPY'), 'a NumPy .npy file'],
    [head.startsWith('RIFF') && head.slice(8, 12) === 'WAVE', 'a WAV file'],
    [head.startsWith('PK\x03\x04'), 'a zip archive'],
    [head.startsWith('\x1f\x8b'), 'gzip data'],
    [head.startsWith('\x89PNG'), 'a PNG image'],
    [head.startsWith('%PDF'), 'a PDF document'],
  ];
  const kind = kinds.find(([match]) => match)?.[1];
  return `is binary data (${bytes.length} bytes${kind ? `, ${kind}` : ''})`;
}

function systemReason(error: unknown): string {
  const code = (error as { code?: string }).code;
  const words: Record<string, string> = {
    ENOENT: 'no such file',
    EISDIR: 'it is a folder',
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    ENOTDIR: 'a part of the path is not a folder',
    ENOSPC: 'the disk is full',
    EROFS: 'the file system is read-only',
  };
  return (code && words[code]) ?? (error instanceof Error ? error.message : String(error));
}

// Bad-input errors keep their class (and so the exit code) and name the file once: as the
// user typed it, in place of a bare file name a reader put there.
function withFileName(error: unknown, path: string): unknown {
  if (error instanceof SpecError || error instanceof PulseFormatError || (error instanceof Error && error.name === 'ExportError')) {
    const e = error as Error;
    let message = e.message;
    for (const prefix of [`${path}: `, `${basename(path)}: `]) if (message.startsWith(prefix)) message = message.slice(prefix.length);
    e.message = `${path}: ${message}`;
  }
  return error;
}
