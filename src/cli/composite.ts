// `gatesmith composite NAME ...`: builds a published composite pulse (or a shaped single
// pulse) under a peak Rabi frequency and a sample time, prints its elements and how they
// were fitted to whole samples, and writes it as an ordinary pulse file.
// `gatesmith composite --list`: each sequence, what it corrects and its source.
import { ArgumentError } from '../core/errors.ts';
import { buildComposite, compositeNames, type Bb1Placement, type CompositeMetadata, type CompositeName } from '../core/composites.ts';
import { dragFamily, isDragName } from '../core/drag-family.ts';
import type { Pulse } from '../core/types.ts';
import { writePulse } from '../io/pulse.ts';
import { targetJson } from '../io/target-json.ts';
import { flagValue, optionsHelp, requiredFlag, usageLine, type ArgSpec } from './args.ts';
import { numberFlag } from './analysis-flags.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { checkOutputName, checkWritable, printWarnings, writeFilesTogether } from './files.ts';
import { frequencyWarning, sampleTimeWarning } from './unit-warnings.ts';
import { formatFrequency, formatTarget, formatTime } from './format.ts';

const ARGS: ArgSpec = {
  command: 'composite',
  positionals: ['NAME'],
  flags: [
    { name: 'angle-deg', value: 'A', help: 'target rotation angle in degrees (required)' },
    { name: 'axis-deg', value: 'PHI', help: 'phase of the rotation axis in the xy-plane, degrees (default 0, the x axis)' },
    { name: 'rabi-max', value: 'HZ', help: 'peak Rabi frequency in Hz (required)' },
    { name: 'dt', value: 'S', help: 'sample time in seconds (required)' },
    { name: 'placement', value: 'after|before|middle', help: "bb1 only: where the correction block sits (default after)" },
    { name: 'sigmas', value: 'S', help: 'gaussian only: the envelope is cut at +-S standard deviations (default 3)' },
    { name: 'out', value: 'PULSE', help: 'write the pulse file (gatesmith pulse JSON)' },
    { name: 'list', help: 'list every sequence, what it corrects and its source' },
    { name: 'json', help: 'print the pulse metadata (or the list) as JSON' },
  ],
};

const HELP = `Build a published composite pulse, or a shaped single pulse, as an ordinary pulse.

Usage: gatesmith composite NAME --angle-deg A [--axis-deg PHI] --rabi-max HZ --dt S
                 [--placement after|before|middle] [--sigmas S] [--out PULSE] [--json]
       gatesmith composite --list [--json]

NAME is one of ${compositeNames.map((c) => c.name).join(', ')}.
Each element is a rectangular rotation at most at --rabi-max; its length is rounded up
to whole samples of --dt and its amplitude lowered so that its angle stays exact. The
elements then run at slightly different Rabi rates, which leaves a detuning-correcting
sequence (CORPSE, Knill) a first-order residue proportional to the printed spread; see
docs/analysis.md. The pulse's metadata names the sequence, its source, its elements and
its ideal operation (Knill: a 180 degree rotation about the axis at PHI - 30 degrees;
90-180-90: the inversion |0> -> |1>); map and compare say beside the pulse how that ideal
meets the spec's target.

Example:
  gatesmith composite bb1 --angle-deg 90 --rabi-max 1e7 --dt 2e-9 --out bb1-x90.pulse.json

Options:
${optionsHelp(ARGS)}
`;

