// Node side of reading waveforms back: a path (with the FILE.json description beside npy
// and raw files found by itself) or bytes with a name, into a Pulse.
import { existsSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { ArgumentError } from '../../core/errors.ts';
import { parseJsonText } from '../../core/json-text.ts';
import type { Pulse } from '../../core/types.ts';
import { DESCRIPTION_KIND } from './description.ts';
import { readWaveform, type ReadWaveformOptions } from './read.ts';

/** Bytes of a file with its name (the name picks the format when the bytes do not). */
export interface NamedBytes {
  bytes: Uint8Array;
  name: string;
}

/**
 * Read any exported waveform (csv, npy, raw, wav, json) or pulse JSON into a Pulse at the
 * instrument sample period. Given a path, the description FILE.json beside an .npy or raw
 * file is read too; given the description file itself, its data file is read.
 */
export async function readWaveformFile(input: string | NamedBytes, options: ReadWaveformOptions = {}): Promise<Pulse> {
  if (typeof input !== 'string') return readWaveform(input.bytes, input.name, options);
  let path = input;
  let bytes = await readBytes(path);
  let sidecar = options.sidecar;
  if (path.endsWith('.json') && isDataDescription(bytes) && existsSync(path.slice(0, -5))) {
    // The description of an npy or raw file was named: read the data it describes.
    sidecar = bytes;
    path = path.slice(0, -5);
    bytes = await readBytes(path);
  } else if (sidecar === undefined && existsSync(`${path}.json`)) {
    sidecar = await readBytes(`${path}.json`);
  }
  return readWaveform(bytes, basename(path), { ...options, sidecar });
}

async function readBytes(path: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(path));
  } catch (error) {
    const code = (error as { code?: string }).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : String(error);
    throw new ArgumentError(`waveform file ${path}: cannot read (${reason})`);
  }
}

// A waveform description (written beside npy and raw data) rather than a pulse JSON.
function isDataDescription(bytes: Uint8Array): boolean {
  try {
    const obj = parseJsonText(new TextDecoder().decode(bytes)) as Record<string, unknown>;
    return obj.kind === DESCRIPTION_KIND && obj.dt === undefined;
  } catch {
    return false;
  }
}
