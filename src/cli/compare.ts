// `gatesmith compare SPEC PULSE... [--composites LIST]`: the summary figures of several
// pulses on one grid and one target, one row per pulse, best first by a chosen figure.
import { ArgumentError } from '../core/errors.ts';
import type { CompareRow, Comparison, SortFigure } from '../core/compare.ts';
import type { Problem, Pulse } from '../core/types.ts';
import { flagValue, optionsHelp, usageLine, type ArgSpec } from './args.ts';
import { REGION_FLAGS, formatGrid, formatWidth, percent, pulseName, regionOf, thresholdOf } from './analysis-flags.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { targetJson } from '../io/target-json.ts';
import { loadSpec, loadWaveform, printWarnings } from './files.ts';
import { formatFrequency, formatInfidelity, formatTarget, formatTime } from './format.ts';
import { describeLine } from '../core/line-spec.ts';

// Kept in step with SORT_FIGURES in src/core/compare.ts (checked by the tests); listed
// here so that --help needs no import of the core.
const SORTS = ['mean', 'worst', 'region-mean', 'region-worst', 'area', 'detuning-width', 'amplitude-width', 'duration', 'peak', 'pulse-area', 'energy'];

const ARGS: ArgSpec = {
  command: 'compare',
  positionals: ['SPEC', 'PULSE...'],
  flags: [
    { name: 'composites', value: 'LIST', help: "published sequences to add, e.g. bb1,sk1,corpse (built under the spec's rabiMax and dt), or drag-gaussian,drag-cosine (the DRAG family, calibrated on the spec)" },
    { name: 'sort', value: SORTS.join('|'), help: 'figure that orders the rows, best first (default mean)' },
    ...REGION_FLAGS,
    { name: 'json', help: 'print {target, region, threshold, sortBy, rows} as JSON instead of a table' },
  ],
};

const HELP = `Compare pulses on one grid and one target: a table of their summary figures, one row
per pulse, best first.

Usage: ${usageLine(ARGS)}

SPEC gives the target, the ensemble and the default region (its ensemble's range,
101 x 101 points). Each PULSE is a pulse file or any waveform \`gatesmith export\` wrote;
--composites adds published sequences
built to meet the spec's target at its rabiMax and sample time dt = duration / segments,
each element rounded up to whole samples (see "gatesmith composite --list"): a gate about
an axis in the xy-plane as it is; an inversion |0> <-> |1> as a 180 degree rotation (and
90-180-90, made for it); any other state transfer as the rotation about an axis in the
xy-plane that carries from to to. A sequence that cannot meet the target is listed with
the reason.

Every row is ranked by its figures against the spec's target. A pulse whose own ideal
differs has a note beside it: it meets the target another way (Knill: up to a z rotation
after it, judged against its own ideal; a gate that performs the spec's state transfer),
or it does not.

Figures (see docs/analysis.md): mean and worst infidelity over the spec's ensemble
(weighted, as the design minimises them); over the region's grid, the region mean and
region worst, the fraction below the threshold; half-widths around zero error on each
axis below the threshold, duration, peak amplitude, pulse area (turns), energy (Hz^2 s).
Lower is better for infidelities, duration, peak, area and energy; higher for the
fraction below the threshold and the half-widths.

Example:
  gatesmith compare examples/transmon-x90.json x90.pulse.json --composites bb1,sk1,corpse

Options:
${optionsHelp(ARGS)}
`;

/** The `compare` subcommand. */
export const compareCommand: Command = defineCommand({
  name: 'compare',
  summary: 'table of summary figures of several pulses and composites, best first',
  args: ARGS,
  help: HELP,
  positionals: 'any',
  async body(positionals, flags, io: CliIO): Promise<number> {
    const [specPath, ...pulsePaths] = positionals;
    if (specPath === undefined) throw new ArgumentError(`compare: missing SPEC; usage: ${usageLine(ARGS)}`);
    const sortBy = (flagValue(flags, 'sort') ?? 'mean') as SortFigure;
    if (!SORTS.includes(sortBy)) throw new ArgumentError(`--sort: "${sortBy}" is not allowed; one of ${SORTS.join(', ')}`);
    const composites = flagValue(flags, 'composites');
    const compositeList = composites === undefined ? [] : splitList(composites);
    if (pulsePaths.length === 0 && compositeList.length === 0) {
      throw new ArgumentError(`compare: give at least one PULSE file or --composites LIST; usage: ${usageLine(ARGS)}`);
    }
    const spec = loadSpec(specPath);
    const region = regionOf(flags, spec.problem);
    const threshold = thresholdOf(flags);
    const files: { name: string; pulse: Pulse; file: string }[] = [];
    for (const path of pulsePaths) {
      const pulse = await loadWaveform(path);
      files.push({ name: pulseName(pulse, path), pulse, file: path });
    }
    printWarnings(io, spec.warnings);

    // Loaded here so that --help and bad input never wait for the wasm core.
    const { compare } = await import('../core/compare.ts');
    let comparison: Comparison;
    try {
      comparison = compare(spec.problem, files, { composites: compositeList, region, threshold, sortBy });
    } catch (error) {
      // The library names its option; the user typed the flag.
      const e = error as Error;
      if (e.name === 'ArgumentError' && e.message.startsWith('composites:')) throw new ArgumentError(`--${e.message}`);
      throw error;
    }
    const judged = comparison.rows.filter((row) => row.figures);
    if (judged.length === 0) {
      const reasons = comparison.rows.map((row) => `${row.name}: ${row.error?.message}`).join('; ');
      throw new ArgumentError(`--composites: no sequence can be built for the spec's target (${formatTarget(spec.problem.target)}): ${reasons}`);
    }
    // Each row says which file it came from; pulses and cuts stay out of the output.
    const fileOf = new Map(files.map((f) => [f.pulse, f.file]));
    const rows = comparison.rows.map(({ pulse, cuts, ...row }) => {
      void cuts;
      const file = pulse ? fileOf.get(pulse) : undefined;
      return file === undefined ? row : { ...row, file };
    });
    if (flags.json) {
      // Targets in the spec's form, angles in degrees.
      const rowsJson = rows.map((row) => (row.target ? { ...row, target: targetJson(row.target) } : row));
      const json = { ...comparison, target: targetJson(comparison.target), rows: rowsJson, warnings: spec.warnings };
      io.stdout(JSON.stringify(json, null, 2) + '\n');
    }
    else io.stdout(compareTable(comparison, rows, spec.problem));
    return 0;
  },
});

