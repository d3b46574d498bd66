// From a design pulse to the waveform the instrument plays:
// resample -> pad -> (optional SSB) -> quantise (docs/physics.md sections 5 and 6).
import { ExportError } from '../../core/errors.ts';
import type { Pulse } from '../../core/types.ts';
import { checkPulse } from '../../core/encode.ts';
import { channelNames, DESCRIPTION_KIND, driveAtQubit, type WaveformDescription } from './description.ts';
import { padArray, padding } from './padding.ts';
import { codeStepHz, quantise } from './quantise.ts';
import { resamplePulse } from './resample.ts';
import { codeMax, parseExportSettings, type ExportSettings } from './settings.ts';
import { blockConditioning, modulateSsb } from './ssb.ts';
import { ssbBlocks } from './playback.ts';

/** Relative slack above full scale that counts as full scale (floating-point rounding of a design at its limit). */
export const FULL_SCALE_TOLERANCE = 1e-12;

/** A waveform ready to be written: codes per channel, the values they approximate, and its description. */
export interface ExportedWaveform {
  description: WaveformDescription;
  settings: ExportSettings;
  /** Codes per channel in description.channels order; the marker channel holds 0 or 1. */
  codes: Int16Array[];
  /** The values (Hz) before quantisation, per channel in the same order (marker 0 or 1). */
  ideal: Float64Array[];
  /** Instrument samples per design sample when whole, else null. */
  holdSamples: number | null;
  /** Things the engineer should know that do not stop the export (aliasing risk, rounding above full scale, ...). */
  warnings: string[];
}

/** Turn a design pulse into instrument samples; refuses (ExportError) rather than clip or guess. */
export function exportWaveform(pulse: Pulse, settingsInput: unknown): ExportedWaveform {
  const settings = parseExportSettings(settingsInput);
  checkPulse(pulse);
  const warnings: string[] = [];
  const fs = settings.sampleRate;
  const resampled = resamplePulse(pulse, fs, settings.resample);
  checkPeak(resampled.i, resampled.q, settings);
  const pad = padding(resampled.i.length, settings);
  const i = padArray(resampled.i, pad);
  const q = padArray(resampled.q, pad);
  const top = codeMax(settings.bits);
  const step = codeStepHz(settings.bits, settings.fullScale);

  let signal: Float64Array[];
  if (settings.channels === 'ssb') {
    // A ratio within rounding of a whole number counts as that number (dt = duration/segments
    // carries the division's last bit), as it does for holding.
    checkSsb(pulse, resampled.holdSamples ?? resampled.ratio, settings, warnings);
    signal = [modulateSsb(i, q, settings)];
  } else {
    // The Q channel carries the sign that makes the qubit see the designed drive.
    signal = [i, settings.upconversion === 'plus' ? q : q.map((x) => (x === 0 ? 0 : -x))];
  }
  const names = channelNames(settings.channels, settings.marker);
  const codes = signal.map((x, c) => quantise(x, settings.bits, settings.fullScale, names[c]));
  const ideal = [...signal];
  if (settings.marker) {
    const marker = new Int16Array(pad.length).fill(1, pad.before, pad.length - pad.after);
    codes.push(marker);
    ideal.push(Float64Array.from(marker));
  }

  let peakCode = 0;
  let peakSq = 0;
  for (let n = 0; n < pad.length; n++) {
    const a = codes[0][n];
    const b = settings.channels === 'iq' ? codes[1][n] : 0;
    peakCode = Math.max(peakCode, Math.abs(a), Math.abs(b));
    peakSq = Math.max(peakSq, a * a + b * b);
  }
  const peakHz = (Math.sqrt(peakSq) * settings.fullScale) / top;
  if (peakHz > settings.fullScale * (1 + FULL_SCALE_TOLERANCE)) {
    warnings.push(
      `rounding I and Q to codes lifts the peak amplitude to ${short(peakHz)} Hz, ${short((peakHz - settings.fullScale) / step)} codes ` +
        `above fullScale ${settings.fullScale} Hz (at most sqrt(2)/2 code)`,
    );
  }
  const description: WaveformDescription = {
    kind: DESCRIPTION_KIND,
    version: 2,
    sampleRateHz: fs,
    bits: settings.bits,
    codeMax: top,
    fullScaleHz: settings.fullScale,
    peakLimit: settings.peakLimit,
    channels: names,
    layout: settings.channels,
    intermediateFrequencyHz: settings.intermediateFrequency,
    sideband: settings.sideband,
    mixerSign: settings.mixerSign,
    upconversion: settings.upconversion,
    driveAtQubit: driveAtQubit({ layout: settings.channels, ...settings }),
    length: pad.length,
    padBefore: pad.before,
    padAfter: pad.after,
    granularity: settings.granularity,
    minLength: settings.minLength,
    resample: resampled.method,
    designDtS: pulse.dt,
    designSegments: pulse.i.length,
    peakCode,
    peakHz,
  };
  if (settings.channels === 'ssb') {
    // The report evaluates the demodulated waveform; say when demodulation amplifies rounding.
    const worstCondition = blockConditioning(ssbBlocks(description), settings);
    if (worstCondition > 100) {
      warnings.push(
        `SSB demodulation for evaluation amplifies quantisation noise up to ${Math.sqrt(worstCondition).toPrecision(3)} times: ` +
          `the carrier turns little within one design sample; a higher intermediate frequency separates I from Q better`,
      );
    }
  }
  return { description, settings, codes, ideal, holdSamples: resampled.holdSamples, warnings };
}

