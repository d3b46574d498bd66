// Numbers that are probably in the wrong unit: every file and flag is in Hz and seconds, and
// a duration of 200 (meant as ns) or a rabiMax of 10 (meant as MHz) is valid but surely not
// meant. Each warning names the field, the value read, and the value probably intended; the
// command still runs as told. The bounds are common practice for qubit drives (no lab drives
// a qubit below 1 kHz of Rabi frequency, samples an AWG below 1 kS/s, or holds one sample
// of a pulse for a second).
import type { Problem } from '../core/types.ts';
import { formatFrequency, formatTime } from './format.ts';

/** Below this a frequency in Hz is taken as typed in MHz (or GS/s for a sample rate). */
const LOWEST_PLAUSIBLE_HZ = 1e3;
/** Above this a sample time (s) is taken as typed in ns. */
const LONGEST_PLAUSIBLE_SAMPLE_S = 1e-3;

/** `12e6` style: the shortest exact text of a number in scientific notation when that is shorter. */
function plain(x: number): string {
  const exp = x.toExponential().replace('e+', 'e');
  const text = String(x);
  return exp.length < text.length ? exp : text;
}

/** A frequency field typed in MHz (or a sample rate in GS/s, `prefix` 1e9). */
export function frequencyWarning(field: string, hz: number, prefix = 1e6, unitWord = 'MHz'): string | null {
  if (!(hz > 0 && hz < LOWEST_PLAUSIBLE_HZ)) return null;
  const meant = hz * prefix;
  return `${field} ${plain(hz)} is ${formatFrequency(hz)}, probably not meant (values are in Hz): did you mean ${plain(hz)} ${unitWord}, ${field} ${plain(meant)}?`;
}

/** A sample time typed in ns. */
export function sampleTimeWarning(field: string, seconds: number): string | null {
  if (!(seconds > LONGEST_PLAUSIBLE_SAMPLE_S)) return null;
  return `${field} ${plain(seconds)} is ${formatTime(seconds)} per sample, probably not meant (times are in seconds): did you mean ${plain(seconds)} ns, ${field} ${plain(seconds / 1e9)}?`;
}

/** Warnings about a spec's duration and rabiMax. */
export function specUnitWarnings(problem: Problem): string[] {
  const warnings: string[] = [];
  if (problem.dt > LONGEST_PLAUSIBLE_SAMPLE_S) {
    const d = problem.duration;
    warnings.push(
      `duration ${plain(d)} is ${formatTime(d)} (${formatTime(problem.dt)} per segment), probably not meant (the spec is in seconds): ` +
        `did you mean ${plain(d)} ns, duration ${plain(d / 1e9)}?`,
    );
  }
  const rabi = frequencyWarning('rabiMax', problem.rabiMax);
  if (rabi) warnings.push(rabi);
  return warnings;
}
