// One door to every waveform container, so that the command line and the app write the
// same bytes for the same waveform and read every format back the same way.
import { parseJsonText } from '../../core/json-text.ts';
import { ExportError, PulseFormatError } from '../../core/errors.ts';
import type { PulseMetadata } from '../../core/types.ts';
import { readCsv, writeCsv } from './csv.ts';
import { parseWaveformDescription, type WaveformDescription } from './description.ts';
import { readJsonWaveform, writeJsonWaveform } from './json.ts';
import { readNpyWaveform, writeNpyWaveform } from './npy.ts';
import { waveformSamples, type SampleUnits, type WaveformSamples } from './playback.ts';
import { readRaw, writeRaw } from './raw.ts';
import { sha256Hex, type Sha256 } from './sha256.ts';
import { readWav, writeWav } from './wav.ts';
import type { ExportedWaveform } from './waveform.ts';

/** The containers offered. */
export const WAVEFORM_FORMATS = ['csv', 'npy', 'raw', 'wav', 'json'] as const;

/** One of WAVEFORM_FORMATS. */
export type WaveformFormat = (typeof WAVEFORM_FORMATS)[number];

/** The units each format can hold; the first is its default. */
export const FORMAT_UNITS: Record<WaveformFormat, SampleUnits[]> = {
  csv: ['codes', 'hz'],
  npy: ['codes', 'hz'],
  raw: ['codes'],
  wav: ['codes'],
  json: ['hz'],
};

/** File name extension and media type of each format. */
export const FORMAT_FILES: Record<WaveformFormat, { extension: string; mediaType: string }> = {
  csv: { extension: '.csv', mediaType: 'text/csv' },
  npy: { extension: '.npy', mediaType: 'application/octet-stream' },
  raw: { extension: '.bin', mediaType: 'application/octet-stream' },
  wav: { extension: '.wav', mediaType: 'audio/wav' },
  json: { extension: '.json', mediaType: 'application/json' },
};

/** Options of encodeWaveform. */
export interface EncodeOptions {
  /** Codes or Hz where the format offers both (csv, npy); default codes. */
  units?: SampleUnits;
  /** SHA-256 for the raw description (default crypto.subtle). */
  sha256?: Sha256;
  /** Extra metadata for the pulse JSON (a name, ...). */
  metadata?: PulseMetadata;
}

/** A written waveform: the file's bytes and, for npy and raw, the JSON description written beside it as FILE.json. */
export interface EncodedWaveform {
  format: WaveformFormat;
  units: SampleUnits;
  bytes: Uint8Array;
  sidecar: Uint8Array | null;
}

/** The bytes of a waveform in a format. */
export async function encodeWaveform(waveform: ExportedWaveform, format: WaveformFormat, options: EncodeOptions = {}): Promise<EncodedWaveform> {
  if (!WAVEFORM_FORMATS.includes(format)) {
    throw new ExportError(`format: ${JSON.stringify(format)} is not allowed; one of ${WAVEFORM_FORMATS.join(', ')}`);
  }
  const allowed = FORMAT_UNITS[format];
  const units = options.units ?? allowed[0];
  if (!allowed.includes(units)) {
    throw new ExportError(`units: ${JSON.stringify(units)} is not allowed for ${format}; ${allowed.map((u) => JSON.stringify(u)).join(' or ')}`);
  }
  // The JSON pulse converts codes to Hz itself, from the exact codes.
  const samples = waveformSamples(waveform, format === 'json' ? 'codes' : units);
  switch (format) {
    case 'csv':
      return { format, units, bytes: writeCsv(samples), sidecar: null };
    case 'npy':
      return { format, units, bytes: writeNpyWaveform(samples), sidecar: descriptionBytes(samples.description, units) };
    case 'raw': {
      const { data, description } = await writeRaw(samples, options.sha256 ?? sha256Hex);
      return { format, units, bytes: data, sidecar: description };
    }
    case 'wav':
      return { format, units, bytes: writeWav(samples), sidecar: null };
    case 'json':
      return { format, units, bytes: writeJsonWaveform(samples, options.metadata), sidecar: null };
  }
}

/** The JSON description written beside an .npy (the array alone does not say its sample rate or calibration). */
function descriptionBytes(d: WaveformDescription, units: SampleUnits): Uint8Array {
  return new TextEncoder().encode(JSON.stringify({ ...d, units }, null, 2) + '\n');
}

/** Options of decodeWaveform. */
export interface DecodeOptions {
  /** The JSON description written beside the file (needed for npy and raw). */
  sidecar?: Uint8Array | string;
  /** A description given directly, for an .npy or WAV that has none. */
  description?: WaveformDescription;
  sha256?: Sha256;
}

/** The format of a file, from its first bytes, else its name. */
export function detectFormat(bytes: Uint8Array, name: string): WaveformFormat {
  const head = String.fromCharCode(...bytes.subarray(0, 6));
  if (head === '\x93NUMPY') return 'npy';
  if (head.startsWith('RIFF')) return 'wav';
  const lower = name.toLowerCase();
  if (/\.(bin|raw|i16|dat)$/.test(lower)) return 'raw';
  const first = new TextDecoder().decode(bytes.subarray(0, 64)).trimStart()[0];
  if (first === '#' || lower.endsWith('.csv')) return 'csv';
  if (first === '{' || lower.endsWith('.json')) return 'json';
  throw new PulseFormatError(`${name}: not a waveform file this program writes (csv, npy, raw .bin with its .json, wav, json)`);
}

/** Read the samples of any format written by encodeWaveform. */
export async function decodeWaveform(bytes: Uint8Array, name: string, options: DecodeOptions = {}): Promise<WaveformSamples> {
  const format = detectFormat(bytes, name);
  const sidecarObject = (): unknown => {
    const text = typeof options.sidecar === 'string' ? options.sidecar : new TextDecoder().decode(options.sidecar);
    try {
      return parseJsonText(text);
    } catch (error) {
      throw new PulseFormatError(`${name}.json (the description beside ${name}): ${(error as Error).message}`);
    }
  };
  switch (format) {
    case 'csv':
      return readCsv(bytes, name);
    case 'npy': {
      const description = options.sidecar !== undefined ? parseWaveformDescription(sidecarObject(), `${name}.json`) : options.description;
      if (!description) throw new PulseFormatError(`${name}: an .npy holds only the array; its description (${name}.json, written beside it) is needed`);
      return readNpyWaveform(bytes, description, name);
    }
    case 'raw':
      if (options.sidecar === undefined) throw new PulseFormatError(`${name}: raw data needs its JSON description (${name}.json, written beside it)`);
      return readRaw(bytes, sidecarObject() as object, name, options.sha256 ?? sha256Hex);
    case 'wav':
      return readWav(bytes, name, options.description);
    case 'json':
      return readJsonWaveform(bytes, name);
  }
}