function splitList(text: string): string[] {
  const names = text.split(',').map((s) => s.trim().toLowerCase()).filter((s) => s !== '');
  if (names.length === 0) throw new ArgumentError(`--composites: "${text}" names no sequence; e.g. bb1,sk1,corpse`);
  return names;
}

function compareTable(comparison: Comparison, rows: Omit<CompareRow, 'pulse' | 'cuts'>[], problem: Problem): string {
  const ladder = rows.some((r) => r.figures?.meanLeakage !== undefined);
  const header = ['#', 'pulse', 'mean', 'worst', ...(ladder ? ['mean leakage'] : []), 'region mean', 'region worst', 'below thr.', 'detuning hw', 'amplitude hw', 'duration', 'peak', 'area (turns)', 'energy (Hz^2 s)'];
  const notes: string[] = [];
  const refused: string[] = [];
  const cells: string[][] = [];
  for (const r of rows) {
    const f = r.figures;
    if (!f) {
      refused.push(`not built: ${r.name}: ${r.error?.message ?? 'unknown reason'}`);
      continue;
    }
    let name = r.name;
    if (r.note) {
      notes.push(`[${notes.length + 1}] ${r.note}`);
      name += ` [${notes.length}]`;
    }
    cells.push([
      String(cells.length + 1),
      name,
      formatInfidelity(f.meanInfidelity),
      formatInfidelity(f.worstInfidelity),
      ...(ladder ? [formatInfidelity(f.meanLeakage ?? 0)] : []),
      formatInfidelity(f.regionMeanInfidelity),
      formatInfidelity(f.regionWorstInfidelity),
      percent(f.areaFraction),
      formatWidth(f.detuningHalfWidth, f.detuningInterval.reachedLimit, 'detuning'),
      formatWidth(f.amplitudeHalfWidth, f.amplitudeInterval.reachedLimit, 'amplitudeError'),
      formatTime(f.durationS),
      formatFrequency(f.peakRabiHz),
      String(Number(f.pulseAreaTurns.toPrecision(4))),
      f.energyHz2S.toExponential(3).replace('e+', 'e'),
    ]);
  }
  const widths = header.map((h, c) => Math.max(h.length, ...cells.map((row) => row[c].length)));
  const line = (row: string[]) => row.map((cell, c) => (c === 1 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ');
  const members = problem.members.length;
  return [
    `target: ${formatTarget(comparison.target)}`,
    ...(problem.line ? [`every figure through the line: ${describeLine(problem.line)} (duration: the drive the qubit sees, tails included)`] : []),
    `mean, worst: over the spec's ensemble (${members} member${members === 1 ? '' : 's'}, weighted mean)` +
      (problem.system ? `; on ${problem.system.levels} levels, anharmonicity ${formatFrequency(problem.system.anharmonicity)}` : ''),
    `region: detuning ${formatGrid(comparison.detuning, 'detuning')}; amplitude error ${formatGrid(comparison.amplitudeError, 'amplitudeError')}`,
    `threshold ${formatInfidelity(comparison.threshold)}; sorted by ${comparison.sortBy}, best first; composites at rabiMax ${formatFrequency(problem.rabiMax)}, dt ${formatTime(problem.dt)}`,
    '',
    line(header),
    ...cells.map(line),
    ...(notes.length > 0 ? ['', ...notes] : []),
    ...(refused.length > 0 ? ['', ...refused] : []),
    '',
  ].join('\n');
}
