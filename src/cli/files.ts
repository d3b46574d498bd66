// Reading and writing the command line's files, with errors that name the file and say
// what went wrong in words (exit code 1), never a stack trace.
import { existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { ArgumentError, PulseFormatError, SpecError } from '../core/errors.ts';
import { parseSpec, specJsonFromText } from '../core/spec.ts';
import type { Problem, Pulse } from '../core/types.ts';
import { resolveImpulseFile } from '../io/line-file.ts';
import { readPulse } from '../io/pulse.ts';

/** A spec file as given (parsed JSON, passed on to the API) and as validated. */
export interface LoadedSpec {
  json: unknown;
  problem: Problem;
}

/** Reads and validates a design spec file; errors carry the file name. */
export function loadSpec(path: string): LoadedSpec {
  const text = readText(path, 'spec');
  try {
    // A measured line response named by file is read relative to the spec.
    const json = resolveImpulseFile(specJsonFromText(text), (file) => readBytes(resolve(dirname(path), file)));
    return { json, problem: parseSpec(json) };
  } catch (error) {
    throw withFileName(error, path);
  }
}

/** Reads a pulse file; errors carry the file name. */
export function loadPulse(path: string): Pulse {
  const text = readText(path, 'pulse');
  try {
    return readPulse(text);
  } catch (error) {
    throw withFileName(error, path);
  }
}

/** Reads a pulse file or any exported waveform (csv, npy, raw + description, wav) as a Pulse. */
export async function loadWaveform(path: string): Promise<Pulse> {
  if (!existsSync(path)) readText(path, 'pulse'); // the usual "cannot read" error
  const { readWaveformFile } = await import('../io/export/read-file.ts');
  try {
    return await readWaveformFile(path);
  } catch (error) {
    throw withFileName(error, path);
  }
}

/** Fails early (before a long design) when a file could not be written to `path`. */
export function checkWritable(path: string, flag: string): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new ArgumentError(`${flag} ${path}: the folder ${dir} does not exist`);
  }
  if (existsSync(path) && statSync(path).isDirectory()) {
    throw new ArgumentError(`${flag} ${path}: is a folder, not a file`);
  }
}

/** Writes a text file, turning file-system failures into ArgumentErrors that name it. */
export function writeText(path: string, text: string, flag: string): void {
  try {
    writeFileSync(path, text);
  } catch (error) {
    throw new ArgumentError(`${flag} ${path}: cannot write (${systemReason(error)})`);
  }
}

function readBytes(path: string): Uint8Array {
  try {
    return readFileSync(path);
  } catch (error) {
    throw new ArgumentError(`cannot read ${path} (${systemReason(error)})`);
  }
}

function readText(path: string, what: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (error) {
    throw new ArgumentError(`${what} file ${path}: cannot read (${systemReason(error)})`);
  }
}

function systemReason(error: unknown): string {
  const code = (error as { code?: string }).code;
  const words: Record<string, string> = {
    ENOENT: 'no such file',
    EISDIR: 'it is a folder',
    EACCES: 'permission denied',
    ENOTDIR: 'a part of the path is not a folder',
  };
  return (code && words[code]) ?? (error instanceof Error ? error.message : String(error));
}

// Bad-input errors keep their class (and so the exit code) and gain the file's name.
function withFileName(error: unknown, path: string): unknown {
  if (error instanceof SpecError || error instanceof PulseFormatError) error.message = `${path}: ${error.message}`;
  return error;
}
