// A small argument parser for the subcommands: positionals, boolean flags and flags with a
// value (`--out FILE` or `--out=FILE`). Errors are ArgumentErrors naming the flag.
import { ArgumentError } from '../core/errors.ts';

/** One option of a command; `value` names its argument (absent for a boolean switch). */
export interface FlagSpec {
  name: string;
  value?: string;
  help: string;
}

/** What a command accepts. */
export interface ArgSpec {
  command: string;
  /** Names of the required positional arguments, in order (e.g. ["SPEC", "PULSE"]). */
  positionals: string[];
  flags: FlagSpec[];
}

/** The parsed command line: positionals in order, flags by name (string value or true). */
export interface ParsedArgs {
  positionals: string[];
  flags: Record<string, string | true>;
  /** --help or -h was given: the caller prints help and ignores the rest. */
  help: boolean;
}

/** The value given to a flag that takes one, or undefined when it was not given. */
export function flagValue(flags: ParsedArgs['flags'], name: string): string | undefined {
  const v = flags[name];
  return typeof v === 'string' ? v : undefined;
}

/** The value of a flag the command cannot do without; a missing one is an ArgumentError with the usage. */
export function requiredFlag(flags: ParsedArgs['flags'], name: string, spec: ArgSpec): string {
  const v = flagValue(flags, name);
  if (v === undefined) throw new ArgumentError(`${spec.command}: --${name} is required; usage: ${usageLine(spec)}`);
  return v;
}

/** Parses a command's arguments (without the command name itself). */
export function parseArgs(argv: string[], spec: ArgSpec): ParsedArgs {
  const parsed: ParsedArgs = { positionals: [], flags: {}, help: false };
  let optionsEnded = false;
  for (let k = 0; k < argv.length; k++) {
    const arg = argv[k];
    if (optionsEnded || !arg.startsWith('-') || arg === '-') {
      parsed.positionals.push(arg);
      continue;
    }
    if (arg === '--') {
      optionsEnded = true;
      continue;
    }
    if (arg === '--help' || arg === '-h') {
      parsed.help = true;
      continue;
    }
    const eq = arg.indexOf('=');
    const name = (eq >= 0 ? arg.slice(0, eq) : arg).replace(/^--?/, '');
    const flag = spec.flags.find((f) => f.name === name);
    if (!flag || !arg.startsWith('--')) throw unknownFlag(arg, spec);
    if (name in parsed.flags) throw new ArgumentError(`${spec.command}: --${name} is given more than once`);
    if (flag.value === undefined) {
      if (eq >= 0) throw new ArgumentError(`${spec.command}: --${name} takes no value (got "${arg.slice(eq + 1)}")`);
      parsed.flags[name] = true;
      continue;
    }
    let value: string | undefined;
    if (eq >= 0) value = arg.slice(eq + 1);
    else if (k + 1 < argv.length && !argv[k + 1].startsWith('--')) value = argv[++k];
    if (value === undefined || value === '') {
      throw new ArgumentError(`${spec.command}: --${name} needs a value (${flag.value})`);
    }
    parsed.flags[name] = value;
  }
  return parsed;
}

/** Checks that exactly the command's positionals were given. */
export function requirePositionals(parsed: ParsedArgs, spec: ArgSpec): string[] {
  const want = spec.positionals;
  if (parsed.positionals.length < want.length) {
    const missing = want.slice(parsed.positionals.length).join(' ');
    throw new ArgumentError(`${spec.command}: missing ${missing}; usage: ${usageLine(spec)}`);
  }
  if (parsed.positionals.length > want.length) {
    const extra = parsed.positionals[want.length];
    throw new ArgumentError(`${spec.command}: unexpected argument "${extra}"; usage: ${usageLine(spec)}`);
  }
  return parsed.positionals;
}

/** "gatesmith design SPEC [--out PULSE] [--json]" */
export function usageLine(spec: ArgSpec): string {
  const flags = spec.flags.map((f) => `[--${f.name}${f.value ? ` ${f.value}` : ''}]`);
  return ['gatesmith', spec.command, ...spec.positionals, ...flags].join(' ');
}

/** The options block of a help text, one aligned line per flag plus --help. */
export function optionsHelp(spec: ArgSpec): string {
  const rows = [...spec.flags, { name: 'help', help: 'show this help' } as FlagSpec].map((f) => [
    `--${f.name}${f.value ? ` ${f.value}` : ''}`,
    f.help,
  ]);
  const width = Math.max(...rows.map(([left]) => left.length));
  return rows.map(([left, right]) => `  ${left.padEnd(width)}  ${right}`).join('\n');
}

function unknownFlag(arg: string, spec: ArgSpec): ArgumentError {
  const known = [...spec.flags.map((f) => `--${f.name}`), '--help'].join(', ');
  return new ArgumentError(`${spec.command}: unknown option ${arg.split('=')[0]}; options: ${known}`);
}
