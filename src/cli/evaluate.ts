// `gatesmith evaluate SPEC PULSE [--json]`: the figures of a pulse on a spec's target and
// ensemble, per member and in summary.
import type { JudgedEvaluation } from '../core/compare.ts';
import { describeLine, lineJson } from '../core/line-spec.ts';
import type { Line, Problem, Pulse } from '../core/types.ts';
import { targetJson } from '../io/target-json.ts';
import { optionsHelp, usageLine } from './args.ts';
import type { ArgSpec } from './args.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { loadSpec, loadWaveform, printWarnings } from './files.ts';
import { formatFrequency, formatInfidelity, formatMemberAt, formatRelative, formatTarget, formatTime } from './format.ts';

const ARGS: ArgSpec = {
  command: 'evaluate',
  positionals: ['SPEC', 'PULSE'],
  flags: [
    { name: 'json', help: 'print {members, meanInfidelity, worstInfidelity, target, note, warnings} as JSON instead of a table' },
    { name: 'no-line', help: "ignore the spec's line: the figures of the held samples as if the qubit saw them (the naive figure)" },
  ],
};

const HELP = `Evaluate a pulse on the target and ensemble of a spec.

Usage: ${usageLine(ARGS)}

SPEC is a design spec (JSON; see docs/spec.md); its target, ensemble, rabiMax and line
are used: with a line, the figures are of the drive the qubit sees through it
(--no-line for the figures without it). PULSE is a pulse file (JSON with "dt" in seconds and arrays "i", "q" in Hz)
or any waveform that \`gatesmith export\` wrote (csv, npy, raw with its FILE.json
description, wav), evaluated as the instrument plays it, padding included.
Prints each member's detuning, amplitude error, weight and infidelity, then the weighted
mean and the worst member. The pulse is judged against the spec's target; a pulse whose
metadata names its own ideal gets a note on how that ideal meets the target (as in map and
compare; see docs/analysis.md "Which target").

Options:
${optionsHelp(ARGS)}
`;

/** The `evaluate` subcommand. */
export const evaluateCommand: Command = defineCommand({
  name: 'evaluate',
  summary: 'figures of a pulse on a spec’s ensemble',
  args: ARGS,
  help: HELP,
  async body([specPath, pulsePath], flags, io: CliIO): Promise<number> {
    const spec = loadSpec(specPath);
    const pulse = await loadWaveform(pulsePath);
    const warnings = [...spec.warnings, ...mismatches(pulse, spec.problem)];
    printWarnings(io, warnings);

    // Loaded here so that --help and bad input never wait for the wasm core.
    const { evaluateJudged } = await import('../core/compare.ts');
    const noLine = flags['no-line'] === true;
    const evaluation = evaluateJudged(spec.problem, pulse, noLine);
    if (flags.json) {
      const json = {
        members: evaluation.members.map((m) => ({
          detuning: m.detuning,
          amplitudeError: m.amplitudeError,
          weight: m.weight,
          infidelity: m.infidelity,
          ...(m.leakage !== undefined ? { anharmonicityError: m.anharmonicityError ?? 0, leakage: m.leakage } : {}),
          ...(m.phaseAfter !== undefined ? { phaseAfter: m.phaseAfter } : {}),
        })),
        meanInfidelity: evaluation.meanInfidelity,
        worstInfidelity: evaluation.worstInfidelity,
        ...(evaluation.meanLeakage !== undefined
          ? { levels: evaluation.levels, meanLeakage: evaluation.meanLeakage, worstLeakage: evaluation.worstLeakage, meanAverageInfidelity: evaluation.meanAverageInfidelity }
          : {}),
        target: targetJson(evaluation.target),
        note: evaluation.note,
        // With a line in the spec: the line the figures went through (null: --no-line).
        ...(spec.problem.line ? { line: noLine ? null : lineJson(spec.problem.line) } : {}),
        warnings,
      };
      io.stdout(JSON.stringify(json, null, 2) + '\n');
    } else {
      io.stdout(evaluationTable(evaluation, spec.problem, pulse, noLine ? undefined : spec.problem.line));
    }
    return 0;
  },
});

// Not errors (the pulse is evaluated as given) but worth telling: a pulse over the spec's
// drive limit, or of another length than the spec designs for.
function mismatches(pulse: Pulse, problem: Problem): string[] {
  const warnings: string[] = [];
  let peak = 0;
  for (let k = 0; k < pulse.i.length; k++) peak = Math.max(peak, Math.hypot(pulse.i[k], pulse.q[k]));
  if (peak > problem.rabiMax * (1 + 1e-12)) {
    // The excess in words too: a quantised waveform may pass rabiMax by a fraction of a code.
    const excess = Number((((peak - problem.rabiMax) / problem.rabiMax) * 100).toPrecision(2));
    warnings.push(`the pulse peaks at ${peak} Hz, ${excess} % above the spec's rabiMax ${formatFrequency(problem.rabiMax)}`);
  }
  const length = pulse.dt * pulse.i.length;
  if (Math.abs(length - problem.duration) > 1e-9 * problem.duration) {
    warnings.push(`the pulse lasts ${formatTime(length)}, the spec's duration is ${formatTime(problem.duration)}; evaluating the pulse as given`);
  }
  return warnings;
}

function evaluationTable(ev: JudgedEvaluation, problem: Problem, pulse: Pulse, through: Line | undefined): string {
  const ladder = ev.meanLeakage !== undefined;
  const phase = ev.members.some((m) => m.phaseAfter !== undefined);
  const header = ['detuning', 'amplitude error', ...(ladder ? ['anharmonicity error'] : []), 'weight', 'infidelity',
    ...(ladder ? ['leakage'] : []), ...(phase ? ['phase after'] : [])];
  const rows = ev.members.map((m) => [
    formatFrequency(m.detuning),
    formatRelative(m.amplitudeError),
    ...(ladder ? [formatFrequency(m.anharmonicityError ?? 0)] : []),
    String(Number(m.weight.toPrecision(4))),
    formatInfidelity(m.infidelity),
    ...(ladder ? [formatInfidelity(m.leakage ?? 0)] : []),
    ...(phase ? [`${(((m.phaseAfter ?? 0) * 180) / Math.PI).toFixed(3)} deg`] : []),
  ]);
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (cells: string[]) => cells.map((cell, c) => cell.padStart(widths[c])).join('  ');
  const worst = ev.members[ev.worstIndex];
  return [
    `target: ${formatTarget(ev.target)}; pulse: ${pulse.i.length} samples of ${formatTime(pulse.dt)}`,
    through ? `through the line: ${describeLine(through)}` : problem.line ? "without the spec's line (--no-line): the held samples as the qubit's drive" : 'no line: the qubit sees the held samples',
    ...(ev.note ? [`note: ${ev.note}`] : []),
    line(header),
    ...rows.map(line),
    '',
    `mean infidelity   ${formatInfidelity(ev.meanInfidelity)} (weighted over ${ev.members.length} members)`,
    `worst infidelity  ${formatInfidelity(ev.worstInfidelity)} at ${formatMemberAt(worst)}`,
    ...(ladder ? [
      `mean leakage      ${formatInfidelity(ev.meanLeakage!)} (population that left levels 0 and 1, on ${ev.levels} levels, anharmonicity ${formatFrequency(problem.system?.anharmonicity ?? 0)})`,
      `worst leakage     ${formatInfidelity(ev.worstLeakage!)}`,
    ] : []),
    '',
  ].join('\n');
}
