// The benchmark: speed figures measured in one run, printed as a table (or one JSON
// object with --json). Never a test: figures vary 10-30 % with the machine's load.
//   npm run bench            table for people
//   npm run bench -- --json  {"objectiveGradient": [...], "oneMember": [...], "ladder": [...], "dragCalibration": [...], "design": [...], "maps": [...], "line": {...}, "shares": {...}, "fused": [...], "batch": {...}, "app": {...}}
//   npm run bench -- --no-app  without the browser figures (bench/app-bench.ts)
//   npm run bench -- --no-batch  without the batch figures (bench/batch-bench.ts)
//   npm run bench -- --no-command  without the command's start-up and Ctrl-C figures (bench/command-bench.ts)
import { spawnSync } from 'node:child_process';
import { readFileSync, readdirSync } from 'node:fs';
import { design, evaluateMembers, robustnessMap } from '../src/core/api.ts';
import { createBlock, freeBlock, setSamples } from '../src/core/block.ts';
import { encodeMembers } from '../src/core/encode.ts';
import { prepareGradientJob } from '../src/core/gradient.ts';
import { heldSpectrum } from '../src/core/spectrum.ts';
import { calibrateDrag } from '../src/core/drag.ts';
import { asLadderMembers } from '../src/core/ladder.ts';
import { parseSpec } from '../src/core/spec.ts';
import { FFT_CROSSOVER, lineLayout } from '../src/core/line.ts';
import type { Line, Member, Pulse, Target } from '../src/core/types.ts';
import { getCore } from '../src/core/wasm.ts';
import { ensembleGradient as oracleGradient, memberInfidelity } from '../tests/reference/oracle.ts';
import { appBenchmark, type AppFigures } from './app-bench.ts';
import { batchBenchmark, type BatchFigures } from './batch-bench.ts';
import { commandBenchmark, type CommandFigures } from './command-bench.ts';
import { shareBenchmark } from './share-bench.ts';
import { fusedTable, type FusedFigures } from './fused-bench.ts';
import { medianOf, timeMedian } from './timing.ts';

const json = process.argv.includes('--json');
const log = (text: string): void => {
  if (!json) process.stdout.write(text + '\n');
};

/**
 * Median of `reps` timings (ms) after `warm` untimed calls and at least 300 ms of them:
 * V8 first runs wasm from its quick baseline compiler and swaps in the optimised code
 * later, on a background thread (slow on a loaded machine).
 */
function median(fn: () => void, reps: number, warm = 3): number {
  const warmStart = performance.now();
  for (let k = 0; k < warm || (warm > 1 && performance.now() - warmStart < 300); k++) fn();
  const times: number[] = [];
  for (let k = 0; k < reps; k++) {
    const t = performance.now();
    fn();
    times.push(performance.now() - t);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)];
}

/** Repetitions so that one figure takes about `budgetMs`. */
function repsFor(fn: () => void, budgetMs: number): number {
  const t = performance.now();
  fn();
  const once = Math.max(performance.now() - t, 1e-3);
  return Math.max(5, Math.min(2000, Math.round(budgetMs / once)));
}

function gridMembers(count: number): Member[] {
  const side = Math.round(Math.sqrt(count));
  if (side * side !== count) return Array.from({ length: count }, () => ({ detuning: 0, amplitudeError: 0, weight: 1 }));
  const out: Member[] = [];
  for (let a = 0; a < side; a++) {
    for (let d = 0; d < side; d++) {
      const fa = side === 1 ? 0 : a / (side - 1) - 0.5, fd = side === 1 ? 0 : d / (side - 1) - 0.5;
      out.push({ detuning: 2e6 * fd, amplitudeError: 0.2 * fa, weight: 1 });
    }
  }
  return out;
}

function smoothPulse(n: number, duration: number, rabi: number): Pulse {
  const i = new Float64Array(n), q = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const t = (k + 0.5) / n;
    i[k] = 0.7 * rabi * Math.sin(Math.PI * t) * Math.cos(5 * t);
    q[k] = 0.5 * rabi * Math.sin(3 * Math.PI * t);
  }
  return { dt: duration / n, i, q, metadata: {} };
}

const gate: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };

