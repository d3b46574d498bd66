#!/usr/bin/env node
// Entry point of the `gatesmith` command: runs the compiled command line in dist/ (built by
// `npm run build:lib`, which `npm install` and `npm pack` run in a checkout).
let cli;
try {
  cli = await import('../dist/cli/main.js');
} catch (error) {
  if (error?.code !== 'ERR_MODULE_NOT_FOUND' || !String(error.message).includes('dist')) throw error;
  process.stderr.write('gatesmith: the command is not built (dist/ is missing): run "npm run build:lib" in the gatesmith folder\n');
  process.exit(2);
}
process.exitCode = await cli.main(process.argv.slice(2));
