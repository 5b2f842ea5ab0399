/** Debian's Chromium driven by playwright-core (never a downloaded browser). */
import { chromium, type Browser } from 'playwright-core';
import { existsSync } from 'node:fs';

const CANDIDATES = [
  '/usr/bin/chromium',
  '/usr/bin/chromium-browser',
  '/usr/bin/google-chrome',
  '/usr/bin/google-chrome-stable',
];

function chromiumPath(): string {
  const fromEnv = process.env.RANKFILL_CHROMIUM;
  const found = fromEnv ?? CANDIDATES.find((p) => existsSync(p));
  if (!found || !existsSync(found)) {
    throw new Error('no Chromium found: install it with `apt-get install -y chromium` or set RANKFILL_CHROMIUM');
  }
  return found;
}

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: chromiumPath(),
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--no-first-run',
      '--disable-dev-shm-usage',
    ],
  });
}
