// Finds the Electron runtime without triggering its download: `require('electron')`
// would try to fetch the binary, so look for the files it would have left instead.
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

/** @returns {{ ok: true, executable: string } | { ok: false, reason: string }} */
export function findElectronRuntime() {
  const override = process.env.ELECTRON_OVERRIDE_DIST_PATH;
  let pkgDir;
  try {
    pkgDir = dirname(createRequire(import.meta.url).resolve('electron/package.json'));
  } catch {
    return { ok: false, reason: 'the electron package is not installed (run npm install)' };
  }
  const pathTxt = join(pkgDir, 'path.txt');
  if (!existsSync(pathTxt)) {
    return {
      ok: false,
      reason:
        'its runtime was never downloaded (node_modules/electron/path.txt is missing; this machine cannot reach the download)',
    };
  }
  const rel = readFileSync(pathTxt, 'utf8').trim();
  const executable = override ? join(override, rel) : join(pkgDir, 'dist', rel);
  if (!existsSync(executable)) return { ok: false, reason: `its runtime is missing (${executable} does not exist)` };
  return { ok: true, executable };
}
