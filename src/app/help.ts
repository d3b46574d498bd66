// Help for every field of the page: what it means, its unit, a typical value, and the page
// of the documentation that says more. Shown beside a field while it has the focus, and
// listed whole in the documentation panel. Keys are the control's `data-help`, id or name.

/** The documentation pages shipped with the app. */
export type DocPage = 'readme' | 'spec' | 'analysis' | 'physics';

/** One field's help. */
export interface FieldHelp {
  /** The field's label as the page shows it. */
  label: string;
  what: string;
  unit: string;
  typical: string;
  /** The page and heading that say more. */
  doc: { page: DocPage; heading: string };
}

const SPEC = (heading: string) => ({ page: 'spec' as const, heading });
const ANALYSIS = (heading: string) => ({ page: 'analysis' as const, heading });
const README = (heading: string) => ({ page: 'readme' as const, heading });

function axisHelp(axis: 'detuning' | 'amplitudeError'): Record<string, FieldHelp> {
  const d = axis === 'detuning';
  const name = d ? 'Detuning' : 'Amplitude error';
  const unit = d ? 'Hz (type 200 kHz, 1 MHz; a bare number is MHz)' : 'relative (type 5 %, 0.05 or 500 ppm; a bare number is %)';
  const doc = SPEC('`ensemble`: error axes or an explicit member list');
  const key = `f-${axis}`;
  return {
    [`${key}-mode`]: {
      label: `${name} sampling`,
      what: `How the ${d ? 'qubit-minus-drive frequency offsets' : 'relative errors of the drive amplitude'} the pulse must tolerate are sampled: none, a uniform range, a Gaussian spread (Gauss-Hermite nodes) or a list.`,
      unit: 'a choice',
      typical: 'range',
      doc,
    },
    [`${key}-min`]: { label: `${name} from`, what: `Lowest ${d ? 'detuning' : 'amplitude error'} of the range.`, unit, typical: d ? '-1 MHz (a tenth of the peak Rabi)' : '-10 %', doc },
    [`${key}-max`]: { label: `${name} to`, what: `Highest ${d ? 'detuning' : 'amplitude error'} of the range.`, unit, typical: d ? '1 MHz' : '10 %', doc },
    [`${key}-points`]: { label: `${name} points`, what: 'Members along this axis (nodes, for a Gaussian spread); the ensemble is the grid of both axes.', unit: 'a whole number', typical: '5 (3 to 9)', doc },
    [`${key}-sigma`]: { label: `${name} sigma`, what: 'Standard deviation of the Gaussian spread of the error.', unit, typical: d ? '300 kHz' : '3 %', doc },
    [`${key}-mean`]: { label: `${name} mean`, what: 'Centre of the Gaussian spread (empty: zero).', unit, typical: '0', doc },
    [`${key}-values`]: { label: `${name} values`, what: 'The members along this axis, as a list; a unit written once at the end applies to all.', unit, typical: d ? '-1, 0, 1 MHz' : '-5, 0, 5 %', doc },
  };
}

