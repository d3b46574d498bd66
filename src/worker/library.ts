// The library as the worker serves it: the same functions the command line calls.
import { blochTrajectory, design, evaluateMembers, robustnessMap, robustnessMapPart } from '../core/api.ts';
import { compare, evaluateJudged } from '../core/compare.ts';
import { compositeNames } from '../core/composites.ts';
import { dragFamily } from '../core/drag-family.ts';
import { ladderPopulations, ladderSubspaceLeakage } from '../core/ladder.ts';
import { qubitDrive } from '../core/line.ts';
import { cuts } from '../core/robustness.ts';
import { heldSpectrum } from '../core/spectrum.ts';
import { parseSpec } from '../core/spec.ts';
import { rectangularTime, shortestDuration } from '../core/shortest.ts';
import { readPulse, writePulse } from '../io/pulse.ts';
import { encodeWaveform, exportReport, exportWaveform, samplesToPulse, waveformSamples } from '../io/export/index.ts';
import type { CoreLibrary } from './service.ts';

/** The library bound for the worker's service. */
export const library: CoreLibrary = {
  parseSpec,
  design,
  shortest: shortestDuration,
  rectangularTime,
  evaluate: evaluateJudged,
  evaluateMembers,
  robustnessMap,
  robustnessMapPart,
  blochTrajectory,
  populations: (pulse, member, system, from, line) => {
    const drive = qubitDrive(pulse, line);
    const ladderMember = { ...member, anharmonicityError: member.anharmonicityError ?? 0 };
    const values = ladderPopulations(drive, ladderMember, system, from);
    return { levels: system.levels, dt: drive.dt, startS: drive.startS, values, averageLeakage: ladderSubspaceLeakage(drive, ladderMember, system) };
  },
  heldSpectrum,
  qubitDrive: (pulse, line) => qubitDrive(pulse, line),
  compare,
  cuts,
  composites: [...compositeNames, ...dragFamily],
  readPulse,
  writePulse,
  exportWaveform,
  exportReport,
  encodeWaveform,
  playedPulse: (waveform) => samplesToPulse(waveformSamples(waveform, 'codes')),
};
