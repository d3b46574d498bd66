// `gatesmith batch run|collect`: families of designs from one manifest, run in shards on the
// schedulers labs already have (GNU parallel, Slurm job arrays, Kubernetes indexed jobs)
// and gathered into one table. The two subcommands live in batch-run.ts and batch-collect.ts.
import { ArgumentError } from '../core/errors.ts';
import type { CliIO, Command } from './command.ts';

const SUBCOMMANDS: Record<string, () => Promise<Command>> = {
  run: async () => (await import('./batch-run.ts')).batchRunCommand,
  collect: async () => (await import('./batch-collect.ts')).batchCollectCommand,
};

const HELP = `Families of designs: one manifest (a base spec and named variations of it), run in
shards on one machine or many, gathered into one table.

Usage: gatesmith batch run MANIFEST --out DIR [--shard I/N] [--threads N] [--json]
       gatesmith batch collect DIR [--json]
       gatesmith batch run --help | gatesmith batch collect --help

With GNU parallel on one machine (three shards, the cores shared among them):

    parallel gatesmith batch run chip.json --out runs --threads 1 --shard {}/3 ::: 1 2 3
    gatesmith batch collect runs

As a Slurm job array (sbatch --array=0-7), each task runs the shard its
SLURM_ARRAY_TASK_ID names; as a Kubernetes indexed job, JOB_COMPLETION_INDEX with
--shards N (or GATESMITH_SHARDS=N). See README.md, "Batches".
`;

/** The `batch` subcommand: dispatches to `batch run` and `batch collect`. */
export const batchCommand: Command = {
  name: 'batch',
  summary: 'run a family of designs (a manifest of variations) in shards, or collect its results',
  help: HELP,
  async run(argv: string[], io: CliIO): Promise<number> {
    const [sub, ...rest] = argv;
    if (sub === undefined || sub === '--help' || sub === '-h') {
      (sub === undefined ? io.stderr : io.stdout)(HELP);
      return sub === undefined ? 1 : 0;
    }
    const load = SUBCOMMANDS[sub];
    if (!load) throw new ArgumentError(`batch: unknown subcommand "${sub}"; use batch run or batch collect (see gatesmith batch --help)`);
    return (await load()).run(rest, io);
  },
};
