/**
 * Finds the installed application's root folder (the one holding package.json
 * and samples/), whether running from sources (tsx, vitest) or from out/main.
 */
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';

export function findAppRoot(start: string = __dirname): string {
  let dir = start;
  for (let i = 0; i < 8; i++) {
    if (existsSync(join(dir, 'package.json')) && existsSync(join(dir, 'samples', 'catalog.json'))) return dir;
    const up = dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  throw new Error(`cannot find the Rankfill folder above ${start}`);
}
