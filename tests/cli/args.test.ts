// The subcommands' argument parser: the forms of flags (POSIX-style long options, common
// practice: `--name value`, `--name=value`, `--` ends options) and its errors.
import { describe, expect, it } from 'vitest';
import { ArgumentError } from '../../src/core/errors.ts';
import { optionsHelp, parseArgs, requirePositionals, usageLine, type ArgSpec } from '../../src/cli/args.ts';

const SPEC: ArgSpec = {
  command: 'design',
  positionals: ['SPEC'],
  flags: [
    { name: 'out', value: 'PULSE', help: 'write the pulse' },
    { name: 'json', help: 'JSON output' },
  ],
};

describe('parseArgs', () => {
  it('reads --name value, --name=value, switches and positionals in any order', () => {
    expect(parseArgs(['--out', 'a.json', 'spec.json', '--json'], SPEC)).toEqual({
      positionals: ['spec.json'], flags: { out: 'a.json', json: true }, help: false,
    });
    expect(parseArgs(['spec.json', '--out=b=c.json'], SPEC).flags).toEqual({ out: 'b=c.json' });
  });

  it('treats "-" and everything after "--" as positionals', () => {
    expect(parseArgs(['-', '--', '--json', '-x'], SPEC).positionals).toEqual(['-', '--json', '-x']);
  });

  it('notes --help and -h wherever they stand', () => {
    expect(parseArgs(['spec.json', '-h'], SPEC).help).toBe(true);
    expect(parseArgs(['--help', '--out', 'x'], SPEC).help).toBe(true);
  });

  it.each([
    [['--out'], '--out needs a value (PULSE)'],
    [['--out', '--json'], '--out needs a value (PULSE)'],
    [['--out='], '--out needs a value (PULSE)'],
    [['--json=1'], '--json takes no value (got "1")'],
    [['-j'], 'unknown option -j'],
    [['--Json'], 'unknown option --Json; options: --out, --json, --help'],
    [['--out', 'a', '--out', 'b'], '--out is given more than once'],
  ])('%j is an ArgumentError: %s', (argv, message) => {
    expect(() => parseArgs(argv, SPEC)).toThrow(ArgumentError);
    expect(() => parseArgs(argv, SPEC)).toThrow(`design: ${message}`);
  });
});

describe('positionals and help text', () => {
  it('demands exactly the positionals named', () => {
    expect(requirePositionals(parseArgs(['s.json'], SPEC), SPEC)).toEqual(['s.json']);
    expect(() => requirePositionals(parseArgs([], SPEC), SPEC)).toThrow('design: missing SPEC; usage: gatesmith design SPEC [--out PULSE] [--json]');
    expect(() => requirePositionals(parseArgs(['a', 'b'], SPEC), SPEC)).toThrow('unexpected argument "b"');
  });

  it('writes the usage line and an aligned options list that includes --help', () => {
    expect(usageLine(SPEC)).toBe('gatesmith design SPEC [--out PULSE] [--json]');
    expect(optionsHelp(SPEC).split('\n')).toEqual([
      '  --out PULSE  write the pulse',
      '  --json       JSON output',
      '  --help       show this help',
    ]);
  });
});
