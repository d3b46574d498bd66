// The benchmark's figures for the core's fused build (relaxed SIMD multiply-add) against
// the portable one: figure (the maps' sweep) and figure + gradient (designs) per
// segment-member, rounds alternated in one process, and their largest relative difference.
// Node 20 runs the fused build only with --experimental-wasm-relaxed-simd, so bench.ts
// runs this file in a child process with that flag; alone it prints its table:
//   node --experimental-wasm-relaxed-simd bin/run-ts.js bench/fused-bench.ts [--json]
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { prepareGradientJob } from '../src/core/gradient.ts';
import type { Member, Pulse, Target } from '../src/core/types.ts';
import { fusedAvailable } from '../src/core/wasm.ts';
import { medianOf, timeMedian } from './timing.ts';

/** One size: ns per segment-member on each build (medians of alternated rounds), and the ratios portable/fused. */
export interface FusedFigures {
  segments: number;
  members: number;
  portableFigureNs: number;
  fusedFigureNs: number;
  figureSpeedup: number;
  portableGradientNs: number;
  fusedGradientNs: number;
  gradientSpeedup: number;
  /** Largest relative difference of a member's figure between the builds. */
  maxRelativeDifference: number;
}

const gate: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };

function sizeJobs(segments: number, side: number) {
  const members: Member[] = [];
  for (let a = 0; a < side; a++) {
    for (let d = 0; d < side; d++) members.push({ detuning: 2e6 * (side === 1 ? 0 : d / (side - 1) - 0.5), amplitudeError: 0.2 * (side === 1 ? 0 : a / (side - 1) - 0.5), weight: 1 });
  }
  const i = new Float64Array(segments), q = new Float64Array(segments);
  for (let k = 0; k < segments; k++) {
    const t = (k + 0.5) / segments;
    i[k] = 0.7e7 * Math.sin(Math.PI * t) * Math.cos(5 * t);
    q[k] = 0.5e7 * Math.sin(3 * Math.PI * t);
  }
  const pulse: Pulse = { dt: 2e-9, i, q, metadata: {} };
  const portable = prepareGradientJob(gate, pulse, members);
  const fused = prepareGradientJob(gate, pulse, members, undefined, undefined, undefined, 'fused');
  const a = portable.result().perMember, b = fused.result().perMember;
  let diff = 0;
  for (let j = 0; j < a.length; j++) diff = Math.max(diff, Math.abs(a[j] - b[j]) / a[j]);
  return { segments, members: members.length, portable, fused, diff };
}

/**
 * Every size's jobs on both builds prepared first, then timed in 5 rounds that each visit
 * every size and build in turn (a median of calls lasting about 40 ms each), as the first
 * table of bench.ts is: a burst of load on this shared machine lands in one round of every
 * size rather than in all the calls of one size. Each figure is the median of its rounds.
 */
function measure(sizes: number[][]): FusedFigures[] {
  const jobs = sizes.map(([n, side]) => sizeJobs(n, side));
  try {
    const warm = performance.now();
    while (performance.now() - warm < 600) for (const j of jobs) { j.portable.run(); j.fused.run(); j.portable.figure(); j.fused.figure(); }
    const reps = jobs.map((j) => {
      const once = Math.max(1e-3, timeMedian(() => j.portable.run(), 3));
      return Math.max(5, Math.min(300, Math.round(40 / once)));
    });
    const pf = jobs.map(() => [] as number[]), ff = jobs.map(() => [] as number[]);
    const pg = jobs.map(() => [] as number[]), fg = jobs.map(() => [] as number[]);
    for (let r = 0; r < 5; r++) {
      jobs.forEach((j, k) => {
        pf[k].push(timeMedian(() => j.portable.figure(), reps[k]));
        ff[k].push(timeMedian(() => j.fused.figure(), reps[k]));
        pg[k].push(timeMedian(() => j.portable.run(), reps[k]));
        fg[k].push(timeMedian(() => j.fused.run(), reps[k]));
      });
    }
    return jobs.map((j, k) => {
      const ns = (ms: number): number => (ms * 1e6) / (j.segments * j.members);
      return {
        segments: j.segments, members: j.members,
        portableFigureNs: ns(medianOf(pf[k])), fusedFigureNs: ns(medianOf(ff[k])), figureSpeedup: medianOf(pf[k].map((x, r) => x / ff[k][r])),
        portableGradientNs: ns(medianOf(pg[k])), fusedGradientNs: ns(medianOf(fg[k])), gradientSpeedup: medianOf(pg[k].map((x, r) => x / fg[k][r])),
        maxRelativeDifference: j.diff,
      };
    });
  } finally {
    for (const j of jobs) { j.portable.dispose(); j.fused.dispose(); }
  }
}

/** The figures, or null where the engine does not run relaxed SIMD. */
export function fusedBenchmark(): FusedFigures[] | null {
  if (!fusedAvailable()) return null;
  return measure([[1000, 5], [1000, 11], [100, 11], [1000, 1], [200, 101]]);
}

/** The table for people. */
export function fusedTable(figures: FusedFigures[] | null, log: (text: string) => void): void {
  log('the fused build (relaxed SIMD multiply-add) against the portable one, ns per segment-member, medians of 5 rounds over all sizes and both builds');
  if (!figures) {
    log('  not measured: this engine does not run relaxed SIMD (Node 20 needs --experimental-wasm-relaxed-simd)');
    return;
  }
  log('segments  members   figure portable / fused   ratio   gradient portable / fused   ratio   largest relative difference of a member figure');
  for (const f of figures) {
    log(`${String(f.segments).padStart(8)}  ${String(f.members).padStart(7)}   ${f.portableFigureNs.toFixed(2).padStart(9)} / ${f.fusedFigureNs.toFixed(2).padEnd(6)}   ${f.figureSpeedup.toFixed(2).padStart(8)}   ${f.portableGradientNs.toFixed(2).padStart(11)} / ${f.fusedGradientNs.toFixed(2).padEnd(6)}   ${f.gradientSpeedup.toFixed(2).padStart(12)}   ${f.maxRelativeDifference.toExponential(1)}`);
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const figures = fusedBenchmark();
  if (process.argv.includes('--json')) process.stdout.write(JSON.stringify(figures) + '\n');
  else fusedTable(figures, (t) => process.stdout.write(t + '\n'));
}
