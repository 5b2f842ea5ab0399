#!/usr/bin/env node
'use strict';
// `rankfill` command line. Runs the TypeScript sources directly (no build step): tsx's
// CommonJS hook is registered in-process and src-main/cli/main.ts is required.
// Output and exit codes: see src-main/cli/main.ts.
const path = require('node:path');

let runCli;
try {
  require('tsx/cjs/api').register();
  ({ runCli } = require(path.join(__dirname, '..', 'src-main', 'cli', 'main.ts')));
} catch (err) {
  process.stderr.write(`rankfill: cannot start: ${String((err && err.message) || err).split('\n')[0]}\n`);
  process.exit(1);
}

runCli(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (err) => {
    process.stderr.write(`rankfill: internal error: ${String((err && err.message) || err).split('\n')[0]}\n`);
    process.exitCode = 1;
  },
);
