// The library as the worker serves it: the same functions the command line calls.
import { blochTrajectory, design, evaluate, evaluateMembers, robustnessMap } from '../core/api.ts';
import { buildComposite, compositeNames, type CompositeName } from '../core/composites.ts';
import { cut, summarise } from '../core/robustness.ts';
import { heldSpectrum } from '../core/spectrum.ts';
import { parseSpec } from '../core/spec.ts';
import { readPulse, writePulse } from '../io/pulse.ts';
import { encodeWaveform, exportReport, exportWaveform, samplesToPulse, waveformSamples } from '../io/export/index.ts';
import type { CoreLibrary } from './service.ts';

/** The library bound for the worker's service. */
export const library: CoreLibrary = {
  parseSpec,
  design,
  evaluate,
  evaluateMembers,
  robustnessMap,
  blochTrajectory,
  heldSpectrum,
  summarise,
  cut,
  buildComposite: (name, options) => buildComposite(name as CompositeName, options),
  composites: compositeNames,
  readPulse,
  writePulse,
  exportWaveform,
  exportReport,
  encodeWaveform,
  playedPulse: (waveform) => samplesToPulse(waveformSamples(waveform, 'codes')),
};
