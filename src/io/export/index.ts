// The export library's public surface for the app and the command line (browser-safe:
// the Node file reader lives in read-file.ts and is not re-exported here).
export { parseExportSettings, codeMax, EXPORT_DEFAULTS, RESAMPLE_METHODS, UPCONVERSIONS } from './settings.ts';
export type { ExportSettings, ExportSettingsInput, ResampleMethod, DacBits, PadPlacement, ChannelLayout, Sideband, PeakLimit, Upconversion } from './settings.ts';
export { exportWaveform, FULL_SCALE_TOLERANCE } from './waveform.ts';
export type { ExportedWaveform } from './waveform.ts';
export type { WaveformDescription, ChannelName } from './description.ts';
export { samplesToPulse, waveformSamples } from './playback.ts';
export type { WaveformSamples, SampleUnits, PlaybackOptions } from './playback.ts';
export { encodeWaveform, decodeWaveform, detectFormat, WAVEFORM_FORMATS, FORMAT_UNITS, FORMAT_FILES } from './formats.ts';
export type { WaveformFormat, EncodedWaveform, EncodeOptions, DecodeOptions } from './formats.ts';
export { readWaveform } from './read.ts';
export { exportReport, evaluatorFor } from './report.ts';
export type { ExportReport, GateFigures, PulseEvaluator } from './report.ts';
export { sha256Hex } from './sha256.ts';
export type { Sha256 } from './sha256.ts';
