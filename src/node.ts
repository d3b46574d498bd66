// Node-only helpers of the package (`gatesmith/node`): a design spread over worker threads,
// and reading any exported waveform file (with its description) back as a pulse.
export { designInThreads } from './core/threads.ts';
export type { ThreadedDesignOptions } from './core/threads.ts';
export { readWaveformFile } from './io/export/read-file.ts';
export type { NamedBytes } from './io/export/read-file.ts';
