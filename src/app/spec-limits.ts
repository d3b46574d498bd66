// What the form says about a spec beyond the library's rules, in the form's own words and
// units: values the core cannot compute (refused: Run stays disabled and nothing reaches the
// core) and values that are physically odd (a visible warning that blocks nothing). Also the
// library's messages retold with the form's labels instead of spec keys.
import type { Problem } from '../core/types.ts';
import type { ErrorInfo } from '../worker/protocol.ts';
import { samplesPerSegment } from '../io/export/resample.ts';
import { formatQuantity, type Quantity } from './units.ts';

/** A form field as the user sees it: its label and what it holds. */
export interface FieldWords {
  label: string;
  quantity: Quantity | null;
}

const AXIS_WORDS = (title: string, quantity: Quantity): Record<string, FieldWords> => {
  const path = title === 'Detuning' ? 'ensemble.detuning' : 'ensemble.amplitudeError';
  return {
    [`${path}.min`]: { label: `${title} from`, quantity },
    [`${path}.max`]: { label: `${title} to`, quantity },
    [`${path}.points`]: { label: `${title} points`, quantity: 'count' },
    [`${path}.sigma`]: { label: `${title} sigma`, quantity },
    [`${path}.mean`]: { label: `${title} mean`, quantity },
    [`${path}.values`]: { label: `${title} values`, quantity: null },
    [path]: { label: title, quantity: null },
  };
};

/** The form's label and quantity of each spec field it shows, by dotted path. */
export const FIELD_WORDS: Record<string, FieldWords> = {
  'target.gate.axis': { label: 'Axis', quantity: null },
  'target.gate.angleDeg': { label: 'Angle', quantity: 'angle' },
  'target.state.from': { label: 'From', quantity: null },
  'target.state.to': { label: 'To', quantity: null },
  rabiMax: { label: 'Peak Rabi', quantity: 'frequency' },
  duration: { label: 'Duration', quantity: 'time' },
  segments: { label: 'Samples', quantity: 'count' },
  dt: { label: 'Sample period', quantity: 'time' },
  'constraints.smoothness': { label: 'Smoothness', quantity: 'number' },
  'constraints.zeroEdges': { label: 'First and last samples at zero', quantity: null },
  'constraints.amplitudeBound': { label: 'Bound', quantity: null },
  'optimizer.starts': { label: 'Starts', quantity: 'count' },
  'optimizer.seed': { label: 'Seed', quantity: 'count' },
  'optimizer.maxIterations': { label: 'Iterations', quantity: 'count' },
  'optimizer.targetInfidelity': { label: 'Target 1 − F', quantity: 'number' },
  'optimizer.timeLimit': { label: 'Time limit', quantity: 'time' },
  'optimizer.gradientTolerance': { label: 'Gradient tol.', quantity: 'number' },
  'optimizer.memory': { label: 'L-BFGS memory', quantity: 'count' },
  'optimizer.arithmetic': { label: 'Arithmetic', quantity: null },
  'system.levels': { label: 'Levels', quantity: 'count' },
  'system.anharmonicity': { label: 'Anharmonicity', quantity: 'frequency' },
  ...AXIS_WORDS('Detuning', 'frequency'),
  ...AXIS_WORDS('Amplitude error', 'relative'),
};

const UNIT_OF: Partial<Record<string, Quantity>> = { Hz: 'frequency', s: 'time', relative: 'relative' };
/** A library unit as the form's fields take it, for a rule without bounds. */
const UNIT_WORDS: Record<string, string> = { Hz: 'in Hz, kHz, MHz or GHz', s: 'in ns, µs, ms or s', relative: 'in %' };

/**
 * A library message retold with the form's label for its field and values in engineering
 * units ("rabiMax: -5000000 ..." becomes "Peak Rabi: -5 MHz ..."); other field names the
 * message mentions take their labels too. `table`: the form's fields (default the spec's).
 */
