// The project file and the link: what is written reads back whole, and what is malformed
// is refused with a message naming the place, before anything is replaced.
import { describe, expect, it } from 'vitest';
import { demoSpec } from '../../src/app/demo.ts';
import { defaultExportForm } from '../../src/app/export-form.ts';
import {
  defaultSettings,
  parseProject,
  PROJECT_FORMAT,
  PROJECT_VERSION,
  ProjectFormatError,
  projectText,
  specFromHash,
  specHash,
  type Project,
} from '../../src/app/project.ts';

function project(): Project {
  return {
    format: PROJECT_FORMAT,
    version: PROJECT_VERSION,
    savedAt: '2025-01-01T00:00:00.000Z',
    spec: demoSpec(),
    pulses: [
      // Doubles chosen to need all 17 significant digits: JSON must keep them exactly.
      { id: 'd1', label: 'design', dt: 2e-9, i: [0.1 + 0.2, -1 / 3, 1e7], q: [Math.PI, 0, -2.5e6], metadata: { origin: 'design' }, evaluation: { meanInfidelity: 3.2e-4, worstInfidelity: 1.1e-3 } },
    ],
    settings: { ...defaultSettings(), selectedPulse: 'd1', view: 'robustness' },
  };
}

describe('project files', () => {
  it('read back exactly what was written', () => {
    const original = project();
    const back = parseProject(projectText(original));
    expect(back).toEqual(original);
    expect(back.pulses[0].i[0]).toBe(0.1 + 0.2);
  });

  it('keep the run that made a pulse (its starts and convergence curves), and refuse a broken one by its place', () => {
    const original = project();
    original.pulses[0].history = {
      starts: [
        { start: 0, meanInfidelity: 5.6e-4, iterations: 306, stopReason: 'gradient-tolerance', elapsedS: 0.024 },
        { start: 1, meanInfidelity: 3.2e-4, iterations: 2000, stopReason: 'max-iterations', elapsedS: 0.146 },
      ],
      best: 1,
      stopped: false,
      elapsedS: 0.5,
      curves: [{ start: 0, iteration: [0, 1, 306], meanInfidelity: [0.9, 0.5, 5.6e-4] }, { start: 1, iteration: [0, 2000], meanInfidelity: [0.7, 3.2e-4] }],
    };
    expect(parseProject(projectText(original))).toEqual(original);
    const broken = structuredClone(original);
    (broken.pulses[0].history!.curves[1].meanInfidelity as unknown[]).pop();
    expect(() => parseProject(broken)).toThrow('project file: "pulses[0].history.curves[1].meanInfidelity" is "1 values"; expected one per iteration (2)');
    const reason = structuredClone(original);
    (reason.pulses[0].history!.starts[0] as { stopReason: string }).stopReason = 'tired';
    expect(() => parseProject(reason)).toThrow(/"pulses\[0\].history.starts\[0\].stopReason" is "tired"/);
  });

  it('accept the stored object itself (the autosave)', () => {
    expect(parseProject(structuredClone(project())).settings.view).toBe('robustness');
  });

  it('refuse malformed files, naming the place and what is expected', () => {
    const refuse = (value: unknown) => {
      try {
        parseProject(typeof value === 'string' ? value : JSON.stringify(value));
      } catch (error) {
        expect(error).toBeInstanceOf(ProjectFormatError);
        expect((error as Error).name).toBe('ProjectFormatError');
        return (error as Error).message;
      }
      throw new Error('accepted');
    };
    const p = project();
    expect(refuse('{"format": ')).toMatch(/not valid JSON/);
    expect(refuse([1, 2])).toMatch(/"\(document\)".*JSON object/);
    expect(refuse({ ...p, format: 'something.else' })).toMatch(/"format" is "something.else"; expected "gatesmith.project"/);
    expect(refuse({ ...p, version: 2 })).toMatch(/"version" is 2/);
    expect(refuse({ ...p, spec: [] })).toMatch(/"spec"/);
    expect(refuse({ ...p, pulses: [{ ...p.pulses[0], i: [1, 'x', 3] }] })).toMatch(/"pulses\[0\]\.i\[1\]" is "x"/);
    expect(refuse({ ...p, pulses: [{ ...p.pulses[0], q: [1] }] })).toMatch(/"pulses\[0\]\.q" is "1 samples"; expected as many samples as i \(3\)/);
    expect(refuse({ ...p, pulses: [{ ...p.pulses[0], dt: 0 }] })).toMatch(/"pulses\[0\]\.dt" is 0/);
    expect(refuse({ ...p, pulses: [p.pulses[0], p.pulses[0]] })).toMatch(/each pulse id once/);
    const badMap = { ...p.settings, map: { ...p.settings.map, threshold: 2 } };
    expect(refuse({ ...p, settings: badMap })).toMatch(/"settings\.map\.threshold" is 2/);
    const badAxis = { ...p.settings, map: { ...p.settings.map, detuning: { min: 1, max: -1, points: 5 } } };
    expect(refuse({ ...p, settings: badAxis })).toMatch(/"settings\.map\.detuning\.max" is -1; expected a number >= min/);
  });

  it('keep the export form, its upconversion read as "plus" when a project saved before it existed lacks it', () => {
    const p = project();
    const form = { ...defaultExportForm(null, 1e7), upconversion: 'minus' as const };
    expect(parseProject(projectText({ ...p, settings: { ...p.settings, export: form } })).settings.export).toEqual(form);
    const { upconversion: _u, ...older } = form;
    const stored = JSON.parse(projectText(p)) as { settings: Record<string, unknown> };
    stored.settings.export = older;
    expect(parseProject(JSON.stringify(stored)).settings.export?.upconversion).toBe('plus');
    stored.settings.export = { ...older, upconversion: 'inverted' };
    expect(() => parseProject(JSON.stringify(stored))).toThrow(/settings\.export\.upconversion/);
  });

  it('fill in missing settings and forget a selection that names no pulse', () => {
    const p = project();
    const partial = { format: p.format, version: p.version, spec: p.spec, pulses: [], settings: { selectedPulse: 'gone' } };
    const back = parseProject(JSON.stringify(partial));
    expect(back.settings.map).toEqual(defaultSettings().map);
    expect(back.settings.selectedPulse).toBeNull();
  });
});

describe('links', () => {
  it('carry the spec in the hash and read it back', () => {
    const spec = demoSpec();
    const hash = specHash(spec);
    expect(hash.startsWith('#spec=')).toBe(true);
    expect(specFromHash(hash)).toEqual(spec);
    expect(specFromHash('')).toBeNull();
    expect(specFromHash('#elsewhere')).toBeNull();
  });
  it('refuse a hash whose spec is not JSON', () => {
    expect(() => specFromHash('#spec=%7B%22duration')).toThrow(/not valid JSON/);
    expect(() => specFromHash('#spec=%E0%A4%A')).toThrow(/percent-encoding/);
  });
});
