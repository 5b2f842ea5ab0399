/**
 * The API token never reaches a command line (issue 11): the host opens the system
 * browser with a one-time launch address, and the page trades it for the token.
 * A stand-in `xdg-open` early on PATH records the argv it was started with — what
 * `ps` would show every local user.
 */
import { chmodSync, mkdtempSync, readFileSync, existsSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { startHost, type RunningHost } from './support/hostProcess';

describe('launch without the token on a command line', () => {
  let host: RunningHost;
  let browser: Browser;
  const bin = mkdtempSync(join(tmpdir(), 'rankfill-opener-'));
  const argvFile = join(bin, 'argv.txt');

  beforeAll(async () => {
    writeFileSync(join(bin, 'xdg-open'), `#!/bin/sh\nprintf '%s\\n' "$0" "$@" > '${argvFile}'\n`);
    chmodSync(join(bin, 'xdg-open'), 0o755);
    host = await startHost([], { PATH: `${bin}:${process.env.PATH}`, DISPLAY: ':99' }, { open: true });
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  it('the opener is started with a launch nonce, not the token; the page trades it and works', async () => {
    await expect.poll(() => existsSync(argvFile), { timeout: 10_000 }).toBe(true);
    const argv = readFileSync(argvFile, 'utf8').trim().split('\n');
    expect(argv).toHaveLength(2);
    expect(argv.join(' ')).not.toContain(host.token);
    expect(argv[1]).toMatch(new RegExp(`^${host.url.replace(/[.]/g, '\\.')}#launch=[A-Za-z0-9_-]{24}$`));

    const page = await browser.newPage();
    await page.goto(argv[1]);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
    // The page holds a working token: the first sample opened through the API, and the address bar lost the nonce.
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toMatch(/\d+ rows × \d+ columns/);
    expect(page.url()).toBe(host.url);
    // The nonce is spent: a second page on the same address gets no token and says so.
    const second = await browser.newPage();
    const errors: string[] = [];
    second.on('console', (m) => errors.push(m.text()));
    await second.goto(argv[1]);
    await second.waitForTimeout(1500);
    expect(await second.textContent('[data-testid="status-shape"]').catch(() => null)).not.toMatch(
      /\d+ rows × \d+ columns/,
    );
  }, 60_000);
});
