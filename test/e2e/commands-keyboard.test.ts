/**
 * Commands reach the page the same way from the menu (its `menu.command`
 * strings), the shortcuts and the edit bar; F1 opens our own help page;
 * every control is reachable by Tab; the side panel folds away and resizes.
 */
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

describe('commands and keyboard', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const pageErrors: string[] = [];

  beforeAll(async () => {
    host = await startHost();
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  const runWire = (command: string) =>
    page.evaluate((c) => (window as unknown as { rankfillApp: { commands: { runWire(c: string): boolean } } }).rankfillApp.commands.runWire(c), command);

  it('F1 opens our help page on the workflow and the model; Escape closes it', async () => {
    await page.locator('.ag-row[row-index="0"] .ag-cell[col-id="c0"]').click();
    await page.keyboard.press('F1');
    await page.waitForSelector('[data-testid=help-dialog]');
    const text = (await page.textContent('[data-testid=help-page]')) ?? '';
    expect(text).toContain('The workflow');
    expect(text).toContain('baseline plus an interaction term');
    expect(text).not.toMatch(/No Rows To Show/i);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'help-page.png') });
    await page.keyboard.press('Escape');
    await expect.poll(() => page.locator('[data-testid=help-dialog]').count()).toBe(0);
  });

  it('the menu’s "Open a Sample Set…" offers the samples and opens the chosen one', async () => {
    expect(await runWire('file.openSample')).toBe(true);
    await page.waitForSelector('[data-testid=sample-dialog]');
    await page.click('[data-testid=sample-open-peer-review-round]');
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toBe('30 rows × 18 columns');
    expect(await page.inputValue('[data-testid=sample-picker]')).toBe('peer-review-round');
    expect(await runWire('no.such.command')).toBe(false);
  });

  it('Ctrl+Enter fills, as the menu item and the button do', async () => {
    await page.locator('.ag-row[row-index="0"] .ag-cell[col-id="c1"]').click();
    await page.keyboard.press('Control+Enter');
    await expect.poll(() => page.evaluate(() => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length), { timeout: 30_000 }).toBe(1);
    expect(await runWire('model.fill')).toBe(true);
    await expect.poll(() => page.evaluate(() => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length), { timeout: 30_000 }).toBe(2);
    expect(pageErrors).toEqual([]);
  });
});
