// Batch manifests: overrides by dotted path, validated by the spec parser (a wrong path is
// named with its variation); CSV tables read as RFC 4180 describes; shards that cover every
// variation exactly once; and the shard read from the environment of Slurm job arrays and
// Kubernetes indexed jobs, with the variables those schedulers document.
import { describe, expect, it } from 'vitest';
import { parseManifest, parseVariationsCsv, shardFromEnvironment, shardIndices, variationSpec } from '../../src/core/batch.ts';
import { parseCsv } from '../../src/core/csv-table.ts';

const base = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 100, rabiMax: 1e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 5 } },
};
const noCsv = (): never => {
  throw new Error('no CSV expected');
};

describe('overrides by dotted path', () => {
  it('set the named fields of a copy of the base, create missing sections and change array elements', () => {
    const spec = variationSpec(base, {
      name: 'q07', source: 'm.json: variations[0]', from: 'list',
      set: { 'ensemble.detuning.min': -2e6, 'target.gate.angleDeg': 180, 'constraints.zeroEdges': true, 'target.gate.axis[1]': 1 },
    }) as typeof base & { constraints: { zeroEdges: boolean } };
    expect(spec.ensemble.detuning).toEqual({ min: -2e6, max: 1e6, points: 5 });
    expect(spec.target.gate).toEqual({ axis: [1, 1, 0], angleDeg: 180 });
    expect(spec.constraints.zeroEdges).toBe(true);
    expect(base.ensemble.detuning.min).toBe(-1e6); // the base is untouched
    expect(base.target.gate.axis).toEqual([1, 0, 0]);
  });

  it('are validated by the spec parser: each variation gets its problem', () => {
    const m = parseManifest({ base, variations: [{ name: 'a', set: { rabiMax: 2e7 } }, { name: 'b', set: {} }] }, 'm.json', noCsv);
    expect(m.specs.map((s) => s.problem.rabiMax)).toEqual([2e7, 1e7]);
  });

  it('a wrong path is named with the variation, the override and what the spec allows', () => {
    const bad = { base, variations: [{ name: 'ok', set: {} }, { name: 'q07', set: { 'ensemble.detunin.min': -2e6 } }] };
    expect(() => parseManifest(bad, 'chip.json', noCsv)).toThrow(
      'chip.json: variations[1] (variation "q07", set ensemble.detunin.min): ensemble.detunin: {"min":-2000000} is not allowed; unknown key (did you mean "detuning"?)',
    );
    const badValue = { base, variations: [{ name: 'q08', set: { 'ensemble.detuning.points': 0 } }] };
    expect(() => parseManifest(badValue, 'chip.json', noCsv)).toThrow(
      'chip.json: variations[0] (variation "q08", set ensemble.detuning.points): ensemble.detuning.points: 0 is not allowed',
    );
    const through = { base, variations: [{ name: 'q09', set: { 'duration.min': 1 } }] };
    expect(() => parseManifest(through, 'chip.json', noCsv)).toThrow('chip.json: variations[0] (variation "q09"): duration.min: duration is 2e-7 in the base, not an object with fields');
  });

  it('a CSV cell that breaks the spec is named by file, row, column and value', () => {
    const csv = 'name,rabiMax,ensemble.detuning.max\nk1,1e7,2e6\nk2,10 MHz,2e6\n';
    expect(() => parseManifest({ base, variationsCsv: 'chip.csv' }, 'm.json', () => ({ text: csv, name: 'lab/chip.csv' }))).toThrow(
      'lab/chip.csv row 3 (variation "k2", column rabiMax): rabiMax: "10 MHz" is not allowed; a finite number > 0 (Hz)',
    );
  });

  it('names must be usable as file names and differ ignoring case; the manifest has exactly one source of variations', () => {
    expect(() => parseManifest({ base, variations: [{ name: '../x', set: {} }] }, 'm.json', noCsv)).toThrow('m.json: variations[0]: the name "../x" is not allowed');
    expect(() => parseManifest({ base, variations: [{ name: 'Q1', set: {} }, { name: 'q1', set: {} }] }, 'm.json', noCsv)).toThrow(
      'm.json: variations[1]: the name "q1" is already used by m.json: variations[0]',
    );
    expect(() => parseManifest({ base }, 'm.json', noCsv)).toThrow('variations: missing value is not allowed; exactly one of "variations"');
    expect(() => parseManifest({ base, variatons: [] }, 'm.json', noCsv)).toThrow('variatons: [] is not allowed; unknown key (did you mean "variations"?)');
    expect(() => parseManifest({ base, variations: [{ name: 'a', set: { 'ensemble..min': 1 } }] }, 'm.json', noCsv)).toThrow(
      'm.json: variations[0].set: "ensemble..min" is not allowed; a dotted path into the spec',
    );
  });
});