// 1. Figure and objective + gradient over N x M, wasm; the plain-TS oracle beside the smaller ones.
// Every job is prepared first and timed in rounds that visit every size in turn (5 rounds,
// each a median of calls lasting about 40 ms), so that a burst of load on this shared
// machine lands in one round of every size rather than in all the calls of one size; each
// figure is the median of its rounds, and `spread` is (slowest - fastest round) / median.
// Timing each size in one long stretch instead once printed 9.42 ns at 1000 x 25 against
// 7.67 from the fused table's rounds in the same run; both ways of timing, run on the same
// job in one process, agree within the machine's noise, and the figure alone (no work
// area) agreed between the tables, so the stretch had met load, not another cost.
log('figure and objective + exact gradient (mean infidelity over the ensemble), medians of 5 rounds over all sizes');
log('segments  members   figure ns/seg-mem   gradient ms   ns/seg-mem   spread   TS ms   TS/wasm');
const objectiveGradient: { segments: number; members: number; wasmMs: number; figureNsPerSegmentMember: number; tsMs: number | null; ratio: number | null; nsPerSegmentMember: number; gradientSpread: number }[] = [];
{
  const sizes = [100, 1000, 10000].flatMap((segments) => [1, 25, 121].map((count) => ({ segments, count })));
  const jobs = sizes.map(({ segments, count }) => prepareGradientJob(gate, smoothPulse(segments, 2e-7 * (segments / 100), 1e7), gridMembers(count)));
  const warmStart = performance.now();
  while (performance.now() - warmStart < 600) for (const job of jobs) { job.run(); job.figure(); }
  const reps = jobs.map((job) => ({ run: repsFor(() => job.run(), 40), figure: repsFor(() => job.figure(), 40) }));
  const runs = jobs.map(() => [] as number[]), figs = jobs.map(() => [] as number[]);
  for (let round = 0; round < 5; round++) {
    jobs.forEach((job, k) => {
      runs[k].push(timeMedian(() => job.run(), reps[k].run));
      figs[k].push(timeMedian(() => job.figure(), reps[k].figure));
    });
  }
  jobs.forEach((job) => job.dispose());
  sizes.forEach(({ segments, count }, k) => {
    const wasmMs = medianOf(runs[k]), figureMs = medianOf(figs[k]);
    // The oracle takes about 1 us per segment-member: only where that stays short.
    let tsMs: number | null = null;
    if (segments * count <= 121000) {
      const pulse = smoothPulse(segments, 2e-7 * (segments / 100), 1e7), members = gridMembers(count);
      const tsRun = (): void => void oracleGradient(gate, pulse, members);
      tsMs = median(tsRun, Math.min(30, repsFor(tsRun, 300)), 1);
    }
    const row = {
      segments, members: count, wasmMs, figureNsPerSegmentMember: (figureMs * 1e6) / (segments * count),
      tsMs, ratio: tsMs === null ? null : tsMs / wasmMs, nsPerSegmentMember: (wasmMs * 1e6) / (segments * count),
      gradientSpread: (Math.max(...runs[k]) - Math.min(...runs[k])) / wasmMs,
    };
    objectiveGradient.push(row);
    log(`${String(segments).padStart(8)}  ${String(count).padStart(7)}   ${row.figureNsPerSegmentMember.toFixed(2).padStart(17)}   ${wasmMs.toFixed(4).padStart(11)}   ${row.nsPerSegmentMember.toFixed(2).padStart(10)}   ${row.gradientSpread.toFixed(2).padStart(6)}   ${tsMs === null ? '     -' : tsMs.toFixed(2).padStart(6)}   ${row.ratio === null ? '-' : row.ratio.toFixed(1)}`);
  });
}

{
  // The speed targets on this machine (portable build, Node 20), beside the figures above.
  const at = (segments: number, members: number) => objectiveGradient.find((r) => r.segments === segments && r.members === members)!;
  const target = (what: string, value: number, limit: number): string => `${what} ${value.toFixed(2)} ns (target <= ${limit}, ${value <= limit ? 'met' : 'not met'}, ${(limit / value).toFixed(2)}x of it)`;
  log(`targets: ${target('gradient 1000 x 25', at(1000, 25).nsPerSegmentMember, 8)}; ${target('gradient 1000 x 1', at(1000, 1).nsPerSegmentMember, 10)}; ${target('figure (maps) 1000 x 25', at(1000, 25).figureNsPerSegmentMember, 4)}`);
}

