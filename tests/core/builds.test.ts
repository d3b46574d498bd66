// The core's two builds (src/core/wasm.ts CoreBuild): the portable one and the fused one
// (relaxed SIMD multiply-add). Both are checked against the plain-TypeScript oracle
// (tests/reference/oracle.ts) in a Node started with --experimental-wasm-relaxed-simd
// (where Node 20 runs the fused build) and in one without it (where the portable build
// stands in), so that both paths run whatever flags run this file.
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { design } from '../../src/core/api.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { SpecError } from '../../src/core/errors.ts';
import { CORE_FILES, buildFor, fusedAvailable } from '../../src/core/wasm.ts';
import { readPulse, writePulse } from '../../src/io/pulse.ts';
import { normwiseRelativeError, relativeError } from '../reference/tolerance.ts';
import { DESIGN_SPEC } from './builds-cases.ts';

const ROOT = new URL('../../', import.meta.url).pathname;

interface Figures { mean: number; perMember: number[]; gradI: number[]; gradQ: number[] }
interface Probe {
  available: boolean;
  fusedRuns: 'portable' | 'fused';
  cases: { oracle: Figures; portable: Figures; fused: Figures }[];
  byDefault: { i: number[]; q: number[]; arithmetic: string };
  fused: { i: number[]; q: number[]; arithmetic: string };
}

function probe(relaxed: boolean): Probe {
  const flags = relaxed ? ['--experimental-wasm-relaxed-simd'] : [];
  const out = execFileSync(process.execPath, [...flags, 'bin/run-ts.js', 'tests/core/builds-probe.ts'], { cwd: ROOT, encoding: 'utf8', timeout: 120_000 });
  return JSON.parse(out) as Probe;
}

const withFlag = probe(true);
const withoutFlag = probe(false);

describe('the fused build against the portable build and the oracle', () => {
  it('runs where the engine validates relaxed SIMD, which the real module agrees with', () => {
    // Node 20 validates relaxed SIMD only behind its flag; the probe module and the shipped
    // fused build must give the same answer, or the build would be chosen and then refused.
    const bytes = readFileSync(new URL(`../../build/${CORE_FILES.fused}`, import.meta.url));
    expect(WebAssembly.validate(bytes)).toBe(fusedAvailable());
    expect(withFlag.available).toBe(true);
    expect(withFlag.fusedRuns).toBe('fused');
    expect(withoutFlag.available).toBe(false);
    expect(withoutFlag.fusedRuns).toBe('portable');
    expect(buildFor('portable')).toBe('portable');
  });

  for (const [name, run] of [['with the flag (fused build)', withFlag], ['without it (portable build stands in)', withoutFlag]] as const) {
    it(`agrees with the oracle and with the portable build to 1e-13, ${name}`, () => {
      run.cases.forEach((c, k) => {
        for (const build of [c.portable, c.fused]) {
          // The oracle sums the same products in another order with Math.sin/cos: 1e-13 relative (tests/reference/tolerance.ts habit).
          expect(relativeError(build.mean, c.oracle.mean), `case ${k} mean`).toBeLessThan(1e-13);
          expect(normwiseRelativeError(build.perMember, c.oracle.perMember), `case ${k} members`).toBeLessThan(1e-13);
          expect(normwiseRelativeError(build.gradI, c.oracle.gradI), `case ${k} dI`).toBeLessThan(1e-12);
          expect(normwiseRelativeError(build.gradQ, c.oracle.gradQ), `case ${k} dQ`).toBeLessThan(1e-12);
        }
        expect(normwiseRelativeError(c.fused.perMember, c.portable.perMember), `case ${k}: fused against portable`).toBeLessThan(1e-13);
        expect(normwiseRelativeError(c.fused.gradI, c.portable.gradI), `case ${k}: fused dI against portable`).toBeLessThan(1e-13);
        expect(normwiseRelativeError(c.fused.gradQ, c.portable.gradQ), `case ${k}: fused dQ against portable`).toBeLessThan(1e-13);
      });
    });
  }

  it('really is another arithmetic where it runs: some values differ in their last bits', () => {
    const differ = withFlag.cases.some((c) => c.fused.gradI.some((g, k) => g !== c.portable.gradI[k]));
    expect(differ).toBe(true);
    for (const c of withoutFlag.cases) expect(c.fused).toEqual(c.portable);
  });
});

