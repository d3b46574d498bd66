// Records, for a design spec and seeds, every start's objective after each iteration and
// its evaluation count, run to the end (stopping rules off). The stopping rules
// (stall, pruning) only cut these traces short, so their effect is read off exactly.
//   node bin/run-ts.js bench/traces.ts examples/ion-x180.json 1 8 > traces.json
import { readFileSync } from 'node:fs';
import { toProblem } from '../src/core/api.ts';
import { StartRun } from '../src/core/run.ts';

const [file, from, to] = process.argv.slice(2);
const spec = JSON.parse(readFileSync(file, 'utf8'));
const out: { seed: number; starts: { objective: number[]; evaluations: number[] }[] }[] = [];
for (let seed = Number(from); seed <= Number(to); seed++) {
  const problem = toProblem({ ...spec, optimizer: { ...spec.optimizer, seed } });
  const starts = [];
  for (let s = 0; s < problem.optimizer.starts; s++) {
    const run = new StartRun(problem, s);
    const objective = [run.objective], evaluations = [run.evaluations];
    while (run.iterations < problem.optimizer.maxIterations && run.infidelity > problem.optimizer.targetInfidelity) {
      if (run.step()) break;
      objective.push(run.objective);
      evaluations.push(run.evaluations);
    }
    run.dispose();
    starts.push({ objective, evaluations });
  }
  out.push({ seed, starts });
  process.stderr.write(`${file} seed ${seed} done\n`);
}
process.stdout.write(JSON.stringify(out));