// 1a. One member: blocks of segments side by side in the lanes (assembly/qubit-blocks.ts)
// against the paired-member path it replaces (one zero-weight member that is not a copy of
// member 0 sends the job down that path), alternating rounds in this process.
log('\none member: blocks of segments in the lanes against paired members (alternating rounds)');
log('segments   gradient: blocks ns/seg   paired ns/seg   paired/blocks   figure alone: blocks ns/seg   paired ns/seg   paired/blocks');
const oneMember: { segments: number; blocksNs: number; pairedNs: number; ratio: number; figureBlocksNs: number; figurePairedNs: number; figureRatio: number }[] = [];
for (const segments of [100, 1000, 10000]) {
  const pulse = smoothPulse(segments, 2e-7 * (segments / 100), 1e7);
  const member = { detuning: 3e5, amplitudeError: 0.02, weight: 1 };
  const blocks = prepareGradientJob(gate, pulse, [member]);
  const paired = prepareGradientJob(gate, pulse, [member, { detuning: -4e5, amplitudeError: 0, weight: 0 }]);
  const reps = Math.max(3, Math.round(2e5 / segments));
  const timeOf = (fn: () => number): number => {
    const t = performance.now();
    for (let k = 0; k < reps; k++) fn();
    return (performance.now() - t) / reps;
  };
  for (let k = 0; k < 3; k++) { timeOf(blocks.run); timeOf(paired.run); timeOf(blocks.figure); timeOf(paired.figure); }
  const b: number[] = [], p: number[] = [], r: number[] = [], fb: number[] = [], fp: number[] = [], fr: number[] = [];
  for (let round = 0; round < 21; round++) {
    const tb = timeOf(blocks.run), tp = timeOf(paired.run);
    b.push(tb); p.push(tp); r.push(tp / tb);
    const ub = timeOf(blocks.figure), up = timeOf(paired.figure);
    fb.push(ub); fp.push(up); fr.push(up / ub);
  }
  blocks.dispose(); paired.dispose();
  const row = {
    segments, blocksNs: (medianOf(b) * 1e6) / segments, pairedNs: (medianOf(p) * 1e6) / segments, ratio: medianOf(r),
    figureBlocksNs: (medianOf(fb) * 1e6) / segments, figurePairedNs: (medianOf(fp) * 1e6) / segments, figureRatio: medianOf(fr),
  };
  oneMember.push(row);
  log(`${String(segments).padStart(8)}   ${row.blocksNs.toFixed(2).padStart(22)}   ${row.pairedNs.toFixed(2).padStart(13)}   ${row.ratio.toFixed(2).padStart(13)}   ${row.figureBlocksNs.toFixed(2).padStart(26)}   ${row.figurePairedNs.toFixed(2).padStart(13)}   ${row.figureRatio.toFixed(2).padStart(13)}`);
}

// 1b. The transmon ladder through the system seam (a problem block of the ladder kind, as
// design and the maps use it; scalar f64, one member at a time) beside the two-level kernels.
log('\ntransmon ladder through the system seam: figure and objective + exact gradient, medians (ns per segment-member; two-level kernels alongside)');
log('levels  segments  members   figure ms   gradient ms   figure ns   gradient ns   two-level gradient ns');
const ladder: { levels: number; segments: number; members: number; figureMs: number; gradientMs: number; figureNs: number; gradientNs: number; twoLevelGradientNs: number }[] = [];
for (const levels of [3, 5]) {
  for (const segments of [20, 100]) {
    for (const count of [1, 25]) {
      const members = asLadderMembers(gridMembers(count));
      const pulse = smoothPulse(segments, 2e-8 * (segments / 100), 1e8);
      const system = { levels, anharmonicity: -2.12e8 };
      const job = prepareGradientJob(gate, pulse, members, undefined, undefined, system);
      const gradientMs = median(() => job.run(), repsFor(() => job.run(), 300));
      job.dispose();
      const figureRun = (): void => void evaluateMembers(gate, pulse, members, undefined, system);
      const figureMs = median(figureRun, repsFor(figureRun, 300));
      const qubit = prepareGradientJob(gate, pulse, members);
      const qubitMs = median(() => qubit.run(), repsFor(() => qubit.run(), 100));
      qubit.dispose();
      const per = 1e6 / (segments * count);
      const row = { levels, segments, members: count, figureMs, gradientMs, figureNs: figureMs * per, gradientNs: gradientMs * per, twoLevelGradientNs: qubitMs * per };
      ladder.push(row);
      log(`${String(levels).padStart(6)}  ${String(segments).padStart(8)}  ${String(count).padStart(7)}   ${figureMs.toFixed(4).padStart(9)}   ${gradientMs.toFixed(4).padStart(11)}   ${row.figureNs.toFixed(0).padStart(9)}   ${row.gradientNs.toFixed(0).padStart(11)}   ${row.twoLevelGradientNs.toFixed(1).padStart(21)}`);
    }
  }
}

