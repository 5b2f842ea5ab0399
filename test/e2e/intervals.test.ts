import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

describe('intervals in the workbench', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    host = await startHost([], { RANKFILL_CONFIG_DIR: mkdtempSync(join(tmpdir(), 'rankfill-config-')) });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1600, height: 1000 } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  const firstBlank = () =>
    page.evaluate(() => {
      const m = (
        window as unknown as { rankfillApp: { store: { current: { values: Float64Array; colLabels: string[] } } } }
      ).rankfillApp.store.current;
      const c = Array.from(m.values).findIndex((x) => Number.isNaN(x));
      return { row: Math.floor(c / m.colLabels.length), col: c % m.colLabels.length };
    });

  it('the Cell tab shows "estimate, 80 % interval" with its meaning; the level changes it; the tint follows the width', async () => {
    await page.click('[data-testid="fill-button"]');
    await page.waitForSelector('.ag-row .ag-cell.rf-filled');
    // The run's calibration arrives with its trust.
    await expect
      .poll(
        () =>
          page.evaluate(
            () =>
              !!(window as unknown as { rankfillApp: { runs: { shown?: { trust?: { intervals?: unknown } } } } })
                .rankfillApp.runs.shown?.trust?.intervals,
          ),
        { timeout: 30_000 },
      )
      .toBe(true);
    expect(await page.textContent('[data-testid="overlay-legend"]')).toContain('narrow interval');
    const { row, col } = await firstBlank();
    await page.click(`.ag-row[row-index="${row}"] .ag-cell[col-id="c${col}"]`);
    await page.click('[data-testid="tab-cell"]');
    await page.waitForSelector('[data-testid="cell-interval"]');
    const text80 = (await page.textContent('[data-testid="cell-interval"]'))!;
    const m80 = /^estimate (\d+\.\d), 80 % interval (\d+\.\d)–(\d+\.\d)$/.exec(text80);
    expect(m80).not.toBeNull();
    const [est, lo, hi] = m80!.slice(1).map(Number);
    expect(lo).toBeLessThanOrEqual(est);
    expect(est).toBeLessThanOrEqual(hi);
    expect(await page.textContent('[data-testid="cell-interval-meaning"]')).toMatch(
      /on average over cells.*not as a promise for this cell/,
    );
    await page.screenshot({ path: join(repoRoot, 'test-results', 'intervals-cell-tab.png') });
    // A higher level gives a range at least as wide (the quantile grows with the level).
    await page.click('[data-testid="tab-model"]');
    await page.fill('[data-testid="interval-level"]', '95');
    await page.press('[data-testid="interval-level"]', 'Enter');
    await page.click('[data-testid="tab-cell"]');
    await expect.poll(() => page.textContent('[data-testid="cell-interval"]')).toMatch(/95 % interval/);
    const m95 = /interval (\d+\.\d)–(\d+\.\d)$/.exec((await page.textContent('[data-testid="cell-interval"]'))!)!;
    expect(Number(m95[2]) - Number(m95[1])).toBeGreaterThanOrEqual(hi - lo);
    // The grid's tint strength follows the interval width: the widest blank cell has the deepest tint.
    const tints = await page.evaluate(() => {
      const app = (
        window as unknown as {
          rankfillApp: { grid: { currentLayers: { overlay: { width?: Float64Array; maxWidth?: number } | null } } };
        }
      ).rankfillApp;
      const o = app.grid.currentLayers.overlay;
      return { hasWidth: !!o?.width, maxWidth: o?.maxWidth ?? 0 };
    });
    expect(tints.hasWidth).toBe(true);
    expect(tints.maxWidth).toBeGreaterThan(0);
    await page.click('[data-testid="tab-model"]');
    await page.screenshot({ path: join(repoRoot, 'test-results', 'intervals-grid.png') });
  });
});
