// Run by tests/core/builds.test.ts in a Node started with and without
// --experimental-wasm-relaxed-simd (Node 20 runs relaxed SIMD only with it): figures and
// gradients of both core builds against the plain-TypeScript oracle, and designs by
// default and with the fused build asked for. Prints one JSON object.
import { design } from '../../src/core/api.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import { buildFor, fusedAvailable } from '../../src/core/wasm.ts';
import type { Member, Pulse, Target } from '../../src/core/types.ts';
import * as oracle from '../reference/oracle.ts';
import { CASES, DESIGN_SPEC } from './builds-cases.ts';

const cases = CASES.map(({ target, segments, rabi, members }: { target: Target; segments: number; rabi: number; members: Member[] }) => {
  const i = new Float64Array(segments), q = new Float64Array(segments);
  for (let k = 0; k < segments; k++) {
    i[k] = rabi * Math.sin(0.37 * k + 1);
    q[k] = rabi * Math.cos(0.011 * k * k);
  }
  const pulse: Pulse = { dt: 1e-9, i, q, metadata: {} };
  const want = oracle.ensembleGradient(target, pulse, members);
  const figures = oracle.ensembleFigure(target, pulse, members).perMember;
  const of = (build: 'portable' | 'fused') => {
    const got = figureAndGradient(target, pulse, members, undefined, undefined, undefined, build);
    return { mean: got.mean, perMember: Array.from(got.perMember), gradI: Array.from(got.gradI), gradQ: Array.from(got.gradQ) };
  };
  return { oracle: { mean: want.mean, perMember: Array.from(figures), gradI: Array.from(want.gradI), gradQ: Array.from(want.gradQ) }, portable: of('portable'), fused: of('fused') };
});
const byDefault = await design(DESIGN_SPEC);
const fused = await design({ ...DESIGN_SPEC, optimizer: { ...DESIGN_SPEC.optimizer, arithmetic: 'fused' } });
const pulseJson = (r: typeof byDefault) => ({ i: Array.from(r.pulse.i), q: Array.from(r.pulse.q), arithmetic: r.pulse.metadata.arithmetic });
process.stdout.write(JSON.stringify({
  available: fusedAvailable(), fusedRuns: buildFor('fused'), cases, byDefault: pulseJson(byDefault), fused: pulseJson(fused),
}) + '\n');