/** Help by control key. */
export const FIELD_HELP: Record<string, FieldHelp> = {
  'demo-picker': { label: 'Load demo', what: 'Replaces the spec with one of the built-in examples of invented labs.', unit: 'a choice', typical: 'Transmon X(90)', doc: README('The app') },
  'pulse-picker': { label: 'Pulse', what: 'The pulse the analysis views show: designed here, opened from a file, or opened from the comparison.', unit: 'a choice', typical: 'the newest design', doc: README('The app') },
  'target-kind': { label: 'Target kind', what: 'A gate (a rotation every input state must undergo, phase-insensitive) or a state transfer (one Bloch vector to another; the final phase is free).', unit: 'a choice', typical: 'Gate', doc: SPEC('`target`: exactly one of') },
  'f-axis': { label: 'Axis', what: 'Rotation axis of the gate on the Bloch sphere.', unit: 'a direction: +x, -y, or three components x, y, z', typical: '+x (an X gate)', doc: SPEC('`target`: exactly one of') },
  'f-angle': { label: 'Angle', what: 'Rotation angle of the gate, by the right-hand rule about the axis.', unit: 'degrees', typical: '90° or 180°', doc: SPEC('`target`: exactly one of') },
  'f-from': { label: 'From', what: 'Bloch vector of the initial state of the transfer.', unit: 'a direction: +z is |0⟩, -z is |1⟩', typical: '+z', doc: SPEC('`target`: exactly one of') },
  'f-to': { label: 'To', what: 'Bloch vector the initial state must reach.', unit: 'a direction', typical: '-z (inversion)', doc: SPEC('`target`: exactly one of') },
  'f-goal-mean': { label: 'goal mean 1 − F', what: 'The shortest search looks for the fewest whole samples at which a design reaches this weighted mean infidelity over the spec\'s ensemble.', unit: 'an infidelity above 0, at most 1', typical: '1e-4', doc: README('The shortest pulse for a goal') },
  'f-goal-worst': { label: 'goal worst 1 − F', what: 'Optional: the worst member must also reach this infidelity for a duration to count as meeting the goal.', unit: 'an infidelity above 0, at most 1 (empty: no goal on the worst member)', typical: '1e-3', doc: README('The shortest pulse for a goal') },
  'f-rabi': { label: 'Peak Rabi', what: 'Largest drive amplitude √(I² + Q²) the hardware allows, as a Rabi frequency: a resonant drive at this level turns the Bloch vector this many times per second.', unit: 'Hz (type 10 MHz, 100 kHz; a bare number is MHz)', typical: '10-50 MHz (transmons), 50-500 kHz (ions, NMR)', doc: README('Conventions') },
  'f-duration': { label: 'Duration', what: 'Length of the whole pulse: samples × sample period.', unit: 's (type 200 ns, 40 us; a bare number is ns)', typical: '20-200 ns (transmons), 10-100 µs (ions)', doc: SPEC('Top level') },
  'f-segments': { label: 'Samples', what: 'Number of piecewise-constant samples the pulse is made of.', unit: 'a whole number', typical: '50-500', doc: SPEC('Top level') },
  'f-dt': { label: 'Sample period', what: "Length of each sample (the instrument's sample period or a multiple). Changing it keeps the samples and sets the duration.", unit: 's (type 2 ns; a bare number is ns)', typical: '1-4 ns (AWGs at 0.25-1 GS/s)', doc: SPEC('Top level') },
  'f-bound': { label: 'Bound', what: 'How the amplitude limit holds: on √(I² + Q²) (a disc, the default) or on |I| and |Q| separately (a box, whose corners reach √2 × the peak).', unit: 'a choice', typical: 'disc', doc: README('The optimiser') },
  'f-smooth': { label: 'Smoothness', what: 'Weight of the penalty on sample-to-sample change, to keep the pulse within the line’s bandwidth (empty: off).', unit: 'a plain number', typical: '0 (off) to 1e-3', doc: SPEC('`constraints`') },
  'f-zero-edges': { label: 'First and last samples at zero', what: 'Holds the first and last samples at zero amplitude, so the pulse starts and ends without a step.', unit: 'on or off', typical: 'on for real hardware', doc: SPEC('`constraints`') },
  'f-levels': { label: 'Levels', what: 'Levels of the transmon ladder the pulse is designed on (empty: the two-level qubit); more levels let the design see leakage out of the qubit.', unit: 'a whole number, 2 to 8', typical: '3-5 for a transmon', doc: SPEC('`system`') },
  'f-alpha': { label: 'Anharmonicity', what: 'The ladder’s anharmonicity: the 1-2 transition frequency minus the 0-1 one (empty: none).', unit: 'Hz (type -212 MHz; a bare number is MHz)', typical: '-200 to -340 MHz (transmons)', doc: SPEC('`system`') },
  'f-line': { label: 'Line to the qubit', what: 'What the cables, filters and amplifiers do to the programmed samples before they reach the qubit: none, a Gaussian or RC lowpass of a given bandwidth, or a measured impulse response. Designs and figures then use the drive the qubit sees.', unit: 'a choice', typical: 'none, or Gaussian at a few hundred MHz', doc: SPEC('`line`') },
  'f-line-bw': { label: 'Bandwidth', what: "The line's −3 dB bandwidth.", unit: 'Hz (type 300 MHz; a bare number is MHz)', typical: '100-500 MHz', doc: SPEC('`line`') },
  'f-line-os': { label: 'Oversampling', what: 'Fine steps per sample on which the drive through the line is simulated (empty: 8).', unit: 'a whole number', typical: '8', doc: SPEC('`line`') },
  'f-line-delay': { label: 'Delay', what: 'Overall delay of the line, a whole number of fine steps (empty: none).', unit: 's (a bare number is ns)', typical: '0', doc: SPEC('`line`') },
  'f-line-bound': { label: 'Bound on', what: 'Where the amplitude limit holds: on the programmed samples only (the DAC’s full scale), or also on the drive the qubit sees.', unit: 'a choice', typical: 'the programmed samples', doc: SPEC('`line`') },
  ...axisHelp('detuning'),
  ...axisHelp('amplitudeError'),
  'f-starts': { label: 'Starts', what: 'Random starting pulses optimised independently; the best one is kept.', unit: 'a whole number', typical: '4-8', doc: SPEC('`optimizer`') },
  'f-seed': { label: 'Seed', what: 'Seed of the random starting pulses: the same seed gives the same pulse, bit for bit.', unit: 'a whole number', typical: '1', doc: SPEC('`optimizer`') },
  'f-iterations': { label: 'Iterations', what: 'Budget of L-BFGS iterations per start.', unit: 'a whole number', typical: '500-5000', doc: SPEC('`optimizer`') },
  'f-target-inf': { label: 'Target 1 − F', what: 'A start stops once the mean infidelity over the ensemble falls below this.', unit: 'a plain number (infidelity)', typical: '1e-10', doc: SPEC('`optimizer`') },
  'f-time': { label: 'Time limit', what: 'Wall-clock budget of the design (empty: none).', unit: 's (type 30 s, 2 min is 120 s; a bare number is s)', typical: '10 s-5 min', doc: SPEC('`optimizer`') },
  'f-gtol': { label: 'Gradient tol.', what: "A start stops once the gradient's largest component falls below this.", unit: 'a plain number', typical: '1e-12', doc: SPEC('`optimizer`') },
  'f-memory': { label: 'L-BFGS memory', what: 'Correction pairs the quasi-Newton step remembers.', unit: 'a whole number', typical: '12 (5-30)', doc: SPEC('`optimizer`') },
  'f-arithmetic': {
    label: 'Arithmetic',
    what: 'Which build of the core designs: portable rounds every multiply and add alone, so the same spec gives the same pulse in every browser and on the command line; fused lets the browser join a × b + c into one rounding (relaxed SIMD), about 1.1 × faster for designs, and another last bit can lead the optimiser to another pulse. Where the browser cannot run it, the portable build runs; the pulse records which ran.',
    unit: 'a choice', typical: 'portable', doc: SPEC('`optimizer`'),
  },
  'f-spec-json': { label: 'Spec JSON', what: 'The whole spec as JSON, for what the form does not show (explicit member lists, weights, Gauss-Legendre nodes). Applied only when it parses.', unit: 'JSON: Hz and seconds', typical: 'as written by the form', doc: SPEC('The design spec') },
  'm-d-min': { label: 'Map detuning from', what: 'Lowest detuning of the robustness map.', unit: 'Hz (a bare number is MHz)', typical: 'twice the ensemble’s range', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-d-max': { label: 'Map detuning to', what: 'Highest detuning of the robustness map.', unit: 'Hz (a bare number is MHz)', typical: '2 MHz', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-d-n': { label: 'Map detuning points', what: 'Grid points along detuning.', unit: 'a whole number (2 to 2001)', typical: '101', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-a-min': { label: 'Map amplitude error from', what: 'Lowest amplitude error of the robustness map.', unit: 'relative (a bare number is %)', typical: '-20 %', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-a-max': { label: 'Map amplitude error to', what: 'Highest amplitude error of the robustness map.', unit: 'relative (a bare number is %)', typical: '20 %', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-a-n': { label: 'Map amplitude error points', what: 'Grid points along amplitude error.', unit: 'a whole number (2 to 2001)', typical: '101', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-threshold': { label: 'Threshold', what: 'Infidelity the contour is drawn at; the robust area and half-widths count the points below it.', unit: 'a plain number (infidelity)', typical: '1e-4', doc: ANALYSIS('The summary figures') },
  'm-against': { label: 'Against', what: 'Another pulse of the session to hold this one against on the same grid.', unit: 'a choice', typical: 'a composite such as BB1, or an earlier design', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'm-versus': { label: 'How to show the other pulse', what: 'Its threshold contour over this map, both maps side by side on one colour bar, or the ratio of the two infidelities (blue where this pulse is better, red where the other is).', unit: 'a choice', typical: 'ratio of infidelities', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'compare-composite': { label: 'Composite sequences', what: 'Published sequences built for the same target under the same peak Rabi frequency and sample period, compared with the pulse.', unit: 'on or off each', typical: 'BB1, SK1, CORPSE', doc: README('Composite pulses and robustness analysis') },
  'open-': { label: 'Open in', what: 'Opens the row’s pulse in another view (and adds a composite to the session’s pulses).', unit: 'a choice', typical: 'robustness map', doc: ANALYSIS('Robustness analysis: maps, summary figures and comparisons') },
  'wf-mode': { label: 'Waveform display', what: 'I and Q against time, or amplitude √(I² + Q²) and phase atan2(Q, I).', unit: 'a choice', typical: 'I and Q', doc: README('Conventions') },
  'samples-goto': { label: 'Sample', what: 'Shows the page of the table that holds this sample (sample k is held from k·dt for dt).', unit: 'a sample number, from 0', typical: '0', doc: SPEC('The pulse file') },
  'b-from': { label: 'Initial state', what: 'Bloch vector the trajectories start from.', unit: 'a direction: +z is |0⟩', typical: '+z', doc: README('Conventions') },
  'b-show': { label: 'Members shown', what: 'One ensemble member, every member at once, or a chosen few; each path is coloured by how far from the target point it ends.', unit: 'a choice', typical: 'all members', doc: README('Conventions') },
  'b-member': { label: 'Member', what: 'The ensemble member (detuning Δ, amplitude error ε) whose trajectory is drawn.', unit: 'a choice', typical: 'no error', doc: README('Conventions') },
  'bloch-member': { label: 'Members to draw', what: 'Tick the ensemble members whose trajectories are drawn together.', unit: 'on or off each', typical: 'the corners of the ensemble', doc: README('Conventions') },
  's-span': { label: 'Span', what: 'Detunings the spectrum is drawn over: around the peak Rabi rate, the first Nyquist zone ±1/(2 dt), ±1/dt with the first images of the hold, or the robustness map’s range.', unit: 'a choice', typical: '±4 × peak Rabi', doc: ANALYSIS('Spectrum') },
  's-floor': { label: 'Floor', what: 'Lowest level drawn, in dB below the spectrum’s peak.', unit: 'dB', typical: '-80 dB', doc: ANALYSIS('Spectrum') },
  'x-sample-rate': { label: 'Sample rate', what: "The instrument's sample rate; the design's samples are held (or resampled) onto it.", unit: 'Hz (type 2.4 GHz, 1 GS/s is 1 GHz)', typical: '1-2.4 GHz', doc: README('From design to samples') },
  'x-resample': { label: 'Resample', what: "How the design's samples become the instrument's: held, nearest, linear, or averaged over each period.", unit: 'a choice', typical: 'hold (when dt is a whole number of periods)', doc: README('From design to samples') },
  'x-bits': { label: 'DAC', what: "Resolution of the instrument's converter; codes are signed integers.", unit: 'bits', typical: '14 or 16', doc: README('From design to samples') },
  'x-full-scale': { label: 'Full scale', what: 'Your calibration: the Rabi frequency the full-scale code produces on the qubit. Every figure depends on it.', unit: 'Hz (a bare number is MHz)', typical: '1.2 × the peak Rabi', doc: README('From design to samples') },
  'x-peak-limit': { label: 'Limit on', what: 'Whether full scale limits the amplitude √(I² + Q²) or each channel separately.', unit: 'a choice', typical: 'amplitude', doc: README('From design to samples') },
  'x-granularity': { label: 'Granularity', what: 'The waveform length is padded with zeros to a multiple of this block size.', unit: 'samples', typical: '16 or 32', doc: README('From design to samples') },
  'x-min-length': { label: 'Min length', what: 'Shortest waveform the instrument accepts; shorter ones are padded.', unit: 'samples', typical: '32-256', doc: README('From design to samples') },
  'x-max-length': { label: 'Max length', what: 'Longest waveform the instrument holds (empty: no limit); longer ones are refused.', unit: 'samples', typical: 'empty', doc: README('From design to samples') },
  'x-pad': { label: 'Padding', what: 'Where the zero padding goes: before, after, or split around the pulse.', unit: 'a choice', typical: 'after', doc: README('From design to samples') },
  'x-channels': { label: 'Channels', what: 'I and Q on two channels, or one real channel with the pulse single-sideband modulated at an intermediate frequency.', unit: 'a choice', typical: 'I and Q', doc: README('From design to samples') },
  'x-if': { label: 'IF', what: 'Intermediate frequency of the single-sideband channel.', unit: 'Hz (between 0 and half the sample rate)', typical: '50-200 MHz', doc: README('From design to samples') },
  'x-sideband': { label: 'Sideband', what: 'Which sideband of the intermediate frequency carries the pulse.', unit: 'a choice', typical: 'upper', doc: README('From design to samples') },
  'x-mixer-sign': { label: 'Mixer sign', what: 'Sign of the quadrature term, s(t) = I cos(2π f t) ∓ Q sin(2π f t), set by how your mixer is wired.', unit: 'a choice', typical: '+ (check on your setup)', doc: README('From design to samples') },
  'x-upconversion': {
    label: 'Upconversion',
    what: 'How your IQ mixer combines the two channels into the drive at the qubit: I cos + Q sin (the model’s own convention, Q written as designed) or I cos − Q sin (Q written negated, so the qubit still receives the designed drive).',
    unit: 'a choice',
    typical: 'plus (check the sign on your setup)',
    doc: README('From design to samples'),
  },
  'x-marker': { label: 'Marker channel', what: 'Adds a channel that is 1 while the pulse plays, for triggering.', unit: 'on or off', typical: 'off', doc: README('Formats') },
  'x-format': { label: 'Format', what: 'The file written: CSV, NumPy .npy, raw int16 with a JSON description, WAV, or pulse JSON.', unit: 'a choice', typical: 'npy', doc: README('Formats') },
  'x-units': { label: 'Units', what: 'Whether the file holds DAC codes or Rabi frequencies in Hz.', unit: 'a choice', typical: 'codes', doc: README('Formats') },
};

/** The help of a form control: by its data-help, its id (or the start of it), or its radio group's name. */
export function helpFor(control: { id?: string; name?: string; dataset?: { help?: string } }): FieldHelp | null {
  const keys = [control.dataset?.help, control.id, control.name].filter((k): k is string => !!k);
  for (const key of keys) if (FIELD_HELP[key]) return FIELD_HELP[key];
  for (const key of keys) {
    const prefix = Object.keys(FIELD_HELP).find((k) => k.endsWith('-') && key.startsWith(k));
    if (prefix) return FIELD_HELP[prefix];
  }
  return null;
}

/** A heading's anchor in a rendered page (lower case, words joined by hyphens). */
export function slug(heading: string): string {
  return heading
    .toLowerCase()
    .replace(/[`*_]/g, '')
    .replace(/[^\p{L}\p{N}]+/gu, '-')
    .replace(/^-|-$/g, '');
}