export function inFormWords(error: ErrorInfo, table: Record<string, FieldWords> = FIELD_WORDS): string {
  const words = error.field ? table[error.field] : undefined;
  let text = error.message;
  if (words && error.field && text.startsWith(`${error.field}: `)) {
    const rest = text.slice(error.field.length + 2);
    // The offending value, printed in the field's unit where it has one.
    const value = /^(-?[\d.]+(?:e[+-]?\d+)?) is not allowed/.exec(rest);
    const shown = value && words.quantity && words.quantity !== 'count' && words.quantity !== 'number' ? formatQuantity(Number(value[1]), words.quantity) : null;
    text = `${words.label}: ${shown ? rest.replace(value![1], shown) : rest}`;
  }
  // Other fields named in the message ("at least minLength (4)"), by their labels; a list of
  // the keys a JSON object allows keeps them as they are typed there.
  if (!text.includes('unknown key')) for (const [key, other] of Object.entries(table)) {
    if (/^[a-zA-Z]+$/.test(key)) text = text.replace(new RegExp(`\\b${key}\\b`, 'g'), other.label);
  }
  // A value the spec lacks: said as the form says it of an empty field.
  text = text.replace('missing value is not allowed; required: ', 'a value is required: ');
  // A rule's bounds the library gives with its unit after them ("a finite number >= 5000000
  // (Hz)", "... >= -0.1 (relative)"), each printed in engineering units instead.
  text = text.replace(/((?:a finite number|an integer)[^;()]*?) \((Hz|s|relative)\)/g, (all, rule: string, unit: string) => {
    const bound = /(?<=[<>=] |from |to |and )-?\d+(?:\.\d+)?(?:e[+-]?\d+)?\b/g;
    if (!bound.test(rule)) return `${rule} ${UNIT_WORDS[unit]}`;
    return rule.replace(bound, (number) => formatQuantity(Number(number), UNIT_OF[unit]!));
  });
  // Bounds the library gives in Hz or seconds, printed in engineering units.
  // Six digits at most: a peak the library prints as 9218246.533461157 Hz is 9.21825 MHz.
  return text.replace(/(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?) (Hz|s)\b/g, (all, number: string, unit: string) => formatQuantity(Number(Number(number).toPrecision(6)), UNIT_OF[unit]!));
}

/** Most turns of the qubit within one sample the core computes to full accuracy. */
export const MAX_TURNS_PER_SAMPLE = 1e6;
/** Largest relative amplitude error the form accepts (the drive 100 times its nominal). */
export const MAX_AMPLITUDE_ERROR = 100;
/** A sample period longer than this (1 ms) is far from any qubit drive's (common practice). */
export const ODD_SAMPLE_PERIOD_S = 1e-3;
/** A sample period shorter than this (1 ps) is shorter than any instrument's (common practice). */
export const SHORTEST_SAMPLE_PERIOD_S = 1e-12;
/** Above this peak Rabi frequency a drive is unusual for any qubit (common practice). */
export const ODD_RABI_HZ = 1e9;
/** A detuning range wider than this many times the peak Rabi frequency cannot be corrected by any pulse. */
export const ODD_DETUNING_RATIO = 10;
/** Rotation angles beyond this many degrees are unusual (they equal a smaller one). */
export const ODD_ANGLE_DEG = 720;

/** What the form says about one field. */
export interface FieldNoteText {
  field: string;
  message: string;
}

/** Refusals (the core cannot compute it) and warnings (physically odd) of a spec the library accepted. */
export interface SpecLimits {
  refusals: FieldNoteText[];
  warnings: FieldNoteText[];
}

// Rounded first, then printed in their shortest digits: "1e21 GHz", not "1.00e21 GHz".
const f = (hz: number) => formatQuantity(Number(hz.toPrecision(3)), 'frequency');
const t = (s: number) => formatQuantity(Number(s.toPrecision(5)), 'time');
const times = (x: number) => Number(x.toPrecision(2)).toExponential().replace('e+', 'e');

/**
 * The limits of a spec: refused where the qubit would turn more than MAX_TURNS_PER_SAMPLE
 * times within one sample (the core's phase loses its accuracy, and beyond about 1e9 turns
 * it returns no figure at all) or the amplitude error passes MAX_AMPLITUDE_ERROR; warned
 * where the peak Rabi frequency, the detuning range or the angle is odd, and where the
 * export's sample rate cannot hold the sample period.
 */