// 1c. Calibration of the DRAG family on an invented lab's 15 ns transmon X(180) (5 levels, 3 members).
const dragSpec = parseSpec({
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } }, duration: 1.5e-8, segments: 36, rabiMax: 2.5e8,
  system: { levels: 5, anharmonicity: -2e8 }, ensemble: { amplitudeError: { min: -0.01, max: 0.01, points: 3 } },
});
const dragCalibration: { envelope: string; ms: number; evaluations: number; meanInfidelity: number; meanLeakage: number }[] = [];
log('\nDRAG calibration (amplitude, beta, drive detuning by Nelder-Mead), 15 ns X(180), 5 levels x 3 members, medians');
for (const envelope of ['gaussian', 'cosine'] as const) {
  let last = calibrateDrag(dragSpec, { envelope });
  const ms = median(() => void (last = calibrateDrag(dragSpec, { envelope })), 9, 1);
  const row = { envelope, ms, evaluations: last.evaluations, meanInfidelity: last.evaluation.meanInfidelity, meanLeakage: last.evaluation.meanLeakage ?? 0 };
  dragCalibration.push(row);
  log(`${envelope.padEnd(9)} ${ms.toFixed(1).padStart(7)} ms   ${row.evaluations} evaluations   mean infidelity ${row.meanInfidelity.toExponential(2)}   leakage ${row.meanLeakage.toExponential(2)}`);
}

// 1d. The fused build against the portable one, in a child Node with relaxed SIMD on.
log('');
const fusedRun = spawnSync(process.execPath, ['--experimental-wasm-relaxed-simd', 'bin/run-ts.js', 'bench/fused-bench.ts', '--json'], { cwd: new URL('../', import.meta.url).pathname, encoding: 'utf8' });
const fused: FusedFigures[] | null = fusedRun.status === 0 ? JSON.parse(fusedRun.stdout) : null;
if (fusedRun.status !== 0) log(`fused build benchmark failed: ${fusedRun.stderr.split('\n')[0]}`);
fusedTable(fused, log);

// 2. Robustness maps (figure only).
log('\nrobustness maps (figure only), medians');
log('grid        segments   ms        ns per member-segment');
const maps: { detuningPoints: number; amplitudePoints: number; segments: number; ms: number; nsPerMemberSegment: number }[] = [];
for (const [side, segments, reps] of [[101, 200, 15], [201, 200, 5], [401, 1000, 3]] as const) {
  const pulse = smoothPulse(segments, 2e-7 * (segments / 100), 1e7);
  const axisD = { min: -2e6, max: 2e6, points: side }, axisA = { min: -0.2, max: 0.2, points: side };
  const ms = median(() => void robustnessMap(gate, pulse, axisD, axisA), reps, 1);
  const row = { detuningPoints: side, amplitudePoints: side, segments, ms, nsPerMemberSegment: (ms * 1e6) / (side * side * segments) };
  maps.push(row);
  log(`${`${side} x ${side}`.padEnd(11)} ${String(segments).padStart(8)}   ${ms.toFixed(2).padStart(8)}   ${row.nsPerMemberSegment.toFixed(2)}`);
}

// 2b. The held pulse's spectrum (plain TypeScript, run in the app's analysis worker).
log('\nspectrum of the held pulse (FFT; span ±40 MHz, 1601 points), medians');
log('samples     ms');
const spectrum: { samples: number; ms: number }[] = [];
for (const [samples, reps] of [[1000, 15], [100_000, 3]] as const) {
  const pulse = smoothPulse(samples, 1e-9 * samples, 1e7);
  const ms = median(() => void heldSpectrum(pulse, { min: -4e7, max: 4e7, points: 1601, levels: [-3, -20] }), reps, 1);
  spectrum.push({ samples, ms });
  log(`${String(samples).padStart(7)}  ${ms.toFixed(1).padStart(7)}`);
}

