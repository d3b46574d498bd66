// `gatesmith map SPEC PULSE`: the infidelity of a pulse on a grid of detuning x amplitude
// error, written as CSV or JSON, and its summary figures.
import { existsSync } from 'node:fs';
import { ArgumentError } from '../core/errors.ts';
import { isDragName } from '../core/drag-family.ts';
import type { Problem, Pulse } from '../core/types.ts';
import { writeMapCsv, writeMapJson } from '../io/map-file.ts';
import { flagValue, optionsHelp, usageLine, type ArgSpec } from './args.ts';
import { DEFAULT_POINTS, REGION_FLAGS, pulseName, regionOf, summaryText, thresholdOf } from './analysis-flags.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { targetJson } from '../io/target-json.ts';
import { checkOutputName, checkWritable, loadSpec, loadWaveform, printWarnings, writeFilesTogether } from './files.ts';

const ARGS: ArgSpec = {
  command: 'map',
  positionals: ['SPEC', 'PULSE'],
  flags: [
    ...REGION_FLAGS,
    { name: 'out', value: 'FILE.csv|FILE.json', help: 'write the map: CSV rows detuning_hz,amplitude_error,infidelity (and leakage on a ladder), or JSON with the summary' },
    { name: 'json', help: 'print the summary figures as JSON instead of a table' },
  ],
};

const HELP = `Robustness map of a pulse: its infidelity on a grid of detuning x amplitude error.

Usage: ${usageLine(ARGS)}

SPEC gives the target (and, by default, the region: the range of its ensemble on each
axis, ${DEFAULT_POINTS} x ${DEFAULT_POINTS} points; an axis the ensemble does not vary is one point).
PULSE is a pulse file or any waveform \`gatesmith export\` wrote, or drag-gaussian /
drag-cosine (when no file has that name): the DRAG pulse built under the spec's limits and
calibrated on its ensemble and system, as compare builds it. It is judged against the
spec's target; a pulse whose metadata names its own ideal (composites do) gets a note on
how that ideal meets the target (the Knill sequence meets a 180 degree gate up to a z
rotation after it, and is judged against its own ideal; a sequence built for another
rotation is judged against the spec's target).

Prints the figures: mean and worst infidelity over the spec's ensemble (weighted, as the
design minimises them); over the grid, the region mean and region worst and the fraction
below the threshold, the half-widths around zero error (found on each axis through zero
error to 1e-7 relative, not limited by the grid or the region), duration, peak amplitude,
pulse area (turns) and energy (Hz^2 s). See docs/analysis.md.

On a ladder (a spec with a system of more than two levels) every point has its leakage too:
the map file gets a leakage column (CSV) or array (JSON). One point on an axis makes the
file a cut along the other: --amplitude 0:0:1 gives the cut along detuning, with its leakage.

Example:
  gatesmith map examples/transmon-x90.json x90.pulse.json --detuning -2e6:2e6:201 --out map.csv

Options:
${optionsHelp(ARGS)}
`;

/** The `map` subcommand. */
export const mapCommand: Command = defineCommand({
  name: 'map',
  summary: 'robustness map of a pulse over detuning x amplitude error, with summary figures',
  args: ARGS,
  help: HELP,
  async body([specPath, pulsePath], flags, io: CliIO): Promise<number> {
    const out = flagValue(flags, 'out');
    const format = out === undefined ? null : mapFormat(out);
    const spec = loadSpec(specPath);
    const pulse = isDragName(pulsePath.toLowerCase()) && !existsSync(pulsePath)
      ? await calibratedDrag(spec.problem, pulsePath.toLowerCase())
      : await loadWaveform(pulsePath);
    const region = regionOf(flags, spec.problem);
    const threshold = thresholdOf(flags);
    if (out !== undefined) checkWritable(out, '--out', [specPath, pulsePath]);
    printWarnings(io, spec.warnings);

    // Loaded here so that --help and bad input never wait for the wasm core.
    const { judgePulse } = await import('../core/compare.ts');
    const judgement = judgePulse(spec.problem, pulse, { region, threshold });
    const { choice, figures, map } = judgement;
    // One object for the JSON output and the map file: the target, the region, the figures.
    const summary = { ...choice, ...judgement.region, threshold: judgement.threshold, ...figures };
    if (out !== undefined) {
      const context = { pulseName: pulseName(pulse, pulsePath), target: choice.targetUsed, targetNote: choice.targetNote };
      writeFilesTogether([{ path: out, data: format === 'csv' ? writeMapCsv(map, context) : writeMapJson(map, context, summary) }], '--out');
    }
    if (flags.json) {
      const json = { pulse: pulseName(pulse, pulsePath), ...summary, targetGiven: targetJson(summary.targetGiven), targetUsed: targetJson(summary.targetUsed) };
      io.stdout(JSON.stringify({ ...json, out: out ?? null, warnings: spec.warnings }, null, 2) + '\n');
    } else {
      io.stdout(`pulse: ${pulseName(pulse, pulsePath)}\n` + summaryText(judgement, spec.problem.members.length) + (out !== undefined ? `map written to ${out}\n` : ''));
    }
    return 0;
  },
});

/** The DRAG pulse compare would build for the spec (the core is loaded here, not for --help). */
async function calibratedDrag(problem: Problem, name: string): Promise<Pulse> {
  const { dragFamilyFor } = await import('../core/drag-family.ts');
  const [built] = dragFamilyFor(problem, [name]);
  if (!built.pulse) throw new ArgumentError(`PULSE ${name}: ${built.error?.message ?? 'cannot be built for the spec'}`);
  return built.pulse;
}

/** The file format from the --out name's extension. */
function mapFormat(out: string): 'csv' | 'json' {
  const lower = out.toLowerCase();
  if (lower.endsWith('.csv')) return 'csv';
  if (lower.endsWith('.json')) return 'json';
  checkOutputName(out, '--out', ['.csv', '.json'], 'a map (CSV or JSON)');
  throw new ArgumentError(`--out ${out}: the name must end in .csv or .json (the format is chosen by it)`);
}
