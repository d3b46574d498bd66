// The export settings: one typed object shared by the library, the command line and
// the app, and its validator. Units: Hz, seconds, samples (docs/physics.md section 5).
import { SpecError } from '../../core/errors.ts';

/**
 * How the design's samples (length dt) become instrument samples (period 1/sampleRate).
 * 'hold': each design sample is held for dt*sampleRate instrument samples; only when that is
 *   a whole number.
 * 'hold-nearest': each instrument sample takes the design sample under its centre
 *   (a zero-order hold sampled at sample centres).
 * 'linear': straight lines between the centres of the design samples, read at the
 *   instrument sample centres (held flat before the first and after the last centre).
 * 'average': the mean of the design over each instrument sample period (keeps the pulse
 *   area, hence a one-axis rotation angle, exact).
 */
export type ResampleMethod = 'hold' | 'hold-nearest' | 'linear' | 'average';

/** The resampling methods, in the order listed in messages. */
export const RESAMPLE_METHODS: readonly ResampleMethod[] = ['hold', 'hold-nearest', 'linear', 'average'];

/** Signed DAC resolutions offered. */
export type DacBits = 12 | 14 | 16;

/** Where zero padding goes: all before the pulse, all after, or split (the odd sample after). */
export type PadPlacement = 'before' | 'after' | 'split';

/** Two channels I and Q, or one real channel single-sideband modulated at an intermediate frequency. */
export type ChannelLayout = 'iq' | 'ssb';

/** Which mixer sideband carries the pulse in single-sideband mode. */
export type Sideband = 'upper' | 'lower';

/**
 * The sign the Q channel carries in the drive that reaches the qubit when the two channels
 * I and Q are upconverted to the drive frequency f_d (the mixer's wiring):
 * 'plus' s(t) = I cos(2 pi f_d t) + Q sin(2 pi f_d t), the model's own convention
 * (docs/physics.md sections 1 and 5), so Q is written as designed;
 * 'minus' s(t) = I cos(2 pi f_d t) - Q sin(2 pi f_d t), so Q is written negated and the
 * qubit still sees the designed drive.
 */
export type Upconversion = 'plus' | 'minus';

/** The upconversion conventions, in the order listed in messages. */
export const UPCONVERSIONS: readonly Upconversion[] = ['plus', 'minus'];

/**
 * What the full-scale limit applies to: 'amplitude' refuses sqrt(I^2+Q^2) above full scale
 * (the default, as the design's disc bound); 'per-channel' refuses only |I| or |Q| above it,
 * which lets the drive amplitude reach sqrt(2) times full scale and must be asked for.
 */
export type PeakLimit = 'amplitude' | 'per-channel';

/** Everything that turns a design pulse into the sample arrays an instrument plays. */
export interface ExportSettings {
  /** Instrument sample rate (Hz). */
  sampleRate: number;
  /** How design samples map to instrument samples; 'hold' only when dt is a whole number of periods. */
  resample: ResampleMethod;
  /** Signed DAC resolution (bits). */
  bits: DacBits;
  /** Calibration: the Rabi frequency (Hz) that the full-scale code 2^(bits-1)-1 produces. */
  fullScale: number;
  /** What the full-scale limit applies to. */
  peakLimit: PeakLimit;
  /** The padded length is a multiple of this block size (samples). */
  granularity: number;
  /** The padded length is at least this (samples). */
  minLength: number;
  /** The padded length may not exceed this (the instrument's memory, samples); Infinity = no limit. */
  maxLength: number;
  /** Where the zero padding goes. */
  pad: PadPlacement;
  /** Two channels I, Q or one single-sideband channel. */
  channels: ChannelLayout;
  /** Intermediate frequency of single-sideband modulation (Hz, 0 < f < sampleRate/2); 0 for 'iq'. */
  intermediateFrequency: number;
  /** The sideband that carries the pulse ('ssb' only). */
  sideband: Sideband;
  /** +1 or -1: flips the sign of the Q term to match the mixer's wiring ('ssb' only). */
  mixerSign: 1 | -1;
  /** The sign of Q in the drive at the qubit, s = I cos + Q sin or I cos - Q sin ('iq' only; see Upconversion). */
  upconversion: Upconversion;
  /** Add a marker channel, 1 while the pulse plays and 0 in the padding. */
  marker: boolean;
}

/** The settings as a caller may give them: the required three plus any of the rest. */
export type ExportSettingsInput = Partial<ExportSettings> & Pick<ExportSettings, 'sampleRate' | 'bits' | 'fullScale'>;

/** Values used for the fields a caller leaves out. */
export const EXPORT_DEFAULTS: Omit<ExportSettings, 'sampleRate' | 'bits' | 'fullScale'> = {
  resample: 'hold',
  peakLimit: 'amplitude',
  granularity: 1,
  minLength: 0,
  maxLength: Infinity,
  pad: 'after',
  channels: 'iq',
  intermediateFrequency: 0,
  sideband: 'upper',
  mixerSign: 1,
  upconversion: 'plus',
  marker: false,
};

const FIELDS = ['sampleRate', 'bits', 'fullScale', ...Object.keys(EXPORT_DEFAULTS)];

/** The largest code of a signed DAC of `bits` bits, 2^(bits-1) - 1. */
export function codeMax(bits: DacBits): number {
  return 2 ** (bits - 1) - 1;
}

