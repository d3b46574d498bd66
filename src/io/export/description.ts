// The description of an exported waveform: what a reader needs to turn samples back into
// Rabi frequencies and time (CSV header, raw's JSON file, WAV comment, pulse JSON metadata).
import { describeValue, PulseFormatError } from '../../core/errors.ts';
import {
  codeMax,
  RESAMPLE_METHODS,
  type ChannelLayout,
  type DacBits,
  type ExportSettings,
  type PeakLimit,
  type ResampleMethod,
  type Sideband,
  type Upconversion,
  UPCONVERSIONS,
} from './settings.ts';

/** A channel of an exported waveform. 'marker' holds 1 while the pulse plays, 0 in the padding. */
export type ChannelName = 'i' | 'q' | 'ssb' | 'marker';

/** Tag that marks a description written by this library. */
export const DESCRIPTION_KIND = 'gatesmith-waveform';

/** Everything about an exported waveform except its samples. Keys carry their units. */
export interface WaveformDescription {
  kind: typeof DESCRIPTION_KIND;
  /** 2 since the sign of Q is stated (upconversion, driveAtQubit); version 1 files read as upconversion "plus". */
  version: 2;
  sampleRateHz: number;
  bits: DacBits;
  /** The full-scale code, 2^(bits-1) - 1. */
  codeMax: number;
  /** Calibration: the Rabi frequency (Hz) of the full-scale code. */
  fullScaleHz: number;
  peakLimit: PeakLimit;
  /** Channels in file order (columns, interleaving order). */
  channels: ChannelName[];
  layout: ChannelLayout;
  /** 0 for layout 'iq'. The carrier's phase is zero at the file's first sample. */
  intermediateFrequencyHz: number;
  sideband: Sideband;
  mixerSign: 1 | -1;
  /** The sign of Q in the drive at the qubit for layout 'iq' ('minus': the Q channel holds -Q); "plus" for 'ssb'. */
  upconversion: Upconversion;
  /** The drive at the qubit in words and symbols (from layout, upconversion, sideband, mixerSign). */
  driveAtQubit: string;
  /** Samples per channel, padding included. */
  length: number;
  padBefore: number;
  padAfter: number;
  granularity: number;
  minLength: number;
  resample: ResampleMethod;
  /** The design's sample length (s) and count, which SSB demodulation needs. */
  designDtS: number;
  designSegments: number;
  /** Largest |code| of the signal channels. */
  peakCode: number;
  /** Largest drive amplitude of the quantised waveform (Hz): sqrt(I^2+Q^2), or |s| for SSB. */
  peakHz: number;
}

/** The channel names of a layout, in file order. */
export function channelNames(layout: ChannelLayout, marker: boolean): ChannelName[] {
  const names: ChannelName[] = layout === 'iq' ? ['i', 'q'] : ['ssb'];
  return marker ? [...names, 'marker'] : names;
}

/** The drive the qubit receives, stated in every export header (docs/physics.md section 5). */
export function driveAtQubit(d: Pick<WaveformDescription, 'layout' | 'upconversion' | 'sideband' | 'mixerSign'>): string {
  if (d.layout === 'iq') {
    const sign = d.upconversion === 'plus' ? '+' : '-';
    const q = d.upconversion === 'plus' ? 'the Q channel holds Q as designed' : 'the Q channel holds -Q';
    return `I cos(2 pi f_d t) ${sign} Q_channel sin(2 pi f_d t) after upconversion at the drive frequency f_d; ${q}, so the qubit sees I cos(2 pi f_d t) + Q sin(2 pi f_d t), the designed drive`;
  }
  const sigma = (d.sideband === 'upper' ? 1 : -1) * d.mixerSign;
  return (
    `ssb = I cos(2 pi f_IF t) ${sigma > 0 ? '+' : '-'} Q sin(2 pi f_IF t); mixed with the LO, the ${d.sideband} sideband ` +
    `(f_d = f_LO ${d.sideband === 'upper' ? '+' : '-'} f_IF) reaches the qubit as I cos(2 pi f_d t) + Q sin(2 pi f_d t), the designed drive`
  );
}

/** The SSB and timing settings a description implies (for demodulation). */
export function descriptionSettings(
  d: WaveformDescription,
): Pick<ExportSettings, 'sampleRate' | 'intermediateFrequency' | 'sideband' | 'mixerSign'> {
  return { sampleRate: d.sampleRateHz, intermediateFrequency: d.intermediateFrequencyHz, sideband: d.sideband, mixerSign: d.mixerSign };
}

