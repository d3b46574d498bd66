// The samples of a pulse as a table an engineer can read and copy: sample index, the start
// of its hold, I, Q, amplitude and phase, each column in one engineering unit named in its
// header, so that the numbers paste into a spreadsheet as numbers.
import type { Pulse } from '../core/types.ts';
import { engineeringUnit } from './units.ts';

/** The unit of each column: symbol and the power of ten it divides by. */
export interface SampleUnits {
  time: { symbol: string; scale: number };
  frequency: { symbol: string; scale: number };
}

/** Units that keep the largest time and the largest amplitude between 1 and 1000. */
export function sampleUnits(pulse: Pick<Pulse, 'dt' | 'i' | 'q'>): SampleUnits {
  let peak = 0;
  for (let k = 0; k < pulse.i.length; k++) peak = Math.max(peak, Math.hypot(pulse.i[k], pulse.q[k]));
  const t = engineeringUnit(pulse.i.length * pulse.dt, 'time')!;
  const f = engineeringUnit(peak || 1e6, 'frequency')!;
  return { time: { symbol: t.symbol, scale: 10 ** t.exponent }, frequency: { symbol: f.symbol, scale: 10 ** f.exponent } };
}

/** The column headers, with their units. */
export function sampleHeader(units: SampleUnits): string[] {
  const f = units.frequency.symbol;
  return ['sample', `start (${units.time.symbol})`, `I (${f})`, `Q (${f})`, `amplitude (${f})`, 'phase (°)'];
}

// Ten significant digits: enough for any DAC, and free of the binary noise of k * dt / scale.
const number = (x: number): string => String(Number(x.toPrecision(10)));

/**
 * One row: sample k holds (I_k, Q_k) over [k dt, (k+1) dt), so its start is k dt. The phase
 * of a sample of zero amplitude is undefined and left empty.
 */
export function sampleRow(pulse: Pick<Pulse, 'dt' | 'i' | 'q'>, k: number, units: SampleUnits): string[] {
  const i = pulse.i[k];
  const q = pulse.q[k];
  const amplitude = Math.hypot(i, q);
  const f = units.frequency.scale;
  return [
    String(k),
    number((k * pulse.dt) / units.time.scale),
    number(i / f),
    number(q / f),
    number(amplitude / f),
    amplitude === 0 ? '' : number((Math.atan2(q, i) * 180) / Math.PI),
  ];
}

/** Rows built per slice of the copy, so that no slice holds the page for long. */
export const ROWS_PER_SLICE = 5000;

/** The whole table as TSV or CSV text (header line first), built in slices that yield to the page between them. */
export async function samplesText(pulse: Pick<Pulse, 'dt' | 'i' | 'q'>, separator: '\t' | ',', units = sampleUnits(pulse)): Promise<string> {
  const lines = [sampleHeader(units).join(separator)];
  for (let start = 0; start < pulse.i.length; start += ROWS_PER_SLICE) {
    if (start > 0) await new Promise((resolve) => setTimeout(resolve, 0));
    const end = Math.min(pulse.i.length, start + ROWS_PER_SLICE);
    for (let k = start; k < end; k++) lines.push(sampleRow(pulse, k, units).join(separator));
  }
  return lines.join('\n') + '\n';
}