/**
 * The sign s of the Q term in the SSB channel s(t) = I cos(2 pi f t) + s Q sin(2 pi f t):
 * +1 for the upper sideband with mixer sign +1, so that after mixing with the LO the chosen
 * sideband reaches the qubit as I cos(2 pi f_d t) + Q sin(2 pi f_d t) (docs/physics.md section 5).
 */
export function ssbQSign(settings: Pick<ExportSettings, 'sideband' | 'mixerSign'>): 1 | -1 {
  return ((settings.sideband === 'upper' ? 1 : -1) * settings.mixerSign) as 1 | -1;
}

/** Validate and complete export settings; every error names the field, its value and what is allowed. */
export function parseExportSettings(input: unknown): ExportSettings {
  if (typeof input !== 'object' || input === null || Array.isArray(input)) {
    throw new SpecError('exportSettings', input, 'an object with sampleRate, bits and fullScale');
  }
  const obj = input as Record<string, unknown>;
  for (const key of Object.keys(obj)) {
    if (!FIELDS.includes(key)) throw new SpecError(key, obj[key], `unknown field; the fields are ${FIELDS.join(', ')}`);
  }
  const get = <K extends keyof ExportSettings>(key: K): unknown =>
    obj[key] === undefined ? (EXPORT_DEFAULTS as Partial<ExportSettings>)[key] : obj[key];

  const sampleRate = positiveHz('sampleRate', get('sampleRate'), 'the instrument sample rate');
  const bits = get('bits');
  if (bits !== 12 && bits !== 14 && bits !== 16) throw new SpecError('bits', bits, 'one of 12, 14, 16 (signed DAC codes)');
  const fullScale = positiveHz('fullScale', get('fullScale'), 'the Rabi frequency that the full-scale code produces');
  const resample = oneOf('resample', get('resample'), RESAMPLE_METHODS);
  const peakLimit = oneOf('peakLimit', get('peakLimit'), ['amplitude', 'per-channel'] as const);
  const granularity = wholeNumber('granularity', get('granularity'), 1, 'a whole number of samples >= 1 (the block size)');
  const minLength = wholeNumber('minLength', get('minLength'), 0, 'a whole number of samples >= 0');
  const maxLengthRaw = get('maxLength');
  const maxLength =
    maxLengthRaw === Infinity || maxLengthRaw === null
      ? Infinity
      : wholeNumber('maxLength', maxLengthRaw, 1, 'a whole number of samples >= 1, or Infinity for no limit');
  if (maxLength < minLength) throw new SpecError('maxLength', maxLength, `at least minLength (${minLength})`);
  if (maxLength < granularity) throw new SpecError('maxLength', maxLength, `at least granularity (${granularity})`);
  const pad = oneOf('pad', get('pad'), ['before', 'after', 'split'] as const);
  const channels = oneOf('channels', get('channels'), ['iq', 'ssb'] as const);
  const sideband = oneOf('sideband', get('sideband'), ['upper', 'lower'] as const);
  const mixerSign = get('mixerSign');
  if (mixerSign !== 1 && mixerSign !== -1) throw new SpecError('mixerSign', mixerSign, '1 or -1');
  const upconversion = oneOf('upconversion', get('upconversion'), UPCONVERSIONS);
  if (channels === 'ssb' && upconversion !== 'plus') {
    throw new SpecError('upconversion', upconversion, '"plus" (or leave it out) for channels "ssb": there sideband and mixerSign set the sign of Q');
  }
  const marker = get('marker');
  if (typeof marker !== 'boolean') throw new SpecError('marker', marker, 'true or false');

  const f = obj.intermediateFrequency;
  let intermediateFrequency = 0;
  if (channels === 'ssb') {
    const nyquist = sampleRate / 2;
    if (typeof f !== 'number' || !Number.isFinite(f) || !(f > 0) || !(f < nyquist)) {
      throw new SpecError('intermediateFrequency', f, `a frequency with 0 < f < sampleRate/2 = ${nyquist} Hz (Nyquist) for channels "ssb"`);
    }
    intermediateFrequency = f;
  } else if (f !== undefined && f !== 0) {
    throw new SpecError('intermediateFrequency', f, 'only used with channels "ssb"; leave it out (or 0) for channels "iq"');
  }
  return {
    sampleRate,
    resample,
    bits,
    fullScale,
    peakLimit,
    granularity,
    minLength,
    maxLength,
    pad,
    channels,
    intermediateFrequency,
    sideband,
    mixerSign,
    upconversion,
    marker,
  };
}

/** A frequency in Hz above zero (the sample rate, the full scale's Rabi frequency). */
function positiveHz(field: string, value: unknown, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || !(value > 0)) {
    throw new SpecError(field, value, `a finite number > 0 Hz: ${what}`);
  }
  return value;
}

function wholeNumber(field: string, value: unknown, min: number, allowed: string): number {
  if (typeof value !== 'number' || !Number.isSafeInteger(value) || value < min) throw new SpecError(field, value, allowed);
  return value;
}

function oneOf<T extends string>(field: string, value: unknown, allowed: readonly T[]): T {
  if (typeof value !== 'string' || !(allowed as readonly string[]).includes(value)) {
    throw new SpecError(field, value, `one of ${allowed.map((a) => JSON.stringify(a)).join(', ')}`);
  }
  return value as T;
}