// 3. Accuracy of the series sine/cosine of the kernels against the exact oracle.
const accuracyPulse = smoothPulse(200, 4e-7, 1e7);
const accuracyMembers = gridMembers(121);
const fast = evaluateMembers(gate, accuracyPulse, accuracyMembers);
const seriesJob = prepareGradientJob(gate, accuracyPulse, accuracyMembers);
seriesJob.run();
const seriesTerms = seriesJob.series().terms;
seriesJob.dispose();
let maxAbs = 0;
fast.members.forEach((m, j) => {
  maxAbs = Math.max(maxAbs, Math.abs(m.infidelity - memberInfidelity(gate, accuracyPulse, accuracyMembers[j])));
});
log(`\nseries sine/cosine against Math.sin/cos (oracle), 121 members x 200 segments: max |difference in infidelity| = ${maxAbs.toExponential(2)} (series terms used: ${seriesTerms})`);

// 4. Designs of the demo specs.
log('\ndemo designs (whole design(), every start, one thread)');
log('name                       wall s   evaluations   mean infidelity   worst infidelity   iterations (best start)   leakage, on levels + 2');
const designs: { name: string; wallS: number; evaluations: number; meanInfidelity: number; worstInfidelity: number; iterations: number; starts: number; meanLeakage?: number; truncationCheck?: unknown }[] = [];
const exampleDir = new URL('../examples/', import.meta.url);
for (const file of readdirSync(exampleDir).filter((f) => f.endsWith('.json')).sort()) {
  const spec = JSON.parse(readFileSync(new URL(file, exampleDir), 'utf8'));
  await design(spec, { startIndices: [0] }); // warm-up
  const t = performance.now();
  const r = await design(spec);
  const wallS = (performance.now() - t) / 1000;
  const evaluations = r.starts.reduce((sum, start) => sum + start.evaluations, 0);
  const row = {
    name: file.replace(/\.json$/, ''), wallS, evaluations, meanInfidelity: r.evaluation.meanInfidelity, worstInfidelity: r.evaluation.worstInfidelity, iterations: r.best.iterations, starts: r.starts.length,
    ...(r.evaluation.meanLeakage !== undefined ? { meanLeakage: r.evaluation.meanLeakage, truncationCheck: r.truncationCheck } : {}),
  };
  designs.push(row);
  const ladderText = row.meanLeakage !== undefined
    ? `   leakage ${row.meanLeakage.toExponential(2)}; on ${r.truncationCheck!.levels} levels ${r.truncationCheck!.meanInfidelity.toExponential(2)}, leakage ${r.truncationCheck!.meanLeakage.toExponential(2)}` : '';
  log(`${row.name.padEnd(26)} ${wallS.toFixed(3).padStart(6)}   ${String(evaluations).padStart(11)}   ${row.meanInfidelity.toExponential(2).padStart(15)}   ${row.worstInfidelity.toExponential(2).padStart(16)}   ${String(row.iterations).padStart(4)}${ladderText}`);
}

