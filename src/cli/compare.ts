// `gatesmith compare SPEC PULSE... [--composites LIST]`: the summary figures of several
// pulses on one grid and one target, one row per pulse, best first by a chosen figure.
import { ArgumentError } from '../core/errors.ts';
import type { CompositeName } from '../core/composites.ts';
import type { RobustnessSummary, SortFigure } from '../core/robustness.ts';
import type { Problem, Pulse, Target } from '../core/types.ts';
import { flagValue, optionsHelp, usageLine, type ArgSpec } from './args.ts';
import { REGION_FLAGS, formatGrid, formatWidth, percent, pulseName, regionOf, thresholdOf } from './analysis-flags.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { loadPulse, loadSpec } from './files.ts';
import { formatFrequency, formatInfidelity, formatTarget, formatTime } from './format.ts';

// Kept in step with SORT_FIGURES in src/core/robustness.ts (checked by the tests); listed
// here so that --help needs no import of the core.
const SORTS = ['mean', 'worst', 'area', 'detuning-width', 'amplitude-width', 'duration', 'peak', 'pulse-area', 'energy'];

const ARGS: ArgSpec = {
  command: 'compare',
  positionals: ['SPEC', 'PULSE...'],
  flags: [
    { name: 'composites', value: 'LIST', help: "published sequences to add, e.g. bb1,sk1,corpse (built under the spec's rabiMax and dt)" },
    { name: 'sort', value: SORTS.join('|'), help: 'figure that orders the rows, best first (default mean)' },
    ...REGION_FLAGS,
    { name: 'json', help: 'print {target, region, threshold, sortBy, rows} as JSON instead of a table' },
  ],
};

const HELP = `Compare pulses on one grid and one target: a table of their summary figures, one row
per pulse, best first.

Usage: ${usageLine(ARGS)}

SPEC gives the target and the default region (its ensemble's range, 101 x 101 points).
Each PULSE is a pulse file; --composites adds published sequences built for the spec's
target rotation (its axis must lie in the xy-plane) at the spec's rabiMax and sample time
dt = duration / segments, each element rounded up to whole samples (see
"gatesmith composite --list"). A pulse whose metadata names its own ideal (Knill,
90-180-90) is compared with that ideal, and its row is marked.

Figures (see docs/analysis.md): mean and worst infidelity over the grid, the fraction of
the grid below the threshold, half-widths around zero error on each axis below the
threshold, duration, peak amplitude, pulse area (turns), energy (Hz^2 s).
Lower is better for infidelities, duration, peak, area and energy; higher for the
fraction below the threshold and the half-widths.

Example:
  gatesmith compare examples/transmon-x90.json x90.pulse.json --composites bb1,sk1,corpse

Options:
${optionsHelp(ARGS)}
`;

/** One compared pulse: where it came from and its figures. */
type Row = RobustnessSummary & { name: string; source: string };

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
    const pulses: { name: string; source: string; pulse: Pulse }[] = pulsePaths.map((path) => {
      const pulse = loadPulse(path);
      return { name: pulseName(pulse, path), source: path, pulse };
    });

    // Loaded here so that --help and bad input never wait for the wasm core.
    const { buildComposite, compositeNames } = await import('../core/composites.ts');
    const { compareSummaries, summarise } = await import('../core/robustness.ts');
    const known = compositeNames.map((c) => c.name as string);
    for (const name of compositeList) {
      if (!known.includes(name)) throw new ArgumentError(`--composites: "${name}" is not a known sequence; one of ${known.join(', ')}`);
      const { angleDeg, axisDeg } = compositeRotation(spec.problem.target);
      let pulse: Pulse;
      try {
        pulse = buildComposite(name as CompositeName, { angleDeg, axisDeg, rabiMax: spec.problem.rabiMax, dt: spec.problem.dt });
      } catch (error) {
        throw new ArgumentError(`--composites ${name}: ${error instanceof Error ? error.message : String(error)}`);
      }
      pulses.push({ name, source: 'composite', pulse });
    }

    const rows: Row[] = pulses.map(({ name, source, pulse }) => ({
      name,
      source,
      ...summarise(spec.problem.target, pulse, region.detuning, region.amplitudeError, { threshold, line: spec.problem.line }).summary,
    }));
    const sorted = compareSummaries(rows, sortBy);
    if (flags.json) {
      const json = { target: spec.problem.target, ...region, threshold: sorted[0].threshold, sortBy, rows: sorted };
      io.stdout(JSON.stringify(json, null, 2) + '\n');
    } else io.stdout(compareTable(sorted, spec.problem, sortBy));
    return 0;
  },
});

