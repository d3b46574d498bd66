// `gatesmith batch run|collect` end to end: three shards run by GNU parallel collect to the
// same table and the same pulse files, bit for bit, as one process; a killed batch resumes
// without redoing what it finished; the shard comes from Slurm's or Kubernetes' variables;
// and bad manifests are named by file, row and column.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadManifest } from '../../src/cli/batch-files.ts';
import { evaluate } from '../../src/core/api.ts';
import { readPulse } from '../../src/io/pulse.ts';
import { run } from './run.ts';

const ROOT = new URL('../../', import.meta.url).pathname;
const BIN = join(ROOT, 'bin/gatesmith.js');
const PARALLEL = '/usr/bin/parallel';

// A small robust X(90): each design takes a fraction of a second.
const base = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 8e-8, segments: 40, rabiMax: 1e7,
  ensemble: { amplitudeError: { min: -0.05, max: 0.05, points: 3 } },
  optimizer: { starts: 2, seed: 4, maxIterations: 60 },
};
const variations = Array.from({ length: 7 }, (_, k) => ({
  name: `q${String(k + 1).padStart(2, '0')}`,
  set: { 'ensemble.detuning': { min: -2e5 * (k + 1), max: 2e5 * (k + 1), points: 3 }, 'target.gate.angleDeg': k % 2 === 0 ? 90 : 180 },
}));

let dir: string;
let manifest: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-batch-'));
  manifest = join(dir, 'chip.json');
  writeFileSync(manifest, JSON.stringify({ base, variations }));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const listResults = (out: string): string[] => (existsSync(join(out, 'results')) ? readdirSync(join(out, 'results')).sort() : []);