export function specLimits(problem: Problem, exportSampleRate: number): SpecLimits {
  const refusals: FieldNoteText[] = [];
  const warnings: FieldNoteText[] = [];
  const { rabiMax, dt, members } = problem;
  let largestError = 0;
  let largestDetuning = 0;
  let detuningField = 'ensemble.detuning.max';
  let errorField = 'ensemble.amplitudeError.max';
  for (const m of members) {
    if (Math.abs(m.amplitudeError) > largestError) {
      largestError = Math.abs(m.amplitudeError);
      errorField = m.amplitudeError < 0 ? 'ensemble.amplitudeError.min' : 'ensemble.amplitudeError.max';
    }
    if (Math.abs(m.detuning) > largestDetuning) {
      largestDetuning = Math.abs(m.detuning);
      detuningField = m.detuning < 0 ? 'ensemble.detuning.min' : 'ensemble.detuning.max';
    }
  }
  if (largestError > MAX_AMPLITUDE_ERROR) {
    refusals.push({ field: errorField, message: `${FIELD_WORDS[errorField].label}: an amplitude error of ${formatQuantity(Number(largestError.toPrecision(3)), 'relative')} is beyond what the form accepts (±${formatQuantity(MAX_AMPLITUDE_ERROR, 'relative')})` });
  }
  const driveTurns = rabiMax * (1 + Math.min(largestError, MAX_AMPLITUDE_ERROR)) * dt;
  const detuningTurns = largestDetuning * dt;
  if (Math.max(driveTurns, detuningTurns) > MAX_TURNS_PER_SAMPLE && dt > ODD_SAMPLE_PERIOD_S) {
    // A sample period far from any lab's is the one value to fix.
    const turns = Math.max(driveTurns, detuningTurns);
    refusals.push({
      field: 'duration',
      message: `Duration: a sample period of ${t(dt)} turns the qubit ${times(turns)} times within one sample; the core computes at most ${times(MAX_TURNS_PER_SAMPLE)} turns a sample`,
    });
  } else {
    if (driveTurns > MAX_TURNS_PER_SAMPLE) {
      refusals.push({
        field: 'rabiMax',
        message: `Peak Rabi: a peak Rabi frequency of ${f(rabiMax)} turns the qubit ${times(driveTurns)} times within one sample (${f(rabiMax)} × ${t(dt)}); the core computes at most ${times(MAX_TURNS_PER_SAMPLE)} turns a sample`,
      });
    }
    if (detuningTurns > MAX_TURNS_PER_SAMPLE) {
      refusals.push({
        field: detuningField,
        message: `${FIELD_WORDS[detuningField].label}: a detuning of ${f(largestDetuning)} turns the qubit ${times(detuningTurns)} times within one sample of ${t(dt)}; the core computes at most ${times(MAX_TURNS_PER_SAMPLE)} turns a sample`,
      });
    }
  }
  if (rabiMax > ODD_RABI_HZ) {
    warnings.push({ field: 'rabiMax', message: `${f(rabiMax)} is above ${f(ODD_RABI_HZ)}, beyond any usual qubit drive: is the unit right?` });
  }
  const detunings = members.map((m) => m.detuning);
  const width = detunings.length ? Math.max(...detunings) - Math.min(...detunings) : 0;
  if (width > ODD_DETUNING_RATIO * rabiMax) {
    warnings.push({
      field: 'ensemble.detuning',
      message: `The detuning range, ${f(width)} wide, is more than ${ODD_DETUNING_RATIO} times the peak Rabi frequency (${f(rabiMax)}): no pulse holds a gate over it`,
    });
  }
  if (problem.target.kind === 'gate') {
    const angleDeg = (problem.target.angleRad * 180) / Math.PI;
    if (Math.abs(angleDeg) > ODD_ANGLE_DEG) {
      warnings.push({ field: 'target.gate.angleDeg', message: `${formatQuantity(angleDeg, 'angle', { significant: 6 })} is beyond ±${ODD_ANGLE_DEG}°: the same gate as ${formatQuantity(((angleDeg % 360) + 360) % 360, 'angle', { significant: 6 })}` });
    }
  }
  const { ratio, whole } = samplesPerSegment(dt, exportSampleRate);
  if (dt < SHORTEST_SAMPLE_PERIOD_S) {
    // "2e-7" typed into Duration for 200 ns: a bare number there is in ns, so 2e-7 ns.
    warnings.push({ field: 'dt', message: `a sample period of ${t(dt)} is below any instrument's ${t(SHORTEST_SAMPLE_PERIOD_S)}: a bare number is in ns; write the unit, as in "200 ns" or "2e-7 s"` });
  } else if (Number.isFinite(ratio) && whole === null) {
    const text = `${t(dt)} is ${Number(ratio.toPrecision(5))} periods of the export's ${f(exportSampleRate).replace('Hz', 'S/s')}: the instrument cannot hold each sample, the export will resample`;
    warnings.push({ field: 'dt', message: text });
  }
  return { refusals, warnings };
}
