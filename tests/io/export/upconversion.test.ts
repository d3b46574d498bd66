// The upconversion setting of I/Q exports: which sign the Q channel carries in the drive at
// the qubit. The qubit sees the designed drive when that drive is I cos(w t) + Q sin(w t)
// (docs/physics.md sections 1 and 5; checked against a lab-frame simulation in
// tests/core/lab-frame.test.ts). A mixer wired as I cos(w t) - Q_channel sin(w t) therefore
// needs Q_channel = -Q. Checked here: the written Q channel is the negated design
// (an identity of the definition), every header states the convention, every format reads
// back to the designed drive, and the figure of the read-back waveform (reference propagator,
// tests/reference/oracle.ts) equals that of the default export.
import { describe, expect, it } from 'vitest';
import { readPulse } from '../../../src/io/pulse.ts';
import { parseWaveformDescription } from '../../../src/io/export/description.ts';
import { samplesToPulse } from '../../../src/io/export/playback.ts';
import { encodeWaveform, WAVEFORM_FORMATS, type WaveformFormat } from '../../../src/io/export/formats.ts';
import { readWaveform } from '../../../src/io/export/read.ts';
import { parseExportSettings } from '../../../src/io/export/settings.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { SpecError } from '../../../src/core/errors.ts';
import { ensembleFigure } from '../../reference/oracle.ts';
import { gate, member, shapedPulse, thrown } from './helpers.ts';

const design = shapedPulse(9e6, 12, 4e-9);
const base = { sampleRate: 1e9, bits: 14 as const, fullScale: 1e7, granularity: 16 };
const fileName: Record<WaveformFormat, string> = { csv: 'w.csv', npy: 'w.npy', raw: 'w.bin', wav: 'w.wav', json: 'w.json' };

