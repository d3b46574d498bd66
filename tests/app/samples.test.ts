// The sample table: each row is the sample's own numbers in the column's unit, sample k
// held over [k dt, (k+1) dt) (the pulse file's definition, README "File formats"), the
// amplitude sqrt(I^2 + Q^2) and the phase atan2(Q, I) (README "Conventions").
import { describe, expect, it } from 'vitest';
import { sampleHeader, sampleRow, samplesText, sampleUnits } from '../../src/app/samples.ts';

const pulse = { dt: 10e-9, i: Float64Array.from([0, 0, 0, 0, 5e6, 0, 0, 0, 0, -3e6]), q: Float64Array.from([0, 0, 0, 0, 0, 0, 0, 0, 0, 4e6]) };

describe('sample table', () => {
  it('gives each column one engineering unit, named in its header', () => {
    const units = sampleUnits(pulse);
    expect(sampleHeader(units)).toEqual(['sample', 'start (ns)', 'I (MHz)', 'Q (MHz)', 'amplitude (MHz)', 'phase (°)']);
  });

  it('starts sample k at k dt, with amplitude and phase of (I, Q), and no phase at zero amplitude', () => {
    const units = sampleUnits(pulse);
    expect(sampleRow(pulse, 4, units)).toEqual(['4', '40', '5', '0', '5', '0']);
    expect(sampleRow(pulse, 0, units)).toEqual(['0', '0', '0', '0', '0', '']);
    // (-3, 4) MHz: a 3-4-5 triangle, phase 180° - atan(4/3) = 126.8698976°.
    expect(sampleRow(pulse, 9, units)).toEqual(['9', '90', '-3', '4', '5', '126.8698976']);
  });

  it('copies every sample, as TSV or CSV, however long the pulse', async () => {
    const n = 12_345;
    const long = { dt: 2e-9, i: new Float64Array(n).fill(1e7), q: new Float64Array(n) };
    const csv = await samplesText(long, ',');
    const lines = csv.trimEnd().split('\n');
    expect(lines).toHaveLength(n + 1);
    expect(lines[0]).toBe('sample,start (µs),I (MHz),Q (MHz),amplitude (MHz),phase (°)');
    expect(lines[n]).toBe(`${n - 1},${Number((((n - 1) * 2e-9) / 1e-6).toPrecision(10))},10,0,10,0`);
    expect((await samplesText(pulse, '\t')).split('\n')[5]).toBe('4\t40\t5\t0\t5\t0');
  });
});
