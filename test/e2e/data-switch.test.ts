/**
 * Nothing of one data set's runs reaches another: after Fill (and a B − A
 * comparison), opening another sample, importing a file or opening a project
 * leaves no tint or estimate on any cell of the new data, the Model tab shows
 * no run of the old data, and run numbers start again. Transposing or adding a
 * row after a Fill gives notices and marks that agree with what is drawn.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

interface GridState {
  cells: number;
  tinted: number;
  filled: number;
  diff: number;
  runs: number;
  overlay: boolean;
  progressText: string;
  chartPoints: number;
}

describe('switching data sets', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const dir = mkdtempSync(join(tmpdir(), 'rankfill-switch-'));
  const projectPath = join(dir, 'coffee-kept.rankfill');
  const pageErrors: string[] = [];

  beforeAll(async () => {
    host = await startHost();
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 2400, height: 1400 } });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  /** Every rendered data cell: inline tint, estimate and difference classes; the run list and the Model tab. */
  const state = (): Promise<GridState> =>
    page.evaluate(() => {
      // Data cells (col-id c0, c1, …) of the data rows; the pinned baseline row is not data.
      const cells = Array.from(document.querySelectorAll<HTMLElement>('.ag-row .ag-cell')).filter(
        (c) => /^c\d+$/.test(c.getAttribute('col-id') ?? '') && !c.closest('.ag-row-pinned, .ag-floating-bottom'),
      );
      const app = (
        window as unknown as {
          rankfillApp: { runs: { runs: unknown[] }; grid: { currentLayers: { overlay: unknown } } };
        }
      ).rankfillApp;
      const chart = document.querySelector('[data-testid="objective-chart"]') as HTMLElement & {
        dataset: DOMStringMap;
      };
      return {
        cells: cells.length,
        tinted: cells.filter((c) => c.style.backgroundColor !== '').length,
        filled: cells.filter((c) => c.classList.contains('rf-filled')).length,
        diff: cells.filter((c) => c.classList.contains('rf-diff')).length,
        runs: app.runs.runs.length,
        overlay: app.grid.currentLayers.overlay !== null,
        progressText: document.querySelector('[data-testid="fill-progress-text"]')?.textContent ?? '',
        chartPoints: Number(chart?.dataset.points ?? '0'),
      };
    });

  const fillAndWait = async (runs: number) => {
    await page.click('[data-testid="fill-button"]');
    await expect.poll(async () => (await state()).runs, { timeout: 30_000 }).toBe(runs);
    await expect.poll(async () => (await state()).filled, { timeout: 10_000 }).toBeGreaterThan(0);
  };

  const expectClean = async () => {
    await expect.poll(async () => (await state()).runs).toBe(0);
    const s = await state();
    expect(s.cells).toBeGreaterThan(100);
    expect({ tinted: s.tinted, filled: s.filled, diff: s.diff, overlay: s.overlay }).toEqual({
      tinted: 0,
      filled: 0,
      diff: 0,
      overlay: false,
    });
    await expect.poll(async () => (await state()).progressText).toBe('No fit yet.');
    expect((await state()).chartPoints).toBe(0);
    expect(await page.locator('[data-testid="run-list"] .rf-run').count()).toBe(0);
  };

  it('keeps the sample as a project before any Fill (opened again below)', async () => {
    await page.click('[data-testid=save-as-button]');
    await page.waitForSelector('[data-testid=path-dialog]');
    await page.fill('[data-testid=prompt-input]', projectPath);
    await page.click('[data-testid=dialog-confirm]');
    await expect.poll(() => page.textContent('[data-testid=notice]')).toContain(`Kept in ${projectPath}`);
  });

  it('Fill and a comparison, then another sample: no tint, estimate or difference of the old runs', async () => {
    await fillAndWait(1);
    await page.selectOption('[data-testid="model-centering"]', 'none');
    await fillAndWait(2);
    await page.click('[data-testid="tab-runs"]');
    await page.click('[data-testid="compare-button"]');
    await expect.poll(async () => (await state()).diff).toBeGreaterThan(0);
    expect((await state()).tinted).toBeGreaterThan(0);
    await page.click('[data-testid="tab-model"]');
    expect((await state()).chartPoints).toBeGreaterThan(0);

    await page.selectOption('[data-testid="sample-picker"]', 'usability-pilot');
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toBe('40 rows × 12 columns');
    await expectClean();
    expect(await page.textContent('[data-testid="compare-summary"]')).toBe('');
    // Numbering starts again for the new data set.
    await fillAndWait(1);
    expect(await page.locator('[data-testid="run-1"]').count()).toBe(1);
    expect(await page.locator('[data-testid="run-3"]').count()).toBe(0);
  });

  it('Fill, then an imported file: none of the old run on the new cells', async () => {
    const rows = Array.from(
      { length: 30 },
      (_, i) =>
        `r${i},${[1, 2, 3, 4, 5, 6, 7, 8].map((j) => ((i + j) % 3 === 0 ? '' : String(((i * j) % 5) + 1))).join(',')}`,
    );
    const body = `id,${[1, 2, 3, 4, 5, 6, 7, 8].map((j) => `q${j}`).join(',')}\n${rows.join('\n')}\n`;
    await page.setInputFiles('[data-testid=import-file]', {
      name: 'pilot.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(body),
    });
    await page.waitForSelector('[data-testid=import-dialog]');
    await page.click('[data-testid=import-open]');
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toBe('30 rows × 8 columns');
    await expect.poll(async () => (await state()).runs).toBe(0);
    const s = await state();
    expect({ tinted: s.tinted, filled: s.filled, overlay: s.overlay }).toEqual({
      tinted: 0,
      filled: 0,
      overlay: false,
    });
    expect(s.progressText).toBe('No fit yet.');
  });

  it('Fill, then a kept project without runs: none of the old run on its cells', async () => {
    await fillAndWait(1);
    await page.click('[data-testid=open-project-button]');
    // The imported file is unsaved; leave it.
    await page.waitForSelector('[data-testid=unsaved-dialog], [data-testid=path-dialog]');
    if (await page.locator('[data-testid=unsaved-dialog]').count()) {
      await page.click('[data-testid=unsaved-discard]');
      await page.waitForSelector('[data-testid=path-dialog]');
    }
    await page.fill('[data-testid=prompt-input]', projectPath);
    await page.click('[data-testid=dialog-confirm]');
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toBe('24 rows × 14 columns');
    await expectClean();
  });

  it('transposing after a Fill: no "Fill again" notice while estimates are drawn; the new layout gets its own estimates', async () => {
    await fillAndWait(1);
    await page.click('[data-testid=transpose-button]');
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toBe('14 rows × 24 columns');
    // The live refit for the new layout arrives and is drawn; the notice never contradicts the grid.
    await expect.poll(async () => (await state()).filled, { timeout: 20_000 }).toBeGreaterThan(0);
    const notice = (await page.locator('[data-testid=notice]').isVisible())
      ? await page.textContent('[data-testid=notice]')
      : '';
    expect(notice).not.toMatch(/Estimates hidden|Fill again/);
    const result = await page.evaluate(() => {
      const app = (window as unknown as { rankfillApp: { runs: { shown?: { rows: number; cols: number } } } })
        .rankfillApp;
      return { rows: app.runs.shown?.rows, cols: app.runs.shown?.cols };
    });
    expect(result).toEqual({ rows: 14, cols: 24 });
    // Filling again gives the same picture: estimates drawn, no notice saying they are hidden.
    await fillAndWait(2);
    const after = (await page.locator('[data-testid=notice]').isVisible())
      ? await page.textContent('[data-testid=notice]')
      : '';
    expect(after).not.toMatch(/Estimates hidden|Fill again/);
  });

  it('a new row with no ratings gets its weak mark together with its estimates', async () => {
    await page.locator('.ag-row[row-index="0"] .ag-cell[col-id="c0"]').click();
    await page.click('[data-testid=rows-cols-menu] summary');
    await page.click('[data-testid=cmd-add-row]');
    await expect.poll(() => page.textContent('[data-testid="status-shape"]')).toBe('15 rows × 24 columns');
    // Row 1 is the new, empty row: once its estimates are drawn, its label carries the weak mark.
    const newRow = async () =>
      page.evaluate(() => {
        const row = document.querySelectorAll('.ag-row[row-index="1"]');
        const cells = Array.from(row).flatMap((r) => Array.from(r.querySelectorAll('.ag-cell')));
        return {
          filled: cells.filter((c) => c.classList.contains('rf-filled')).length,
          weak: cells.some((c) => c.getAttribute('col-id') === 'rowLabel' && c.classList.contains('rf-weak')),
        };
      });
    await expect.poll(async () => (await newRow()).filled, { timeout: 20_000 }).toBeGreaterThan(0);
    expect((await newRow()).weak).toBe(true);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'data-switch-new-row.png') });
    expect(pageErrors).toEqual([]);
  });
});