describe('designs keep the portable build unless asked', () => {
  it('a design by default gives the same bits with or without relaxed SIMD in the engine, and says portable', async () => {
    const here = await design(DESIGN_SPEC);
    expect(Array.from(here.pulse.i)).toEqual(withFlag.byDefault.i);
    expect(Array.from(here.pulse.q)).toEqual(withFlag.byDefault.q);
    expect(withoutFlag.byDefault.i).toEqual(withFlag.byDefault.i);
    expect(here.pulse.metadata.arithmetic).toBe('portable');
    expect(withFlag.byDefault.arithmetic).toBe('portable');
  });

  it('optimizer.arithmetic "fused" runs the fused build where it can and records which build ran', () => {
    expect(withFlag.fused.arithmetic).toBe('fused');
    expect(withFlag.fused.i).not.toEqual(withFlag.byDefault.i);
    // Without relaxed SIMD the portable build runs: the same pulse as the default, recorded so.
    expect(withoutFlag.fused.arithmetic).toBe('portable');
    expect(withoutFlag.fused.i).toEqual(withFlag.byDefault.i);
  });

  it('the spec field takes "portable" or "fused" and refuses anything else, naming the field', () => {
    expect(parseSpec(DESIGN_SPEC).optimizer.arithmetic).toBeUndefined();
    expect(parseSpec({ ...DESIGN_SPEC, optimizer: { arithmetic: 'fused' } }).optimizer.arithmetic).toBe('fused');
    expect(() => parseSpec({ ...DESIGN_SPEC, optimizer: { arithmetic: 'fast' } })).toThrow(SpecError);
    expect(() => parseSpec({ ...DESIGN_SPEC, optimizer: { arithmetic: 'fast' } })).toThrow(/optimizer\.arithmetic.*"fast".*"portable", "fused"/);
  });
});

describe('the pulse file records the build', () => {
  it('round-trips metadata.arithmetic, and a file written before it existed still reads', async () => {
    const r = await design(DESIGN_SPEC);
    const back = readPulse(writePulse(r.pulse));
    expect(back.metadata.arithmetic).toBe('portable');
    expect(readPulse(writePulse({ ...r.pulse, metadata: { ...r.pulse.metadata, arithmetic: 'fused' } })).metadata.arithmetic).toBe('fused');
    const old = readPulse(JSON.stringify({ format: 'gatesmith.pulse', version: 1, dt: 1e-9, i: [1, 2], q: [0, 0], metadata: { origin: 'design' } }));
    expect(old.metadata.arithmetic).toBeUndefined();
    expect(Array.from(old.i)).toEqual([1, 2]);
  });
});

describe('design --fused on the command line', () => {
  it('records the build that ran in the pulse file, and says when the engine cannot run the fused one', () => {
    const dir = mkdtempSync(join(tmpdir(), 'gatesmith-builds-'));
    try {
      const spec = join(dir, 'spec.json');
      writeFileSync(spec, JSON.stringify(DESIGN_SPEC));
      const design = (flags: string[], out: string, fused = true) =>
        spawnSync(process.execPath, [...flags, 'bin/gatesmith.js', 'design', spec, '--out', join(dir, out), ...(fused ? ['--fused'] : [])], { cwd: ROOT, encoding: 'utf8', timeout: 120_000 });
      const on = design(['--experimental-wasm-relaxed-simd'], 'on.json');
      expect(on.status, on.stderr).toBe(0);
      expect(on.stderr).not.toMatch(/relaxed SIMD/);
      expect(readPulse(readFileSync(join(dir, 'on.json'), 'utf8')).metadata.arithmetic).toBe('fused');
      const off = design([], 'off.json');
      expect(off.status, off.stderr).toBe(0);
      expect(off.stderr).toMatch(/warning: --fused: this engine does not run relaxed SIMD \(Node 20 needs --experimental-wasm-relaxed-simd\); designing on the portable build/);
      expect(readPulse(readFileSync(join(dir, 'off.json'), 'utf8')).metadata.arithmetic).toBe('portable');
      const plain = design(['--experimental-wasm-relaxed-simd'], 'plain.json', false);
      expect(plain.status, plain.stderr).toBe(0);
      const a = readPulse(readFileSync(join(dir, 'plain.json'), 'utf8')), b = readPulse(readFileSync(join(dir, 'off.json'), 'utf8'));
      expect(a.metadata.arithmetic).toBe('portable');
      expect(Array.from(a.i)).toEqual(Array.from(b.i));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
