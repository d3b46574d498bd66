// CSV waveform files: a commented header ("# key: JSON value" lines holding the
// description, plus plain-language lines on units and calibration), one header row, then
// one row per sample: time_s and each channel in DAC codes or in Hz.
import { PulseFormatError } from '../../core/errors.ts';
import { parseWaveformDescription, type ChannelName, type WaveformDescription } from './description.ts';
import { checkSamples, type SampleUnits, type WaveformSamples } from './playback.ts';

/** The header row's name of a channel column. */
function columnName(name: ChannelName, units: SampleUnits): string {
  return name === 'marker' ? 'marker' : `${name}_${units === 'codes' ? 'code' : 'hz'}`;
}

/** The CSV text of waveform samples, as UTF-8 bytes. */
export function writeCsv(samples: WaveformSamples): Uint8Array {
  const d = samples.description;
  const unit = samples.units === 'codes' ? 'signed DAC codes' : 'Hz (Rabi frequency, already quantised: code * fullScaleHz / codeMax)';
  const lines = [
    '# gatesmith waveform, CSV',
    `# units - time_s in seconds (sample n starts at n / sampleRateHz); channels in ${unit}; marker 1 while the pulse plays`,
    `# calibration - full-scale code ${d.codeMax} = ${d.fullScaleHz} Hz Rabi frequency (${d.bits}-bit signed DAC)`,
    `# padding - ${d.padBefore} zero samples before and ${d.padAfter} after the pulse, length ${d.length}`,
    `# drive at the qubit - ${d.driveAtQubit}`,
    ...Object.entries({ ...d, units: samples.units }).map(([key, value]) => `# ${key}: ${JSON.stringify(value)}`),
    ['time_s', ...d.channels.map((c) => columnName(c, samples.units))].join(','),
  ];
  const rows: string[] = new Array(d.length);
  for (let n = 0; n < d.length; n++) {
    let row = String(n / d.sampleRateHz);
    for (const x of samples.data) row += ',' + String(x[n]);
    rows[n] = row;
  }
  return new TextEncoder().encode(lines.join('\n') + '\n' + rows.join('\n') + '\n');
}

/** Read a CSV written by writeCsv; malformed input gives a PulseFormatError naming the line. */
export function readCsv(bytes: Uint8Array, source = 'CSV'): WaveformSamples {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new PulseFormatError(`${source}: not UTF-8 text`);
  }
  const lines = text.split(/\r?\n/);
  if (lines[lines.length - 1] === '') lines.pop();
  const fields: Record<string, unknown> = {};
  let k = 0;
  for (; k < lines.length && lines[k].startsWith('#'); k++) {
    const match = /^#\s*([A-Za-z][A-Za-z0-9]*):\s?(.*)$/.exec(lines[k]);
    if (!match) continue;
    try {
      fields[match[1]] = JSON.parse(match[2]);
    } catch {
      throw new PulseFormatError(`${source} line ${k + 1}: the value of "${match[1]}" is not JSON: ${match[2].slice(0, 40)}`);
    }
  }
  if (Object.keys(fields).length === 0) throw new PulseFormatError(`${source}: no "# key: value" header lines; is it a gatesmith CSV?`);
  const description: WaveformDescription = parseWaveformDescription(fields, source);
  const units = fields.units;
  if (units !== 'codes' && units !== 'hz') {
    throw new PulseFormatError(`${source}: header field units: ${JSON.stringify(units)} is not allowed; "codes" or "hz"`);
  }
  const expected = ['time_s', ...description.channels.map((c) => columnName(c, units))].join(',');
  if (lines[k] !== expected) {
    throw new PulseFormatError(`${source} line ${k + 1}: the column header is ${JSON.stringify(lines[k] ?? '(end of file)')}; expected ${expected}`);
  }
  const rows = lines.length - k - 1;
  if (rows !== description.length) {
    throw new PulseFormatError(`${source}: ${rows} sample rows; the header says length ${description.length} (truncated or mismatched file)`);
  }
  const channels = description.channels.length;
  const data = description.channels.map(() => (units === 'codes' ? new Int16Array(rows) : new Float64Array(rows)));
  const period = 1 / description.sampleRateHz;
  for (let n = 0; n < rows; n++) {
    const lineNo = k + 2 + n;
    const cells = lines[k + 1 + n].split(',');
    if (cells.length !== channels + 1) {
      throw new PulseFormatError(`${source} line ${lineNo}: ${cells.length} columns; expected ${channels + 1}`);
    }
    const values = cells.map((cell) => parseNumber(cell, source, lineNo));
    if (Math.abs(values[0] - n * period) > 1e-6 * period) {
      throw new PulseFormatError(`${source} line ${lineNo}: time_s ${cells[0]} is not sample ${n}'s time ${n * period} s`);
    }
    for (let c = 0; c < channels; c++) {
      const v = values[c + 1];
      if (units === 'codes' && !(Number.isInteger(v) && Math.abs(v) <= description.codeMax)) {
        throw new PulseFormatError(`${source} line ${lineNo}: ${cells[c + 1]} is not a DAC code (a whole number within ±${description.codeMax})`);
      }
      data[c][n] = v;
    }
  }
  return checkSamples({ description, units, data }, source);
}

function parseNumber(cell: string, source: string, lineNo: number): number {
  const text = cell.trim();
  // Number('') is 0 and Number('NaN') is NaN: both would slip through a plain conversion.
  const v = text === '' ? NaN : Number(text);
  if (!Number.isFinite(v)) throw new PulseFormatError(`${source} line ${lineNo}: ${JSON.stringify(cell)} is not a finite number`);
  return v;
}
