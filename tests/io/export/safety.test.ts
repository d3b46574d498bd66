// What the README's Safety paragraph promises about export, checked: a pulse above full scale
// is refused; no code exceeds the full-scale code; with the amplitude limit, rounding I and Q
// separately lifts the amplitude by at most sqrt(2)/2 code (each channel is off by at most
// half a code, and |(a, b)| <= sqrt(a^2 + b^2) with a, b <= 1/2: the triangle inequality),
// and the report says so when it happens.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { writePulse } from '../../../src/io/pulse.ts';
import { run } from '../../cli/run.ts';
import { rectangular } from './helpers.ts';

const FULL_SCALE = 1e7;
const CODE_MAX = 8191; // 14 bits: 2^13 - 1
const README = readFileSync(new URL('../../../README.md', import.meta.url), 'utf8');

/** A drive phase at which both I and Q of a full-scale pulse round up (found by scanning). */
function phaseRoundingUp(): number {
  for (let k = 1; k < 10000; k++) {
    const phase = (k / 10000) * (Math.PI / 2);
    const i = CODE_MAX * Math.cos(phase), q = CODE_MAX * Math.sin(phase);
    if (Math.hypot(Math.round(i), Math.round(q)) > CODE_MAX + 0.5) return phase;
  }
  throw new Error('no such phase');
}

describe('export safety', () => {
  it('the README states the guarantee: refused above full scale, no code above full scale, about 0.7 code on the amplitude', () => {
    const safety = README.slice(README.indexOf('> **Safety.**'), README.indexOf('## Contents'));
    expect(safety).toContain('refuses, rather than clips');
    expect(safety).toContain('no code it writes exceeds the full-scale code');
    expect(safety).toContain('about 0.7 code (`sqrt(2)/2`) above full scale');
    expect(safety).toContain('the report says so');
  });

  it('over 2000 drive phases at full scale: no channel code above 8191, the amplitude at most sqrt(2)/2 code above', () => {
    let worst = 0;
    for (let k = 0; k < 2000; k++) {
      const w = exportWaveform(rectangular(FULL_SCALE, 4, 1e-9, (k / 2000) * 2 * Math.PI), { sampleRate: 1e9, bits: 14, fullScale: FULL_SCALE });
      for (let n = 0; n < 4; n++) {
        const a = w.codes[0][n], b = w.codes[1][n];
        expect(Math.max(Math.abs(a), Math.abs(b))).toBeLessThanOrEqual(CODE_MAX);
        worst = Math.max(worst, Math.hypot(a, b) - CODE_MAX);
      }
    }
    expect(worst).toBeGreaterThan(0.5); // it does happen
    expect(worst).toBeLessThanOrEqual(Math.SQRT1_2);
  });

  it('the command reports it when rounding lifts the amplitude, and still refuses a pulse above full scale', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'gatesmith-safety-'));
    try {
      const pulse = join(dir, 'edge.json');
      writeFileSync(pulse, writePulse(rectangular(FULL_SCALE, 10, 2e-9, phaseRoundingUp())));
      const args = ['--format', 'csv', '--sample-rate', '1e9', '--bits', '14', '--full-scale', String(FULL_SCALE)];
      const r = await run(['export', pulse, ...args, '--out', join(dir, 'edge.csv'), '--json']);
      expect(r.code, r.stderr).toBe(0);
      const json = JSON.parse(r.stdout);
      expect(json.warnings.some((w: string) => /lifts the peak amplitude .* codes above fullScale .* \(at most sqrt\(2\)\/2 code\)/.test(w))).toBe(true);
      expect(json.peak.code).toBeLessThanOrEqual(CODE_MAX);
      const text = await run(['export', pulse, ...args, '--out', join(dir, 'edge2.csv')]);
      expect(text.stdout).toMatch(/warning: rounding I and Q to codes lifts the peak amplitude/);
      const above = join(dir, 'above.json');
      writeFileSync(above, writePulse(rectangular(FULL_SCALE * 1.001, 10, 2e-9)));
      const refused = await run(['export', above, ...args, '--out', join(dir, 'above.csv')]);
      expect(refused.code).toBe(1);
      expect(refused.stderr).toContain('the waveform is not written (it is never clipped)');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