/** Refuse a waveform whose peak exceeds full scale (docs/physics.md section 6: never written, never clipped). */
function checkPeak(i: Float64Array, q: Float64Array, settings: ExportSettings): void {
  const limit = settings.fullScale * (1 + FULL_SCALE_TOLERANCE);
  let peak = 0;
  let where = 0;
  for (let n = 0; n < i.length; n++) {
    const v = settings.peakLimit === 'amplitude' ? Math.hypot(i[n], q[n]) : Math.max(Math.abs(i[n]), Math.abs(q[n]));
    if (v > peak) {
      peak = v;
      where = n;
    }
  }
  if (peak > limit) {
    const what = settings.peakLimit === 'amplitude' ? 'drive amplitude sqrt(I^2+Q^2)' : 'largest |I| or |Q|';
    throw new ExportError(
      `fullScale: the pulse's ${what} reaches ${peak} Hz (pulse sample ${where}), above the full scale of ${settings.fullScale} Hz; ` +
        `the waveform is not written (it is never clipped): lower the pulse amplitude, or give fullScale as the calibrated ` +
        `Rabi frequency of the full-scale code if it is higher`,
    );
  }
}

/** SSB needs room to separate I from Q and to stay below Nyquist; refuse what cannot work, warn on what is marginal. */
function checkSsb(pulse: Pulse, ratio: number, settings: ExportSettings, warnings: string[]): void {
  if (ratio < 2) {
    throw new ExportError(
      `channels: "ssb" needs at least 2 instrument samples per design sample (dt * sampleRate = ${ratio}) to be demodulated ` +
        `for evaluation; raise the sample rate or design with a longer dt`,
    );
  }
  const f = settings.intermediateFrequency;
  const nyquist = settings.sampleRate / 2;
  const lobe = 1 / pulse.dt;
  if (f + lobe > nyquist) {
    warnings.push(
      `the modulated pulse's main spectral lobe reaches f_IF + 1/dt = ${short(f + lobe)} Hz, above Nyquist (${short(nyquist)} Hz): ` +
        `its upper edge aliases; a lower intermediate frequency or a higher sample rate avoids it`,
    );
  }
  if (f < lobe) {
    warnings.push(
      `the intermediate frequency ${short(f)} Hz is below 1/dt = ${short(lobe)} Hz, the half-width of a design sample's main spectral ` +
        `lobe: the sideband and the mixer's image (2 f_IF apart) overlap, so the image cannot be filtered off`,
    );
  }
}

/** Six significant digits, without trailing noise (1/4e-9 prints as 250000000). */
function short(x: number): number {
  return Number(x.toPrecision(6));
}