describe('batch run and collect in one process', () => {
  it('designs every variation, writes pulse and result files, and collects them with the JSON shape of the format', async () => {
    const out = join(dir, 'single');
    const r = await run(['batch', 'run', manifest, '--out', out, '--threads', '2']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('batch: shard 1/1 (the whole batch): 7 of 7 variations, 0 already done, 7 to run on 2 threads');
    // The same progress lines as a design, led by the variation's name.
    expect(r.stderr).toMatch(/^q03: design \d+%\s+start 1\/2\s+iteration 0 /m);
    expect(listResults(out)).toEqual(variations.map((v) => `${v.name}.json`));
    expect(existsSync(join(out, 'manifest.json'))).toBe(true);

    const c = await run(['batch', 'collect', out, '--json']);
    expect(c.code, c.stderr).toBe(0);
    const table = JSON.parse(c.stdout) as { variations: Record<string, unknown>[] };
    expect(Object.keys(table)).toEqual(['variations']);
    for (const [k, row] of table.variations.entries()) {
      expect(Object.keys(row)).toEqual(['name', 'status', 'meanInfidelity', 'worstInfidelity', 'pulse']);
      expect(row.name).toBe(variations[k].name);
      expect(row.status).toBe('done');
      // The figures are those of the pulse file evaluated again on the variation's own spec.
      const pulse = readPulse(readFileSync(join(out, row.pulse as string), 'utf8'));
      const spec = { ...base, ensemble: { ...base.ensemble, detuning: variations[k].set['ensemble.detuning'] }, target: { gate: { axis: [1, 0, 0], angleDeg: variations[k].set['target.gate.angleDeg'] } } };
      const again = evaluate(spec, pulse);
      expect(again.meanInfidelity).toBe(row.meanInfidelity);
      expect(again.worstInfidelity).toBe(row.worstInfidelity);
    }
    const text = await run(['batch', 'collect', out]);
    expect(text.stdout).toMatch(/^q02\s+done\s+\S+\s+\S+\s+pulses\/q02\.json\s+ensemble\.detuning=\{"min":-400000,"max":400000,"points":3\} target\.gate\.angleDeg=180$/m);
  });

  it('three shards run by GNU parallel collect to the same table and pulse files, bit for bit', async (context) => {
    if (!existsSync(PARALLEL)) {
      if (process.env.CI) throw new Error(`${PARALLEL} is missing: .ci/run installs Debian's parallel`);
      context.skip();
    }
    const out = join(dir, 'sharded');
    const p = spawnSync(PARALLEL, ['--will-cite', '--jobs', '3', process.execPath, BIN, 'batch', 'run', manifest, '--out', out, '--threads', '1', '--shard', '{}/3', ':::', '1', '2', '3'], { encoding: 'utf8' });
    expect(p.status, p.stderr).toBe(0);
    for (const shard of [1, 2, 3]) expect(p.stderr).toContain(`batch: shard ${shard}/3 (--shard): ${shard === 1 ? 3 : 2} of 7 variations`);
    const single = await run(['batch', 'collect', join(dir, 'single'), '--json']);
    const sharded = await run(['batch', 'collect', out, '--json']);
    expect(sharded.code).toBe(0);
    expect(sharded.stdout).toBe(single.stdout);
    for (const v of variations) {
      expect(readFileSync(join(out, 'pulses', `${v.name}.json`)).equals(readFileSync(join(dir, 'single', 'pulses', `${v.name}.json`))), v.name).toBe(true);
    }
  });
});

describe('resuming', () => {
  it('a killed batch, run again, skips the variations it finished and leaves their files untouched', async () => {
    // Designs long enough (about 0.1 to 0.3 s each here) that the kill lands mid-batch.
    const slow = join(dir, 'slow.json');
    writeFileSync(slow, JSON.stringify({ base: { ...base, segments: 100, duration: 2e-7, optimizer: { starts: 2, seed: 4, maxIterations: 300 } }, variations }));
    const out = join(dir, 'killed');
    const child = spawn(process.execPath, [BIN, 'batch', 'run', slow, '--out', out, '--threads', '1'], { stdio: 'ignore' });
    await new Promise<void>((resolve, reject) => {
      const timer = setInterval(() => {
        if (listResults(out).length >= 2) {
          clearInterval(timer);
          child.kill('SIGKILL');
          resolve();
        }
      }, 10);
      child.on('exit', () => {
        clearInterval(timer);
        reject(new Error('the batch ended before it was killed; make its designs longer'));
      });
    });
    await new Promise((resolve) => child.once('exit', resolve));
    const finished = listResults(out);
    expect(finished.length).toBeGreaterThanOrEqual(2);
    expect(finished.length).toBeLessThan(variations.length);
    const before = new Map(finished.map((f) => [f, { ino: statSync(join(out, 'results', f)).ino, text: readFileSync(join(out, 'results', f), 'utf8') }]));

    const collected = await run(['batch', 'collect', out]);
    expect(collected.code).toBe(1); // missing variations
    expect(collected.stderr).toContain(`7 variations: ${finished.length} done, 0 failed, ${7 - finished.length} missing`);

    const again = await run(['batch', 'run', slow, '--out', out, '--threads', '1']);
    expect(again.code, again.stderr).toBe(0);
    expect(again.stderr).toContain(`${finished.length} already done, ${7 - finished.length} to run`);
    for (const f of finished) {
      expect(again.stderr).not.toContain(`batch: ${f.replace('.json', '')} done`);
      const now = { ino: statSync(join(out, 'results', f)).ino, text: readFileSync(join(out, 'results', f), 'utf8') };
      expect(now).toEqual(before.get(f));
    }
    expect(listResults(out)).toEqual(variations.map((v) => `${v.name}.json`)); // and no temporary files left
    expect((await run(['batch', 'collect', out])).code).toBe(0);
  });

  it('a failed variation is reported by collect (exit 1) and tried again by the next run', async () => {
    const out = join(dir, 'failed');
    expect((await run(['batch', 'run', manifest, '--out', out, '--shard', '1/7'])).code).toBe(0);
    writeFileSync(join(out, 'results', 'q01.json'), JSON.stringify({
      format: 'gatesmith.batch-result', version: 1, name: 'q01', status: 'failed', set: {}, meanInfidelity: null, worstInfidelity: null, pulse: null, error: 'out of memory',
    }));
    const c = await run(['batch', 'collect', out]);
    expect(c.code).toBe(1);
    expect(c.stdout).toContain('q01 failed: out of memory');
    const j = JSON.parse((await run(['batch', 'collect', out, '--json'])).stdout);
    expect(j.variations[0]).toEqual({ name: 'q01', status: 'failed', meanInfidelity: null, worstInfidelity: null, pulse: null });
    expect(j.variations[1].status).toBe('missing');
    const r = await run(['batch', 'run', manifest, '--out', out, '--shard', '1/7']);
    expect(r.stderr).toContain('0 already done, 1 to run');
    expect(r.stderr).toContain('batch: q01 done');
  });
});

describe('the shard from the environment', () => {
  const withEnv = async <T>(vars: Record<string, string>, body: () => Promise<T>): Promise<T> => {
    const saved = Object.fromEntries(Object.keys(vars).map((k) => [k, process.env[k]]));
    Object.assign(process.env, vars);
    try {
      return await body();
    } finally {
      for (const [k, v] of Object.entries(saved)) {
        if (v === undefined) delete process.env[k];
        else process.env[k] = v;
      }
    }
  };

  it('a Slurm array task runs its share: --array=1-3, task 2 takes positions 1 and 4 (k mod 3 = 1)', async () => {
    const out = join(dir, 'slurm');
    const r = await withEnv({ SLURM_ARRAY_TASK_ID: '2', SLURM_ARRAY_TASK_COUNT: '3', SLURM_ARRAY_TASK_MIN: '1' }, () => run(['batch', 'run', manifest, '--out', out]));
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('batch: shard 2/3 (SLURM_ARRAY_TASK_ID=2, SLURM_ARRAY_TASK_MIN=1, SLURM_ARRAY_TASK_STEP=1, SLURM_ARRAY_TASK_COUNT=3)');
    expect(listResults(out)).toEqual(['q02.json', 'q05.json']);
  });

  it('a Kubernetes indexed job runs its share with the count from GATESMITH_SHARDS, or fails without one', async () => {
    const out = join(dir, 'k8s');
    const r = await withEnv({ JOB_COMPLETION_INDEX: '3', GATESMITH_SHARDS: '4' }, () => run(['batch', 'run', manifest, '--out', out]));
    expect(r.code, r.stderr).toBe(0);
    expect(listResults(out)).toEqual(['q04.json']);
    const bad = await withEnv({ JOB_COMPLETION_INDEX: '0' }, () => run(['batch', 'run', manifest, '--out', join(dir, 'k8s-bad')]));
    expect(bad.code).toBe(1);
    expect(bad.stderr).toContain('JOB_COMPLETION_INDEX is set (a Kubernetes indexed job) but the shard count is not: give --shards N or set GATESMITH_SHARDS');
  });

  it('--shards without a Kubernetes index is refused rather than running the whole batch', async () => {
    const r = await run(['batch', 'run', manifest, '--out', join(dir, 'shards-alone'), '--shards', '3']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('--shards: 3 is given but JOB_COMPLETION_INDEX is not set (not a Kubernetes indexed job); give --shard I/N');
  });

  it('--shard wins over the environment', async () => {
    const out = join(dir, 'flag');
    const r = await withEnv({ SLURM_ARRAY_TASK_ID: '0', SLURM_ARRAY_TASK_COUNT: '2' }, () => run(['batch', 'run', manifest, '--out', out, '--shard', '7/7']));
    expect(r.stderr).toContain('batch: shard 7/7 (--shard): 1 of 7 variations');
    expect(listResults(out)).toEqual(['q07.json']);
  });
});

describe('the example chip', () => {
  it("the README's GNU parallel example runs as written, and collect finds every qubit done", async (context) => {
    if (!existsSync(PARALLEL)) {
      if (process.env.CI) throw new Error(`${PARALLEL} is missing: .ci/run installs Debian's parallel`);
      context.skip();
    }
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    const lines = readme.slice(readme.indexOf('### Batches')).split('\n').map((l) => l.trim());
    const parallelLine = lines.find((l) => l.startsWith('parallel '))!;
    const collectLine = lines.find((l) => l.startsWith('npx gatesmith batch collect '))!;
    const cwd = mkdtempSync(join(dir, 'readme-'));
    cpSync(join(ROOT, 'examples'), join(cwd, 'examples'), { recursive: true });
    // `npx gatesmith` is the compiled command in this checkout; GNU parallel is told it may run quietly.
    const asHere = (line: string): string => line.replaceAll('npx gatesmith', `${JSON.stringify(process.execPath)} ${JSON.stringify(BIN)}`).replace(/^parallel /, 'parallel --will-cite ');
    const p = spawnSync('bash', ['-c', asHere(parallelLine)], { cwd, encoding: 'utf8' });
    expect(p.status, p.stderr).toBe(0);
    const c = spawnSync('bash', ['-c', `${asHere(collectLine)} --json`], { cwd, encoding: 'utf8' });
    expect(c.status, c.stderr).toBe(0);
    expect(JSON.parse(c.stdout).variations.map((v: { status: string }) => v.status)).toEqual(new Array(7).fill('done'));
  });

  it('examples/chip/marram-7.json reads its CSV: seven qubits, each with its own Rabi rate and detuning range', () => {
    const { manifest } = loadManifest(join(ROOT, 'examples/chip/marram-7.json'));
    expect(manifest.variations.map((v) => v.name)).toEqual(['K1', 'K2', 'K3', 'K4', 'K5', 'K6', 'K7']);
    const k3 = manifest.specs[2].problem;
    expect(k3.rabiMax).toBe(9.2e6);
    expect(Math.min(...k3.members.map((m) => m.detuning))).toBe(-1.5e6);
    expect(manifest.specs[2].json.optimizer).toEqual({ starts: 5, seed: 1, maxIterations: 500 });
  });
});

describe('bad input', () => {
  it('names the CSV file, row, column and value; the manifest copy lets collect work without the originals', async () => {
    const sub = mkdtempSync(join(dir, 'csv-'));
    writeFileSync(join(sub, 'chip.csv'), 'name,rabiMax,optimizer.seed\nk1,1e7,2\nk2,-5,3\n');
    writeFileSync(join(sub, 'm.json'), JSON.stringify({ base, variationsCsv: 'chip.csv' }));
    const r = await run(['batch', 'run', join(sub, 'm.json'), '--out', join(sub, 'out')]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`gatesmith: ${join(sub, 'chip.csv')} row 3 (variation "k2", column rabiMax): rabiMax: -5 is not allowed; a finite number > 0 (Hz)\n`);
    expect(existsSync(join(sub, 'out'))).toBe(false); // nothing ran, nothing was written

    writeFileSync(join(sub, 'chip.csv'), 'name,rabiMax\nk1,1e7\nk2,1.2e7\n');
    expect((await run(['batch', 'run', join(sub, 'm.json'), '--out', join(sub, 'out'), '--shard', '2/2'])).code).toBe(0);
    rmSync(join(sub, 'chip.csv'));
    rmSync(join(sub, 'm.json'));
    const c = await run(['batch', 'collect', join(sub, 'out'), '--json']);
    expect(JSON.parse(c.stdout).variations.map((v: { status: string }) => v.status)).toEqual(['missing', 'done']);
  });

  it('warns, naming the row, of a value probably typed in the wrong unit (common practice: no qubit is driven at 10 Hz)', async () => {
    const sub = mkdtempSync(join(dir, 'unit-'));
    writeFileSync(join(sub, 'chip.csv'), 'name,rabiMax\nk1,10\n');
    writeFileSync(join(sub, 'm.json'), JSON.stringify({ base: { ...base, optimizer: { starts: 1, maxIterations: 5 } }, variationsCsv: 'chip.csv' }));
    const r = await run(['batch', 'run', join(sub, 'm.json'), '--out', join(sub, 'out')]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain(`warning: ${join(sub, 'chip.csv')} row 2 (variation "k1"): rabiMax 10 is 10 Hz, probably not meant (values are in Hz): did you mean 10 MHz, rabiMax 1e7?`);
  });

  it('refuses a folder of another batch, a bad --shard, and a folder that is not a batch', async () => {
    const other = join(dir, 'other.json');
    writeFileSync(other, JSON.stringify({ base, variations: variations.slice(0, 2) }));
    const r = await run(['batch', 'run', other, '--out', join(dir, 'single')]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(`holds the results of another batch: ${other} has 2 variations, the folder's manifest.json 7`);
    expect((await run(['batch', 'run', manifest, '--out', join(dir, 'x'), '--shard', '4/3'])).stderr).toContain(
      '--shard: "4/3" is not allowed; I/N with N >= 1 and I from 1 to N',
    );
    expect((await run(['batch', 'collect', dir])).stderr).toContain(`DIR ${dir}: has no manifest.json, so it is not a batch folder`);
    expect((await run(['batch', 'frobnicate'])).stderr).toContain('batch: unknown subcommand "frobnicate"; use batch run or batch collect');
  });
});
