// Is the built app (out/) older than its sources? Shared by `npm start` and `npm run serve`.
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';

export const root = join(import.meta.dirname, '..');

const OUTPUTS = ['out/main/index.js', 'out/main/browserHost.js', 'out/preload/preload.js', 'out/renderer/index.html'];
const SOURCES = [
  'src-main',
  'src-renderer',
  'src-shared',
  'electron.vite.config.ts',
  'package.json',
  'package-lock.json',
];

function newestMtime(path) {
  if (!existsSync(path)) return 0;
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = 0;
  for (const entry of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, entry)));
  return newest;
}

export function buildIsCurrent() {
  const outs = OUTPUTS.map((p) => join(root, p));
  if (!outs.every((p) => existsSync(p))) return false;
  const oldestOut = Math.min(...outs.map((p) => statSync(p).mtimeMs));
  const newestSrc = Math.max(...SOURCES.map((p) => newestMtime(join(root, p))));
  return newestSrc <= oldestOut;
}

export function buildIfNeeded() {
  if (buildIsCurrent()) return;
  console.log('Rankfill: building the app (first start or sources changed)…');
  const bin = join(root, 'node_modules', '.bin', 'electron-vite');
  const r = spawnSync(bin, ['build'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
  if (r.status !== 0) {
    console.error('Rankfill: the build failed; see the messages above.');
    process.exit(r.status ?? 1);
  }
}
