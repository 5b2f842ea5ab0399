// Before the end-to-end tests: find a Chromium, or install Debian's when we can,
// or stop with one line naming the command that installs it. Never a silent skip.
import { existsSync } from 'node:fs';
import { execFileSync, spawnSync } from 'node:child_process';

export const CANDIDATES = [
  '/usr/bin/chromium',
  '/usr/bin/chromium-browser',
  '/usr/bin/google-chrome',
  '/usr/bin/google-chrome-stable',
];

export function findChromium() {
  const fromEnv = process.env.RANKFILL_CHROMIUM;
  if (fromEnv) return existsSync(fromEnv) ? fromEnv : undefined;
  return CANDIDATES.find((p) => existsSync(p));
}

function isDebianRoot() {
  return process.getuid?.() === 0 && existsSync('/etc/debian_version') && existsSync('/usr/bin/apt-get');
}

if (process.argv[1] && process.argv[1].endsWith('ensure-chromium.mjs')) {
  let found = findChromium();
  if (!found && !process.env.RANKFILL_CHROMIUM && isDebianRoot()) {
    console.log("Rankfill tests: no Chromium found; installing Debian's chromium package…");
    execFileSync('apt-get', ['update'], { stdio: 'inherit' });
    const r = spawnSync('apt-get', ['install', '-y', 'chromium'], {
      stdio: 'inherit',
      env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
    });
    if (r.status !== 0) process.exit(r.status ?? 1);
    found = findChromium();
  }
  if (!found) {
    const where = process.env.RANKFILL_CHROMIUM
      ? `RANKFILL_CHROMIUM=${process.env.RANKFILL_CHROMIUM} does not exist`
      : 'no Chromium found';
    console.error(
      `Rankfill tests: ${where}; install one with: sudo apt-get install -y chromium (or set RANKFILL_CHROMIUM to its path).`,
    );
    process.exit(1);
  }
}
