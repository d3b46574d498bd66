// Robustness-map files: CSV (a '#' commented header, one header row, then one row per grid
// point: detuning_hz, amplitude_error, infidelity) and JSON (the grid axes, the values in
// the map's row-major order and the summary figures). Doubles are written exactly.
import type { RobustnessMap } from '../core/api.ts';
import { axisValues } from '../core/grid.ts';
import type { RobustnessSummary } from '../core/robustness.ts';
import type { Target } from '../core/types.ts';
import { targetJson } from './target-json.ts';

/** The `format` name of a JSON map file. */
export const MAP_FORMAT = 'gatesmith.robustness-map';

/** The JSON map file version this code writes. */
export const MAP_VERSION = 1;

/** The CSV column names, in order. */
export const MAP_COLUMNS = ['detuning_hz', 'amplitude_error', 'infidelity'] as const;

/** What a map file says about where it came from. */
export interface MapContext {
  pulseName: string;
  target: Target;
  targetNote: string | null;
}

const FIGURE = 'infidelity 1 - F per grid point (gate: F = |Tr(V^dag U)|^2 / 4, phase-insensitive; state: F = |<to|U|from>|^2)';

/** The map as CSV text, detuning varying fastest (the map's own order). */
export function writeMapCsv(map: RobustnessMap, context: MapContext): string {
  const { detuning: d, amplitudeError: a } = map;
  const lines = [
    '# gatesmith robustness map, CSV',
    `# pulse: ${oneLine(context.pulseName)}`,
    `# target: ${JSON.stringify(targetJson(context.target))}`,
    ...(context.targetNote ? [`# note: ${oneLine(context.targetNote)}`] : []),
    `# figure: ${FIGURE}`,
    `# grid: detuning ${d.min}..${d.max} Hz in ${d.points} points x amplitude error ${a.min}..${a.max} (relative) in ${a.points} points; detuning varies fastest`,
    [...MAP_COLUMNS, ...(map.leakage ? ['leakage'] : [])].join(','),
  ];
  const dv = axisValues(d);
  const av = axisValues(a);
  const rows: string[] = new Array(map.infidelity.length);
  for (let ai = 0; ai < a.points; ai++) {
    for (let di = 0; di < d.points; di++) {
      const j = ai * d.points + di;
      rows[j] = `${dv[di]},${av[ai]},${map.infidelity[j]}` + (map.leakage ? `,${map.leakage[j]}` : '');
    }
  }
  return lines.join('\n') + '\n' + rows.join('\n') + '\n';
}

/** The map and its summary as JSON text. */
export function writeMapJson(map: RobustnessMap, context: MapContext, summary: RobustnessSummary): string {
  const doc = {
    format: MAP_FORMAT,
    version: MAP_VERSION,
    pulse: context.pulseName,
    target: targetJson(context.target),
    targetNote: context.targetNote,
    figure: FIGURE,
    layout: 'row-major: infidelity[amplitudeErrorIndex * detuning.points + detuningIndex]',
    detuning: { ...map.detuning, unit: 'Hz' },
    amplitudeError: { ...map.amplitudeError, unit: 'relative' },
    infidelity: Array.from(map.infidelity),
    ...(map.leakage ? { leakage: Array.from(map.leakage) } : {}),
    summary: { ...summary, targetGiven: targetJson(summary.targetGiven), targetUsed: targetJson(summary.targetUsed) },
  };
  return JSON.stringify(doc, null, 2) + '\n';
}

function oneLine(text: string): string {
  return text.replace(/[\r\n]+/g, ' ');
}