/** The rotation the composites are built for: the spec's gate (axis in the xy-plane) or an inversion. */
export function compositeRotation(target: Target): { angleDeg: number; axisDeg: number } {
  if (target.kind === 'state') {
    // Which pole a Bloch vector points at (+1, -1), or 0 when it is off the z axis.
    const pole = (r: readonly number[]) => (Math.hypot(r[0], r[1]) <= 1e-9 * Math.abs(r[2]) ? Math.sign(r[2]) : 0);
    const from = pole(target.from);
    if (from !== 0 && pole(target.to) === -from) return { angleDeg: 180, axisDeg: 0 };
    throw new ArgumentError(`--composites: the spec's target (${formatTarget(target)}) is not a gate; composites are built for a gate about an axis in the xy-plane, or for the inversion between the poles`);
  }
  const [x, y, z] = target.axis;
  const norm = Math.hypot(x, y, z);
  if (Math.abs(z) > 1e-9 * norm) {
    throw new ArgumentError(`--composites: the spec's target axis ${JSON.stringify(target.axis)} is not in the xy-plane; composites rotate about (cos phi, sin phi, 0)`);
  }
  let angleDeg = (target.angleRad * 180) / Math.PI;
  let axisDeg = (Math.atan2(y, x) * 180) / Math.PI;
  // R_n(-t) = R_{-n}(t): the sequences take positive angles.
  if (angleDeg < 0) {
    angleDeg = -angleDeg;
    axisDeg += 180;
  }
  return { angleDeg, axisDeg: Number(axisDeg.toPrecision(12)) };
}

function splitList(text: string): string[] {
  const names = text.split(',').map((s) => s.trim().toLowerCase()).filter((s) => s !== '');
  if (names.length === 0) throw new ArgumentError(`--composites: "${text}" names no sequence; e.g. bb1,sk1,corpse`);
  return names;
}

function compareTable(rows: Row[], problem: Problem, sortBy: string): string {
  const header = ['#', 'pulse', 'mean', 'worst', 'below thr.', 'detuning hw', 'amplitude hw', 'duration', 'peak', 'area (turns)', 'energy (Hz^2 s)'];
  const notes: string[] = [];
  const cells = rows.map((r, k) => {
    let name = r.name;
    if (r.targetNote) {
      notes.push(`[${notes.length + 1}] ${r.targetNote}`);
      name += ` [${notes.length}]`;
    }
    return [
      String(k + 1),
      name,
      formatInfidelity(r.meanInfidelity),
      formatInfidelity(r.worstInfidelity),
      percent(r.areaFraction),
      formatWidth(r.detuningHalfWidth, r.detuningInterval.reachedLimit, 'detuning'),
      formatWidth(r.amplitudeHalfWidth, r.amplitudeInterval.reachedLimit, 'amplitudeError'),
      formatTime(r.durationS),
      formatFrequency(r.peakRabiHz),
      String(Number(r.pulseAreaTurns.toPrecision(4))),
      r.energyHz2S.toExponential(3).replace('e+', 'e'),
    ];
  });
  const widths = header.map((h, c) => Math.max(h.length, ...cells.map((row) => row[c].length)));
  const line = (row: string[]) => row.map((cell, c) => (c === 1 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ');
  const first = rows[0];
  return [
    `target: ${formatTarget(problem.target)}`,
    `region: detuning ${formatGrid(first.detuning, 'detuning')}; amplitude error ${formatGrid(first.amplitudeError, 'amplitudeError')}`,
    `threshold ${formatInfidelity(first.threshold)}; sorted by ${sortBy}, best first; composites at rabiMax ${formatFrequency(problem.rabiMax)}, dt ${formatTime(problem.dt)}`,
    '',
    line(header),
    ...cells.map(line),
    ...(notes.length > 0 ? ['', ...notes] : []),
    '',
  ].join('\n');
}