describe('upconversion "minus": the Q channel is written negated', () => {
  const plus = exportWaveform(design, base);
  const minus = exportWaveform(design, { ...base, upconversion: 'minus' });

  it('I codes unchanged, Q codes negated, the rest of the description alike', () => {
    expect(Array.from(minus.codes[0])).toEqual(Array.from(plus.codes[0]));
    expect(Array.from(minus.codes[1])).toEqual(Array.from(plus.codes[1], (c) => (c === 0 ? 0 : -c)));
    expect(plus.description.upconversion).toBe('plus');
    expect(minus.description.upconversion).toBe('minus');
    expect(minus.description.driveAtQubit).toMatch(/I cos\(2 pi f_d t\) - Q_channel sin\(2 pi f_d t\).*the Q channel holds -Q/);
    expect(plus.description.driveAtQubit).toMatch(/I cos\(2 pi f_d t\) \+ Q_channel sin\(2 pi f_d t\).*holds Q as designed/);
    expect(minus.description.peakCode).toBe(plus.description.peakCode);
  });

  for (const format of WAVEFORM_FORMATS) {
    it(`${format}: the header states it, and the file reads back to the designed drive`, async () => {
      const encoded = await encodeWaveform(minus, format);
      const text = (b: Uint8Array) => new TextDecoder().decode(b);
      // Where each format keeps its description.
      const header = format === 'npy' || format === 'raw' ? text(encoded.sidecar!) : text(encoded.bytes);
      expect(header).toMatch(format === 'csv' ? /^# upconversion: "minus"$/m : /"upconversion": ?"minus"/);
      expect(header).toContain('the Q channel holds -Q');
      if (format === 'csv') expect(header).toMatch(/^# drive at the qubit - I cos\(2 pi f_d t\) - Q_channel sin/m);

      const read = await readWaveform(encoded.bytes, fileName[format], { sidecar: encoded.sidecar ?? undefined });
      const reference = await readWaveform((await encodeWaveform(plus, format)).bytes, fileName[format], {
        sidecar: (await encodeWaveform(plus, format)).sidecar ?? undefined,
      });
      expect(Array.from(read.i)).toEqual(Array.from(reference.i));
      expect(Array.from(read.q)).toEqual(Array.from(reference.q));
      // The same gate as the default export, by the reference propagator.
      const members = [member(0, 0), member(1e6, -0.05), member(-2e6, 0.05)];
      const a = ensembleFigure(gate(Math.PI / 2), read, members);
      const b = ensembleFigure(gate(Math.PI / 2), reference, members);
      expect(a.mean).toBe(b.mean);
    });
  }

  it('a pulse JSON export read as a pulse (map, compare) gives the designed Q; asStored keeps the channel', async () => {
    const encoded = await encodeWaveform(minus, 'json');
    const text = new TextDecoder().decode(encoded.bytes);
    // The file itself holds the Q channel as played, -Q.
    expect((JSON.parse(text) as { q: number[] }).q[4]).toBeCloseTo(-design.q[1], -4);
    const asPulse = readPulse(text);
    const stored = readPulse(text, { asStored: true });
    const step = 1e7 / 8191;
    for (let n = 0; n < 48; n++) {
      const k = Math.floor(n / 4);
      const designed = k < 12 ? design.q[k] : 0;
      expect(Math.abs(asPulse.q[n] - designed)).toBeLessThanOrEqual(step / 2 + 1e-9);
      expect(stored.q[n]).toBe(asPulse.q[n] === 0 ? 0 : -asPulse.q[n]);
    }
  });
});

describe('settings and descriptions', () => {
  it('defaults to "plus"; refuses other values and "minus" with SSB, naming the field', () => {
    expect(parseExportSettings(base).upconversion).toBe('plus');
    const bad = thrown(SpecError, () => parseExportSettings({ ...base, upconversion: 'negative' }));
    expect(bad.message).toMatch(/upconversion.*negative.*"plus", "minus"/);
    const ssb = thrown(SpecError, () => parseExportSettings({ ...base, channels: 'ssb', intermediateFrequency: 1e8, upconversion: 'minus' }));
    expect(ssb.message).toMatch(/upconversion.*sideband and mixerSign/);
  });
  it('a version 1 description (written before the setting) reads as upconversion "plus"', () => {
    const d = exportWaveform(design, base).description;
    const { upconversion: _u, driveAtQubit: _d, ...rest } = d;
    const old = parseWaveformDescription({ ...rest, version: 1 }, 'old.csv');
    expect(old.upconversion).toBe('plus');
    expect(old.driveAtQubit).toBe(d.driveAtQubit);
  });
  it('a version 1 SSB file (s = I cos - Q sin at the IF, upper sideband) reads back as the drive it gives the qubit: Q negated', () => {
    // Today's formula with mixer sign -1 writes exactly the old upper-sideband channel.
    const old = exportWaveform(design, { ...base, channels: 'ssb', intermediateFrequency: 1e8, mixerSign: -1 });
    const { upconversion: _u, driveAtQubit: _d, ...rest } = old.description;
    const description = parseWaveformDescription({ ...rest, version: 1, mixerSign: 1 }, 'old.csv');
    const played = samplesToPulse({ description, units: 'codes', data: old.codes });
    const step = 1e7 / 8191;
    for (let n = 0; n < 48; n++) {
      const designed = design.q[Math.floor(n / 4)];
      expect(Math.abs(played.q[n] + designed)).toBeLessThan(2 * step);
    }
  });
  it('the SSB description states the sign of Q at the intermediate frequency and the sideband that reaches the qubit', () => {
    const upper = exportWaveform(design, { ...base, channels: 'ssb', intermediateFrequency: 1e8 }).description;
    const lower = exportWaveform(design, { ...base, channels: 'ssb', intermediateFrequency: 1e8, sideband: 'lower' }).description;
    expect(upper.driveAtQubit).toMatch(/^ssb = I cos\(2 pi f_IF t\) \+ Q sin\(2 pi f_IF t\); .*upper sideband \(f_d = f_LO \+ f_IF\)/);
    expect(lower.driveAtQubit).toMatch(/^ssb = I cos\(2 pi f_IF t\) - Q sin\(2 pi f_IF t\); .*lower sideband \(f_d = f_LO - f_IF\)/);
  });
});