describe('the variations CSV', () => {
  it('reads quoted cells, doubled quotes, CRLF, a byte-order mark and line breaks in quotes (RFC 4180)', () => {
    const rows = parseCsv('\ufeffname,note\r\nq1,"a, b"\r\n\r\n"q2","say ""hi"""\n"q3","two\nlines"\nq4,x', 't.csv');
    expect(rows).toEqual([
      { line: 1, cells: ['name', 'note'] },
      { line: 2, cells: ['q1', 'a, b'] },
      { line: 4, cells: ['q2', 'say "hi"'] },
      { line: 5, cells: ['q3', 'two\nlines'] },
      { line: 7, cells: ['q4', 'x'] },
    ]);
    expect(() => parseCsv('name\n"q1', 't.csv')).toThrow('t.csv row 2: a quoted cell is not closed before the end of the file');
  });

  it('types cells as JSON values; an empty cell keeps the base value', () => {
    const v = parseVariationsCsv('name,rabiMax,constraints.zeroEdges,target.gate.axis,constraints.amplitudeBound\nq1,1.2e7,true,"[0,1,0]",box\nq2,,,,\n', 'c.csv');
    expect(v[0].set).toEqual({ rabiMax: 1.2e7, 'constraints.zeroEdges': true, 'target.gate.axis': [0, 1, 0], 'constraints.amplitudeBound': 'box' });
    expect(v[1].set).toEqual({});
    expect(v.map((x) => x.source)).toEqual(['c.csv row 2', 'c.csv row 3']);
  });

  it('refuses a header without name first, a row of the wrong width and broken JSON, naming row and column', () => {
    expect(() => parseVariationsCsv('qubit,rabiMax\nq1,1e7\n', 'c.csv')).toThrow('c.csv row 1: the first header cell is "qubit"; it must be "name"');
    expect(() => parseVariationsCsv('name,rabiMax\nq1,1e7,3\n', 'c.csv')).toThrow('c.csv row 2: 3 cells, but the header has 2');
    expect(() => parseVariationsCsv('name,target.gate.axis\nq1,"[1,0"\n', 'c.csv')).toThrow('c.csv row 2, column target.gate.axis: "[1,0" is not allowed; a cell starting with [, { or " must be JSON');
    expect(() => parseVariationsCsv('name,rabiMax,rabiMax\nq1,1,2\n', 'c.csv')).toThrow('c.csv row 1: the column rabiMax appears twice');
  });
});

describe('shards', () => {
  it('cover every variation exactly once, for any count (k mod N)', () => {
    for (let variations = 0; variations <= 23; variations++) {
      for (let count = 1; count <= 9; count++) {
        const seen = new Array<number>(variations).fill(0);
        for (let index = 0; index < count; index++) for (const k of shardIndices(variations, index, count)) seen[k]++;
        expect(seen.every((n) => n === 1), `${variations} variations in ${count} shards`).toBe(true);
      }
    }
  });

  it('are read from a Slurm job array: SLURM_ARRAY_TASK_ID less SLURM_ARRAY_TASK_MIN, over the step, of SLURM_ARRAY_TASK_COUNT (Slurm, "Job Array Support")', () => {
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '0', SLURM_ARRAY_TASK_COUNT: '4', SLURM_ARRAY_TASK_MIN: '0' })).toMatchObject({ index: 0, count: 4 });
    // --array=1-4: the first task has id 1
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '4', SLURM_ARRAY_TASK_COUNT: '4', SLURM_ARRAY_TASK_MIN: '1' })).toMatchObject({ index: 3, count: 4 });
    // --array=1-7:2 runs ids 1, 3, 5, 7
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '5', SLURM_ARRAY_TASK_COUNT: '4', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_STEP: '2' })).toMatchObject({ index: 2, count: 4 });
    // --array=1,3,8 is not evenly spaced: the shard cannot be known
    expect(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '8', SLURM_ARRAY_TASK_COUNT: '3', SLURM_ARRAY_TASK_MIN: '1' })).toThrow('not a task of an evenly spaced array');
    expect(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '2' })).toThrow('SLURM_ARRAY_TASK_ID is set but SLURM_ARRAY_TASK_COUNT is not');
  });

  it('are read from a Kubernetes indexed job: JOB_COMPLETION_INDEX from 0, with the count given (Kubernetes, "Indexed Job for Parallel Processing")', () => {
    expect(shardFromEnvironment({ JOB_COMPLETION_INDEX: '2' }, 5)).toMatchObject({ index: 2, count: 5 });
    expect(shardFromEnvironment({ JOB_COMPLETION_INDEX: '0', GATESMITH_SHARDS: '3' })).toMatchObject({ index: 0, count: 3 });
    expect(() => shardFromEnvironment({ JOB_COMPLETION_INDEX: '1' })).toThrow('give --shards N or set GATESMITH_SHARDS');
    expect(() => shardFromEnvironment({ JOB_COMPLETION_INDEX: '3' }, 3)).toThrow('JOB_COMPLETION_INDEX=3 is not allowed with 3 shards');
    expect(() => shardFromEnvironment({ JOB_COMPLETION_INDEX: 'x' }, 3)).toThrow('JOB_COMPLETION_INDEX=x is not allowed; a whole number >= 0');
  });

  it('are the whole batch without a scheduler', () => {
    expect(shardFromEnvironment({ PATH: '/usr/bin' })).toBeNull();
  });
});
