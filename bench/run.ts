/**
 * `npm run bench`: runs every bench/*.bench.ts in turn, each in its own Node process
 * (so one benchmark's memory does not count against the next), with tsx's loader and
 * --expose-gc. Exits non-zero if any benchmark fails.
 */
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .sort();
let failed = 0;
for (const f of files) {
  console.log(`\n=== ${f} ===`);
  const r = spawnSync(process.execPath, ['--expose-gc', '--import', 'tsx', join(here, f)], { stdio: 'inherit' });
  if (r.status !== 0) {
    failed++;
    console.log(`${f} failed (exit ${r.status ?? r.signal})`);
  }
}
console.log(`\n${files.length - failed} passed, ${failed} failed`);
process.exitCode = failed > 0 ? 1 : 0;