/** Check a parsed description (from any container); `source` names the file in messages. */
export function parseWaveformDescription(input: unknown, source: string): WaveformDescription {
  const bad = (field: string, value: unknown, allowed: string): never => {
    throw new PulseFormatError(`${source}: description field ${field}: ${describeValue(value)} is not allowed; ${allowed}`);
  };
  if (typeof input !== 'object' || input === null || Array.isArray(input)) bad('(top level)', input, 'a JSON object');
  const o = input as Record<string, unknown>;
  if (o.kind !== DESCRIPTION_KIND) bad('kind', o.kind, `"${DESCRIPTION_KIND}"`);
  if (o.version !== 1 && o.version !== 2) bad('version', o.version, '1 or 2');
  const positive = (key: string): number => {
    const v = o[key];
    if (typeof v !== 'number' || !Number.isFinite(v) || !(v > 0)) bad(key, v, 'a finite number > 0');
    return v as number;
  };
  const whole = (key: string, min: number): number => {
    const v = o[key];
    if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < min) bad(key, v, `a whole number >= ${min}`);
    return v as number;
  };
  const oneOf = <T>(key: string, allowed: readonly T[]): T => {
    const v = o[key] as T;
    if (!allowed.includes(v)) bad(key, v, `one of ${allowed.map((a) => JSON.stringify(a)).join(', ')}`);
    return v;
  };
  const sampleRateHz = positive('sampleRateHz');
  const bits = oneOf('bits', [12, 14, 16] as const);
  if (o.codeMax !== codeMax(bits)) bad('codeMax', o.codeMax, `${codeMax(bits)} for ${bits} bits`);
  const fullScaleHz = positive('fullScaleHz');
  const peakLimit = oneOf('peakLimit', ['amplitude', 'per-channel'] as const);
  const layout = oneOf('layout', ['iq', 'ssb'] as const);
  const channels = o.channels;
  const withMarker = channelNames(layout, true);
  const without = channelNames(layout, false);
  const same = (a: unknown, b: string[]): boolean => Array.isArray(a) && a.length === b.length && a.every((x, k) => x === b[k]);
  if (!same(channels, without) && !same(channels, withMarker)) {
    bad('channels', channels, `${JSON.stringify(without)} or ${JSON.stringify(withMarker)} for layout "${layout}"`);
  }
  const sideband = oneOf('sideband', ['upper', 'lower'] as const);
  const mixerSign = oneOf('mixerSign', [1, -1] as const);
  // Version 1 did not state it; its I/Q files hold Q as designed.
  if (o.version === 1 && o.upconversion === undefined) o.upconversion = 'plus';
  const upconversion = oneOf('upconversion', UPCONVERSIONS);
  if (layout === 'ssb' && upconversion !== 'plus') bad('upconversion', upconversion, '"plus" for layout "ssb" (sideband and mixerSign set the sign of Q)');
  const f = o.intermediateFrequencyHz;
  if (layout === 'ssb') {
    if (typeof f !== 'number' || !(f > 0) || !(f < sampleRateHz / 2)) bad('intermediateFrequencyHz', f, `0 < f < ${sampleRateHz / 2} Hz`);
  } else if (f !== 0) {
    bad('intermediateFrequencyHz', f, '0 for layout "iq"');
  }
  const length = whole('length', 1);
  const padBefore = whole('padBefore', 0);
  const padAfter = whole('padAfter', 0);
  if (padBefore + padAfter >= length) bad('padBefore', padBefore, `padBefore + padAfter (${padAfter}) below length ${length}`);
  const granularity = whole('granularity', 1);
  const minLength = whole('minLength', 0);
  const resample = oneOf('resample', RESAMPLE_METHODS);
  const designDtS = positive('designDtS');
  const designSegments = whole('designSegments', 1);
  const peakCode = whole('peakCode', 0);
  if (peakCode > codeMax(bits)) bad('peakCode', peakCode, `at most ${codeMax(bits)}`);
  const peakHz = o.peakHz;
  if (typeof peakHz !== 'number' || !Number.isFinite(peakHz) || peakHz < 0) bad('peakHz', peakHz, 'a finite number >= 0');
  return {
    kind: DESCRIPTION_KIND,
    version: 2,
    sampleRateHz,
    bits,
    codeMax: codeMax(bits),
    fullScaleHz,
    peakLimit,
    channels: channels as ChannelName[],
    layout,
    intermediateFrequencyHz: f as number,
    sideband,
    mixerSign,
    upconversion,
    driveAtQubit: driveAtQubit({ layout, upconversion, sideband, mixerSign }),
    length,
    padBefore,
    padAfter,
    granularity,
    minLength,
    resample,
    designDtS,
    designSegments,
    peakCode,
    peakHz: peakHz as number,
  };
}
