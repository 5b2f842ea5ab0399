import { readFileSync, mkdtempSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

// A 1000 × 1000 matrix (5 % observed) from the seeded sample generator opens
// through the import path and scrolls; column virtualization keeps the DOM small.
describe('a 1000 × 1000 matrix', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const out = join(mkdtempSync(join(tmpdir(), 'rankfill-large-')), 'large.csv');

  beforeAll(async () => {
    const gen = spawnSync(
      process.execPath,
      ['--import', 'tsx', join(repoRoot, 'samples/generate.ts'), '--large', '1000x1000', '--out', out],
      { cwd: repoRoot },
    );
    expect(gen.status).toBe(0);
    host = await startHost();
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  it('imports, shows the right counts, renders only a window of columns, and scrolls to the far corner', async () => {
    const text = readFileSync(out);
    const cells = text
      .toString('utf8')
      .trimEnd()
      .split('\n')
      .slice(1)
      .flatMap((l) => l.split(',').slice(1));
    const blanks = cells.filter((c) => c === '').length;
    const t0 = Date.now();
    await page.setInputFiles('[data-testid=import-file]', { name: 'large.csv', mimeType: 'text/csv', buffer: text });
    await page.waitForSelector('[data-testid=import-dialog]');
    await page.click('[data-testid=import-open]');
    await expect
      .poll(() => page.textContent('[data-testid="status-shape"]'), { timeout: 60_000 })
      .toBe('1000 rows × 1000 columns');
    const openMs = Date.now() - t0;
    expect(await page.textContent('[data-testid="status-missing"]')).toContain(
      `(${blanks.toLocaleString('en')} blank)`,
    );
    const rendered = await page.locator('.ag-row[row-index="0"] .ag-cell').count();
    expect(rendered).toBeLessThan(100);
    await page.evaluate(() => {
      const app = (window as unknown as { rankfillApp: { grid: { focusCell(r: number, c: number): void } } })
        .rankfillApp;
      app.grid.focusCell(999, 999);
    });
    await page.waitForSelector('.ag-row[row-index="999"] .ag-cell[col-id="c999"]', {
      state: 'attached',
      timeout: 10_000,
    });
    console.log(`1000 × 1000 import-to-grid ${openMs} ms; cells rendered in one row: ${rendered}`);
  });
});