/** The `composite` subcommand. */
export const compositeCommand: Command = defineCommand({
  name: 'composite',
  summary: 'build a published composite pulse (BB1, SK1, CORPSE, ...) or list them',
  args: ARGS,
  help: HELP,
  positionals: 'any',
  async body(positionals, flags, io: CliIO): Promise<number> {
    if (flags.list) {
      if (positionals.length > 0) throw new ArgumentError(`composite: --list takes no NAME (got "${positionals[0]}")`);
      io.stdout(flags.json ? JSON.stringify([...compositeNames, ...dragFamily], null, 2) + '\n' : listText());
      return 0;
    }
    if (positionals.length !== 1) {
      throw new ArgumentError(`composite: give one NAME (${compositeNames.map((c) => c.name).join(', ')}) or --list; usage: ${usageLine(ARGS)}`);
    }
    const name = positionals[0].toLowerCase();
    if (isDragName(name)) {
      throw new ArgumentError(`composite: "${positionals[0]}" is calibrated on a spec's ensemble and system, not built alone; use gatesmith compare SPEC --composites ${name}`);
    }
    if (!compositeNames.some((c) => c.name === name)) {
      throw new ArgumentError(`composite: "${positionals[0]}" is not a known sequence; one of ${compositeNames.map((c) => c.name).join(', ')}`);
    }
    const text = (flag: string): string | undefined => flagValue(flags, flag);
    const required = (flag: string): string => requiredFlag(flags, flag, ARGS);
    const positive = (x: number) => x > 0;
    const angleDeg = numberFlag(required('angle-deg'), '--angle-deg', 'a finite angle in degrees');
    const axisText = text('axis-deg');
    const axisDeg = axisText === undefined ? 0 : numberFlag(axisText, '--axis-deg', 'a finite phase in degrees');
    const rabiMax = numberFlag(required('rabi-max'), '--rabi-max', 'a peak Rabi frequency > 0 in Hz, e.g. 1e7', positive);
    const dt = numberFlag(required('dt'), '--dt', 'a sample time > 0 in seconds, e.g. 2e-9', positive);
    const placement = text('placement') as Bb1Placement | undefined;
    const sigmasText = text('sigmas');
    const sigmas = sigmasText === undefined ? undefined : numberFlag(sigmasText, '--sigmas', 'a number of standard deviations in (0, 20]', positive);
    const out = text('out');
    if (out !== undefined) {
      checkOutputName(out, '--out', ['.json'], 'a pulse file (JSON)');
      checkWritable(out, '--out');
    }
    const warnings = [frequencyWarning('--rabi-max', rabiMax), sampleTimeWarning('--dt', dt)].filter((w): w is string => w !== null);
    printWarnings(io, warnings);

    let pulse: Pulse & { metadata: CompositeMetadata };
    try {
      pulse = buildComposite(name as CompositeName, { angleDeg, axisDeg, rabiMax, dt, placement, sigmas });
    } catch (error) {
      // The library names its option (angleDeg); the user typed the flag.
      const e = error as Error;
      if (e.name === 'SpecError') throw new ArgumentError(flagNames(e.message));
      throw error;
    }
    // The file, read by people, gives the ideal's angle in degrees (the spec's form).
    const ideal = targetJson(pulse.metadata.ideal);
    if (out !== undefined) writeFilesTogether([{ path: out, data: writePulse({ ...pulse, metadata: { ...pulse.metadata, ideal } }) }], '--out');
    if (flags.json) {
      const metadata = { ...pulse.metadata, ideal };
      io.stdout(JSON.stringify({ samples: pulse.i.length, dt: pulse.dt, durationS: pulse.i.length * pulse.dt, metadata, out: out ?? null, warnings }, null, 2) + '\n');
    } else io.stdout(elementsText(pulse, out));
    return 0;
  },
});

/** "angleDeg: 90 is not allowed; ..." -> "--angle-deg: 90 is not allowed; ...". */
function flagNames(message: string): string {
  const names: Record<string, string> = { angleDeg: '--angle-deg', axisDeg: '--axis-deg', rabiMax: '--rabi-max', dt: '--dt', placement: '--placement', sigmas: '--sigmas' };
  return message.replace(/^(\w+):/, (whole, field: string) => (names[field] ? `${names[field]}:` : whole));
}

function listText(): string {
  const blocks = [...compositeNames, ...dragFamily].map((c) => `${c.name}  (${c.title})\n  corrects: ${c.corrects}\n  angles:   ${c.angles}\n  source:   ${c.source}`);
  return blocks.join('\n') + '\n';
}

function elementsText(pulse: Pulse & { metadata: CompositeMetadata }, out: string | undefined): string {
  const m = pulse.metadata;
  const header = ['#', 'angle (deg)', 'phase (deg)', 'first sample', 'samples', 'Rabi rate'];
  const rows = m.elements.map((e, k) => [
    String(k + 1),
    String(Number(e.angleDeg.toFixed(3))),
    String(Number(e.phaseDeg.toFixed(3))),
    String(e.firstSample),
    String(e.samples),
    formatFrequency(e.rabiHz),
  ]);
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (cells: string[]) => cells.map((cell, c) => cell.padStart(widths[c])).join('  ');
  const detuningCorrecting = m.corrects.includes('detuning');
  const lines = [
    m.name,
    `source: ${m.source}`,
    `corrects: ${m.corrects}`,
    `ideal: ${formatTarget(m.ideal)}`,
    '',
    line(header),
    ...rows.map(line),
    '',
    `rounding: ${m.rounding}`,
    `element Rabi spread: ${Number((100 * m.elementRabiSpread).toPrecision(3))} % ((max - min) / max of the element amplitudes)` +
      (detuningCorrecting && m.elementRabiSpread > 0
        ? '; unequal rates leave the detuning correction a first-order residue in proportion (shorter dt or a rabi-max that fits whole samples reduces it)'
        : ''),
    `pulse: ${pulse.i.length} samples of ${formatTime(pulse.dt)} (${formatTime(pulse.i.length * pulse.dt)})${out !== undefined ? `, written to ${out}` : ', not saved (give --out PULSE)'}`,
    '',
  ];
  return lines.join('\n');
}