// 5. The line: the drive map's two methods (the FFT crossover), and designs with and without a line.
log('\nthe line\'s drive map, samples -> drive (one block, forward map alone): direct sum against FFT');
log('samples  kernel (held)  FFT size   direct us      FFT us   n Lc / (N log2 N)');
const lineMaps: { samples: number; heldKernel: number; fftSize: number; directUs: number; fftUs: number; ratio: number }[] = [];
const core = getCore();
for (const n of [24, 100, 400, 1600]) {
  for (const bandwidth of [3e9, 3e8, 6e7, 1.5e7]) {
    const line: Line = { oversample: 8, response: { kind: 'gaussian', bandwidth }, delay: 0, boundOn: 'programmed' };
    const pulse = smoothPulse(n, n / 2.4e9, 1e7);
    const time = (method: 'direct' | 'fft'): { us: number; layout: ReturnType<typeof lineLayout> } => {
      const layout = lineLayout(line, n, pulse.dt, method);
      const enc = encodeMembers([{ detuning: 0, amplitudeError: 0, weight: 1 }], 2, true);
      const p = createBlock(core, { target: gate, segments: n, dt: pulse.dt, members: enc, drive: layout, held: true });
      setSamples(core, p, pulse.i, pulse.q);
      const run = (): void => core.exports.problemDrive(p);
      const us = 1000 * median(run, repsFor(run, 150));
      freeBlock(core, p);
      return { us, layout };
    };
    const direct = time('direct'), fft = time('fft');
    const lc = direct.layout.values[1], size = fft.layout.values[3];
    const row = { samples: n, heldKernel: lc, fftSize: size, directUs: direct.us, fftUs: fft.us, ratio: (n * lc) / (size * Math.log2(size)) };
    lineMaps.push(row);
    log(`${String(n).padStart(7)}  ${String(lc).padStart(13)}  ${String(size).padStart(8)}  ${direct.us.toFixed(1).padStart(9)}  ${fft.us.toFixed(1).padStart(10)}   ${row.ratio.toFixed(2)}`);
  }
}
// The crossover: the ratio where the two methods take equal time, between the largest
// ratio at which the direct sum still wins and the smallest at which the FFT does.
const directWins = lineMaps.filter((r) => r.directUs <= r.fftUs).map((r) => r.ratio);
const fftWins = lineMaps.filter((r) => r.fftUs < r.directUs).map((r) => r.ratio);
const crossover = directWins.length && fftWins.length ? Math.sqrt(Math.max(...directWins) * Math.min(...fftWins)) : NaN;
log(`measured crossover n Lc / (N log2 N) ~ ${crossover.toFixed(2)} (the library uses the FFT above ${FFT_CROSSOVER})`);

log('\ndesigns with and without a line (Gaussian 300 MHz, oversample 8; the spec\'s own line where it has one), one thread');
log('name                       without s   with s   mean infidelity without / through the line');
const lineDesigns: { name: string; withoutS: number; withS: number; meanWithout: number; meanWith: number }[] = [];
for (const file of readdirSync(exampleDir).filter((f) => f.endsWith('.json')).sort()) {
  const spec = JSON.parse(readFileSync(new URL(file, exampleDir), 'utf8'));
  const { line, ...bare } = spec;
  const lined = { ...bare, line: line ?? { oversample: 8, response: { gaussian: { bandwidth: 3e8 } } } };
  const t0 = performance.now();
  const a = await design(bare);
  const t1 = performance.now();
  const b = await design(lined);
  const t2 = performance.now();
  const row = { name: file.replace(/\.json$/, ''), withoutS: (t1 - t0) / 1000, withS: (t2 - t1) / 1000, meanWithout: a.evaluation.meanInfidelity, meanWith: b.evaluation.meanInfidelity };
  lineDesigns.push(row);
  log(`${row.name.padEnd(26)} ${row.withoutS.toFixed(3).padStart(9)}  ${row.withS.toFixed(3).padStart(7)}   ${row.meanWithout.toExponential(2)} / ${row.meanWith.toExponential(2)}`);
}

// 5b. Member shares of one evaluation on one thread and on two, and one-start designs.
log('');
const shares = await shareBenchmark(log);

// 6. The compiled command: start-up against bare Node, Ctrl-C latency.
let command: CommandFigures | null = null;
if (!process.argv.includes('--no-command')) {
  log('');
  command = await commandBenchmark(log);
}

// 7. A batch of designs: one core, all cores, shards by GNU parallel.
let batch: BatchFigures | null = null;
if (!process.argv.includes('--no-batch')) batch = batchBenchmark(log);

// 8. The app in headless Chromium (skipped without /usr/bin/chromium).
let app: AppFigures | { error: string } | null = null;
if (!process.argv.includes('--no-app')) {
  log('');
  // A browser step past its timeout is a figure of the run (the error), not the end of it.
  try {
    app = await appBenchmark(log);
  } catch (error) {
    app = { error: error instanceof Error ? error.message.split('\n')[0] : String(error) };
    log(`app benchmark failed: ${app.error}`);
  }
}

if (json) {
  process.stdout.write(JSON.stringify({ objectiveGradient, oneMember, ladder, dragCalibration, design: designs, maps, spectrum, seriesAccuracy: { maxAbsInfidelityDifference: maxAbs }, line: { maps: lineMaps, crossover, designs: lineDesigns }, shares, fused, command, batch, app }) + '\n');
}
