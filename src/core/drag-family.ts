// The DRAG family as rows of a comparison: Gaussian and cosine envelopes with the DRAG
// quadrature and a drive detuning (drag.ts), built under the spec's limits (duration,
// segments, peak) and calibrated on the spec's ensemble, system and figure as a lab would.
// compare() builds them beside the composite sequences; their calibrated values travel in
// the pulse's metadata (`drag`) and in the row's name.
import { calibrateDrag, type DragEnvelope } from './drag.ts';
import type { Problem, Pulse } from './types.ts';

/** A member of the DRAG family as listings show it (the same fields as a composite sequence's). */
export interface DragFamilyInfo {
  name: string;
  title: string;
  corrects: string;
  source: string;
  angles: string;
}

const SOURCE = 'quadrature: Motzoi, Gambetta, Rebentrost, Wilhelm, PRL 103, 110501 (2009); drive detuning: Gambetta, Motzoi, Merkel, Wilhelm, PRA 83, 012308 (2011)';
const ANGLES = "any angle about an axis in the xy-plane; calibrated on a spec (compare, the app's comparison), not built alone";

/** The DRAG family: each envelope with the DRAG quadrature and the drive detuning. */
export const dragFamily: readonly DragFamilyInfo[] = [
  {
    name: 'drag-gaussian', title: 'DRAG Gaussian',
    corrects: "leakage to level 2 and the qubit's AC Stark shift of a transmon; amplitude, beta and drive detuning tuned on the spec's ensemble",
    source: SOURCE, angles: ANGLES,
  },
  {
    name: 'drag-cosine', title: 'DRAG cosine',
    corrects: "leakage to level 2 and the qubit's AC Stark shift of a transmon; amplitude, beta and drive detuning tuned on the spec's ensemble",
    source: SOURCE, angles: ANGLES,
  },
];

/** Whether a name is a member of the DRAG family. */
export function isDragName(name: string): boolean {
  return dragFamily.some((d) => d.name === name);
}

/** One DRAG row: the calibrated pulse, or why it cannot be built for the spec. */
export interface DragForSpec {
  name: string;
  title: string;
  pulse?: Pulse;
  error?: { name: string; message: string };
}

/** Build and calibrate the named members of the family for a spec's problem, in the order asked. */
export function dragFamilyFor(problem: Problem, names: readonly string[]): DragForSpec[] {
  return names.map((name) => {
    const info = dragFamily.find((d) => d.name === name)!;
    const envelope: DragEnvelope = name === 'drag-gaussian' ? 'gaussian' : 'cosine';
    try {
      const { pulse, parameters } = calibrateDrag(problem, { envelope });
      const values = `amplitude x${parameters.amplitudeScale.toFixed(4)}, beta ${parameters.beta.toFixed(3)}, ` +
        `drive detuning ${(parameters.driveDetuning / 1e6).toFixed(3)} MHz`;
      pulse.metadata.name = info.title;
      pulse.metadata.calibration = values;
      return { name, title: `${info.title} (calibrated: ${values})`, pulse };
    } catch (error) {
      const e = error as Error;
      return { name, title: info.title, error: { name: e.name, message: `${name}: ${e.message}` } };
    }
  });
}
