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
    page.evaluate(
      (c) =>
        (
          window as unknown as { rankfillApp: { commands: { runWire(c: string): boolean } } }
        ).rankfillApp.commands.runWire(c),
      command,
    );

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
    await expect
      .poll(
        () =>
          page.evaluate(
            () => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length,
          ),
        { timeout: 30_000 },
      )
      .toBe(1);
    expect(await runWire('model.fill')).toBe(true);
    await expect
      .poll(
        () =>
          page.evaluate(
            () => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length,
          ),
        { timeout: 30_000 },
      )
      .toBe(2);
    expect(pageErrors).toEqual([]);
  });
});

describe('keyboard reach and layout', () => {
  let host: RunningHost;
  let browser: Browser;

  beforeAll(async () => {
    host = await startHost();
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  const open = async (width: number, height: number): Promise<Page> => {
    const page = await browser.newPage({ viewport: { width, height } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
    return page;
  };

  /** What has the focus: its test id, or "grid" for anything inside the grid. */
  const focused = (page: Page) =>
    page.evaluate(() => {
      const a = document.activeElement as HTMLElement | null;
      if (!a || a === document.body) return 'body';
      if (a.closest('[data-testid="grid"]')) return 'grid';
      return a.dataset.testid ?? a.closest('[data-testid]')?.getAttribute('data-testid') ?? a.tagName.toLowerCase();
    });

  it('Tab reaches every control in page order, "Bring in file…" included, and passes through the grid in one step each way', async () => {
    const page = await open(1440, 900);
    await page.locator('body').click({ position: { x: 5, y: 5 } });
    const seen: string[] = [];
    for (let k = 0; k < 40; k++) {
      await page.keyboard.press('Tab');
      seen.push(await focused(page));
    }
    const at = (id: string) => seen.indexOf(id);
    for (const id of [
      'sample-picker',
      'import-button',
      'export-button',
      'transpose-button',
      'open-project-button',
      'save-as-button',
      'grid',
      'tab-model',
      'model-family',
      'fill-button',
    ])
      expect(seen, id).toContain(id);
    expect(at('sample-picker')).toBeLessThan(at('import-button'));
    expect(at('import-button')).toBeLessThan(at('export-button'));
    expect(at('save-as-button')).toBeLessThan(at('grid'));
    expect(at('grid')).toBeLessThan(at('tab-model'));
    // The grid takes at most two Tab stops (header, then a cell), not one per cell.
    expect(seen.filter((s) => s === 'grid').length).toBeLessThanOrEqual(2);
    // Shift+Tab from a cell leaves the grid backwards.
    await page.locator('.ag-row[row-index="2"] .ag-cell[col-id="c2"]').click();
    await page.keyboard.press('Shift+Tab');
    const back = await focused(page);
    if (back === 'grid') {
      await page.keyboard.press('Shift+Tab');
      expect(await focused(page)).not.toBe('grid');
    }
    // Enter on the focused "Bring in file…" button asks for a file (import without a mouse).
    await page.evaluate(() => {
      const input = document.querySelector<HTMLInputElement>('[data-testid=import-file]')!;
      input.addEventListener('click', (e) => {
        document.body.dataset.importAsked = 'yes';
        e.preventDefault(); // no native chooser in the test
      });
    });
    await page.focus('[data-testid=import-button]');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.evaluate(() => document.body.dataset.importAsked)).toBe('yes');
    await page.close();
  });

  it('arrow keys move between the side tabs', async () => {
    const page = await open(1440, 900);
    await page.focus('[data-testid=tab-model]');
    await page.keyboard.press('ArrowRight');
    expect(await focused(page)).toBe('tab-runs');
    expect(await page.getAttribute('[data-testid=tab-runs]', 'aria-selected')).toBe('true');
    expect(await page.isVisible('[data-testid=panel-runs]')).toBe(true);
    await page.keyboard.press('End');
    expect(await focused(page)).toBe('tab-tuning');
    await page.keyboard.press('ArrowRight');
    expect(await focused(page)).toBe('tab-model');
    await page.close();
  });

  it('at 1024 × 700 at least 8 data columns show; the side panel folds away, resizes, and both are remembered', async () => {
    const page = await open(1024, 700);
    const fullColumns = () =>
      page.evaluate(() => {
        const grid = document.querySelector('[data-testid=grid]')!.getBoundingClientRect();
        return Array.from(document.querySelectorAll('.ag-header-cell[col-id^="c"]')).filter((c) => {
          const r = c.getBoundingClientRect();
          return r.width > 0 && r.left >= grid.left - 1 && r.right <= grid.right + 1;
        }).length;
      });
    await page.click('[data-testid=fill-button]');
    await page.waitForSelector('.rf-filled', { timeout: 30_000 });
    await expect.poll(fullColumns).toBeGreaterThanOrEqual(8);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'layout-1024x700.png') });
    const width = () =>
      page.evaluate(() =>
        Math.round(document.querySelector('[data-testid=side-panel]')!.getBoundingClientRect().width),
      );
    const w0 = await width();
    await page.focus('[data-testid=side-grip]');
    await page.keyboard.press('ArrowLeft');
    await page.keyboard.press('ArrowLeft');
    await expect.poll(width).toBe(w0 + 48);
    await page.click('[data-testid=side-fold]');
    await expect.poll(() => page.isVisible('[data-testid=side-panel]')).toBe(false);
    await expect.poll(fullColumns).toBeGreaterThanOrEqual(12);
    await page.reload();
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
    expect(await page.isVisible('[data-testid=side-panel]')).toBe(false);
    await page.keyboard.press('Control+b');
    await expect.poll(() => page.isVisible('[data-testid=side-panel]')).toBe(true);
    expect(await width()).toBe(w0 + 48);
    await page.close();
  });

  it('at 800 × 600 the grid stays usable: several columns, a cell can be typed into', async () => {
    const page = await open(800, 600);
    const box = await page.locator('[data-testid=grid]').boundingBox();
    expect(box!.width).toBeGreaterThan(400);
    expect(box!.height).toBeGreaterThan(300);
    await page.locator('.ag-row[row-index="0"] .ag-cell[col-id="c3"]').dblclick();
    await page.keyboard.type('4');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('.ag-row[row-index="0"] .ag-cell[col-id="c3"]').textContent()).toBe('4');
    await page.screenshot({ path: join(repoRoot, 'test-results', 'layout-800x600.png') });
    await page.close();
  });
});
