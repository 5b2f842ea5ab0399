/** Names of the files written beside an export: NAME.settings.json and NAME.mask.csv. */
import { basename, dirname, extname, join } from 'node:path';

export function sidecarPathFor(path: string): string {
  const ext = extname(path);
  return join(dirname(path), `${basename(path, ext)}.settings.json`);
}

export function maskPathFor(path: string): string {
  const ext = extname(path);
  return join(dirname(path), `${basename(path, ext)}.mask${ext || '.csv'}`);
}
