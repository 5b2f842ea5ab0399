#!/usr/bin/env node
'use strict';
// `rankfill` command line. Runs the built bundle out/cli/rankfill.js (made by
// `npm run build:cli`, which `npm run build` and `npm test` include), so no TypeScript is
// compiled at start. Output and exit codes: see src-main/cli/main.ts.
const path = require('node:path');

const bundle = path.join(__dirname, '..', 'out', 'cli', 'rankfill.js');
let main;
try {
  ({ main } = require(bundle));
} catch (err) {
  const missing = err && err.code === 'MODULE_NOT_FOUND' && String(err.message).includes(bundle);
  process.stderr.write(
    missing
      ? `rankfill: the command line is not built yet (no ${path.relative(process.cwd(), bundle) || bundle}); run \`npm run build:cli\` in ${path.join(__dirname, '..')}\n`
      : `rankfill: cannot start: ${String((err && err.message) || err).split('\n')[0]}\n`,
  );
  process.exit(1);
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (err) => {
    process.stderr.write(`rankfill: internal error: ${String((err && err.message) || err).split('\n')[0]}\n`);
    process.exitCode = 1;
  },
);
