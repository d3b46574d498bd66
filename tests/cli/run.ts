// Runs the command line in-process with collecting streams (shared by the CLI tests).
import type { CliIO } from '../../src/cli/command.ts';
import { main } from '../../src/cli/main.ts';

/** Exit code and what the command wrote. */
export interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `gatesmith argv...` through main(); stderr is not a terminal unless `io` says so. */
export async function run(argv: string[], io: Partial<CliIO> = {}): Promise<Run> {
  const out = { stdout: '', stderr: '' };
  const code = await main(argv, {
    stdout: (t) => void (out.stdout += t),
    stderr: (t) => void (out.stderr += t),
    isTTY: false,
    ...io,
  });
  return { code, ...out };
}
