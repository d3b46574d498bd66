// `gatesmith batch collect DIR [--json]`: one table of every variation of a batch folder
// (from its copy of the manifest), with the figures of those done and which are missing or
// failed; exit code 1 while any is.
import { describeValue } from '../core/errors.ts';
import { optionsHelp, usageLine } from './args.ts';
import type { ArgSpec } from './args.ts';
import { loadBatchFolder, readResult } from './batch-files.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { formatInfidelity } from './format.ts';

const ARGS: ArgSpec = {
  command: 'batch collect',
  positionals: ['DIR'],
  flags: [{ name: 'json', help: 'print { "variations": [ { name, status, meanInfidelity, worstInfidelity, pulse } ] }' }],
};

const HELP = `Gather the results of a batch folder written by "gatesmith batch run" (any number of
shards, on any machines sharing the folder) into one table.

Usage: ${usageLine(ARGS)}

Each variation of the folder's copy of the manifest is "done" (with its mean and worst
infidelity and its pulse file, relative to DIR), "failed" (with the reason) or "missing"
(not run yet, or cut short). Exit code 1 while any variation is missing or failed.

Options:
${optionsHelp(ARGS)}
`;

/** One row of the collected table. */
export interface CollectedVariation {
  name: string;
  status: 'done' | 'failed' | 'missing';
  meanInfidelity: number | null;
  worstInfidelity: number | null;
  pulse: string | null;
}

/** The `batch collect` subcommand. */
export const batchCollectCommand: Command = defineCommand({
  name: 'batch collect',
  summary: 'gather the results of a batch folder into one table',
  args: ARGS,
  help: HELP,
  async body([dir], flags, io: CliIO): Promise<number> {
    const loaded = loadBatchFolder(dir);
    const rows: (CollectedVariation & { set: Record<string, unknown>; error?: string })[] = loaded.manifest.variations.map((v) => {
      const r = readResult(dir, v.name);
      if (!r) return { name: v.name, status: 'missing', meanInfidelity: null, worstInfidelity: null, pulse: null, set: v.set };
      return { name: v.name, status: r.status, meanInfidelity: r.meanInfidelity, worstInfidelity: r.worstInfidelity, pulse: r.pulse, set: v.set, error: r.error };
    });
    const missing = rows.filter((r) => r.status === 'missing').length;
    const failed = rows.filter((r) => r.status === 'failed').length;
    if (flags.json) {
      const variations = rows.map(({ name, status, meanInfidelity, worstInfidelity, pulse }) => ({ name, status, meanInfidelity, worstInfidelity, pulse }));
      io.stdout(JSON.stringify({ variations }, null, 2) + '\n');
    } else {
      io.stdout(collectTable(rows));
    }
    const summary = `${rows.length} variations: ${rows.length - missing - failed} done, ${failed} failed, ${missing} missing`;
    io.stderr(`batch: ${summary}\n`);
    return missing + failed > 0 ? 1 : 0;
  },
});

/** A number as typed in a spec: 1.05e7 rather than 10500000, whichever is shorter. */
function compact(x: number): string {
  const exp = x.toExponential().replace('e+', 'e');
  return exp.length < String(x).length ? exp : String(x);
}

function overrides(set: Record<string, unknown>): string {
  const parts = Object.entries(set).map(([k, v]) => `${k}=${typeof v === 'number' ? compact(v) : describeValue(v)}`);
  return parts.length === 0 ? '(base)' : parts.join(' ');
}

function collectTable(rows: (CollectedVariation & { set: Record<string, unknown>; error?: string })[]): string {
  const head = ['name', 'status', 'mean', 'worst', 'pulse', 'overrides'];
  const cells = rows.map((r) => [
    r.name,
    r.status,
    r.meanInfidelity === null ? '-' : formatInfidelity(r.meanInfidelity),
    r.worstInfidelity === null ? '-' : formatInfidelity(r.worstInfidelity),
    r.pulse ?? '-',
    overrides(r.set),
  ]);
  const widths = head.map((h, c) => Math.max(h.length, ...cells.map((row) => row[c].length)));
  const line = (row: string[]): string => row.map((cell, c) => (c === row.length - 1 ? cell : cell.padEnd(widths[c]))).join('  ');
  const out = [line(head), ...cells.map(line)];
  for (const r of rows) if (r.status === 'failed' && r.error) out.push(`${r.name} failed: ${r.error}`);
  return out.join('\n') + '\n';
}
