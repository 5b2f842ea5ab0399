import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { openProjectInFreshPage } from './support/projectPage';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

// The sample is read here with papaparse (a general-purpose CSV reader), independently of the app.
function readSample(file: string) {
  const rows = Papa.parse<string[]>(readFileSync(join(repoRoot, 'samples', file), 'utf8').trimEnd()).data;
  const values = rows.slice(1).map((r) => r.slice(1).map((c) => (c === '' ? null : Number(c))));
  return {
    header: rows[0].slice(1),
    labels: rows.slice(1).map((r) => r[0]),
    values,
    blanks: values.flat().filter((v) => v === null).length,
  };
}

type Snapshot = { predictions: (number | null)[]; filledInGrid: string[] };

describe('fill, compare and export in the browser host', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const exportDir = mkdtempSync(join(tmpdir(), 'rankfill-export-'));
  const sample = readSample('coffee-cupping-panel.csv');

  beforeAll(async () => {
    host = await startHost([], {
      RANKFILL_EXPORT_DIR: exportDir,
      RANKFILL_CONFIG_DIR: mkdtempSync(join(tmpdir(), 'rankfill-config-')),
    });
    browser = await launchBrowser();
    // Wide enough that every column of the sample is rendered (column virtualization stays on).
    page = await browser.newPage({ viewport: { width: 2400, height: 1100 } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  const snapshot = (): Promise<Snapshot> =>
    page.evaluate(() => {
      const app = (
        window as unknown as { rankfillApp: { runs: { shown?: { result: { predictions: Float64Array } } } } }
      ).rankfillApp;
      const p = app.runs.shown?.result.predictions ?? new Float64Array(0);
      return {
        predictions: Array.from(p, (x) => (Number.isFinite(x) ? x : null)),
        filledInGrid: Array.from(document.querySelectorAll('.ag-row .ag-cell.rf-filled'), (c) =>
          (c.textContent ?? '').trim(),
        ),
      };
    });

  let first: Snapshot;

  it('Fill puts an estimate in exactly the blank cells, observed cells untouched', async () => {
    await page.click('[data-testid="fill-button"]');
    await page.waitForSelector('.ag-row .ag-cell.rf-filled');
    await expect.poll(async () => (await snapshot()).filledInGrid.length, { timeout: 20_000 }).toBe(sample.blanks);
    first = await snapshot();
    expect(first.filledInGrid.every((t) => /^\d+\.\d$/.test(t))).toBe(true);
    // The document still holds exactly the observed data.
    const observed = await page.evaluate(() =>
      Array.from(
        (window as unknown as { rankfillApp: { store: { current: { values: Float64Array } } } }).rankfillApp.store
          .current.values,
        (x) => (Number.isNaN(x) ? null : x),
      ),
    );
    expect(observed).toEqual(sample.values.flat());
    // Baselines side column and the column-offset row appear.
    expect(await page.locator('.ag-row[row-index="0"] .ag-cell[col-id="rowCount"]').textContent()).toBe(
      String(sample.values[0].filter((v) => v !== null).length),
    );
    await expect
      .poll(() =>
        page
          .locator('.ag-floating-bottom .ag-cell[col-id="rowLabel"], .ag-row-pinned .ag-cell[col-id="rowLabel"]')
          .first()
          .textContent(),
      )
      .toBe('Column offset');
    expect(await page.textContent('[data-testid="status-line"]')).toMatch(/global mean \d\.\d\d/);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'fill-overlay.png') });
  });

  it('switching centering to none and refilling changes the estimates; the comparison shows the differences', async () => {
    await page.selectOption('[data-testid="model-centering"]', 'none');
    await page.click('[data-testid="fill-button"]');
    await expect
      .poll(() =>
        page.evaluate(
          () => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length,
        ),
      )
      .toBe(2);
    const second = await snapshot();
    const changed = second.predictions.filter(
      (p, c) => sample.values.flat()[c] === null && Math.abs((p ?? 0) - (first.predictions[c] ?? 0)) > 1e-6,
    ).length;
    expect(changed).toBe(sample.blanks);
    await page.click('[data-testid="tab-runs"]');
    await page.selectOption('[data-testid="compare-a"]', '1');
    await page.selectOption('[data-testid="compare-b"]', '2');
    await page.click('[data-testid="compare-button"]');
    await expect.poll(() => page.locator('.ag-row .ag-cell.rf-diff').count()).toBe(sample.blanks);
    const moved = await page.textContent('[data-testid="compare-moved"]');
    expect(moved).toMatch(
      new RegExp(`^\\d+ of ${sample.blanks} filled cells move by more than 1 \\(one scale step\\)`),
    );
    // One diff cell equals B − A computed here from the two runs' predictions.
    const blank = sample.values.flat().findIndex((v) => v === null);
    const cols = sample.header.length;
    const diffText = await page
      .locator(`.ag-row[row-index="${Math.floor(blank / cols)}"] .ag-cell[col-id="c${blank % cols}"]`)
      .textContent();
    const d = (second.predictions[blank] ?? 0) - (first.predictions[blank] ?? 0);
    expect(Number(diffText)).toBeCloseTo(d, 1);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'compare-runs.png') });
    await page.click('[data-testid="compare-clear"]');
    await expect.poll(() => page.locator('.ag-row .ag-cell.rf-diff').count()).toBe(0);
  });

  it('compare centering evaluates the four modes on the same folds', async () => {
    await page.click('[data-testid="tab-centering"]');
    await page.click('[data-testid="centering-run"]');
    await expect.poll(() => page.locator('[data-testid="centering-row"]').count(), { timeout: 30_000 }).toBe(4);
    const rmse = await page.locator('[data-testid="centering-rmse"]').allTextContents();
    expect(rmse).toHaveLength(4);
    for (const r of rmse) expect(Number(r.split(' ')[0])).toBeGreaterThan(0);
  });

  it('an edit refits the shown run live; typing into a filled cell makes it observed', async () => {
    await page.click('[data-testid="tab-model"]');
    const before = await snapshot();
    const blankCol = sample.values[0].findIndex((v) => v === null);
    const cell = page.locator(`.ag-row[row-index="0"] .ag-cell[col-id="c${blankCol}"]`);
    await cell.dblclick();
    await page.keyboard.press('ControlOrMeta+a');
    await page.keyboard.type('9');
    await page.keyboard.press('Enter');
    await expect.poll(() => cell.textContent()).toBe('9');
    await expect
      .poll(async () => {
        const now = await snapshot();
        return now.predictions.some((p, c) => Math.abs((p ?? 0) - (before.predictions[c] ?? 0)) > 1e-9);
      })
      .toBe(true);
    expect(await cell.getAttribute('class')).not.toContain('rf-filled');
    await page.keyboard.press('ControlOrMeta+z');
  });

  it('export writes a long file whose observed cells equal the input, plus a sidecar', async () => {
    await page.click('[data-testid="export-button"]');
    await page.waitForSelector('[data-testid="export-dialog"][open]');
    expect(await page.textContent('[data-testid="export-caution"]')).toContain('model estimates');
    await page.selectOption('[data-testid="export-kind"]', 'long');
    const path = await page.inputValue('[data-testid="export-path"]');
    expect(path.startsWith(exportDir)).toBe(true);
    await page.click('[data-testid="export-write"]');
    await expect.poll(() => page.textContent('[data-testid="export-status"]')).toContain('Written:');
    const rows = Papa.parse<string[]>(readFileSync(path, 'utf8').trimEnd()).data;
    expect(rows[0]).toEqual(['row', 'column', 'value', 'source', 'baseline', 'spread', 'lower', 'upper']);
    const doc = await page.evaluate(() => {
      const m = (window as unknown as { rankfillApp: { store: { current: { values: Float64Array } } } }).rankfillApp
        .store.current;
      return Array.from(m.values, (x) => (Number.isNaN(x) ? null : x));
    });
    let observed = 0;
    let filled = 0;
    for (const r of rows.slice(1)) {
      const i = sample.labels.indexOf(r[0]);
      const j = sample.header.indexOf(r[1]);
      const y = doc[i * sample.header.length + j];
      if (r[3] === 'observed') {
        observed++;
        expect(Number(r[2])).toBe(y);
      } else {
        filled++;
        expect(r[3]).toBe('filled');
        expect(y).toBeNull();
        // The 80 % interval (default level) holds the estimate.
        expect(Number(r[6])).toBeLessThanOrEqual(Number(r[2]));
        expect(Number(r[2])).toBeLessThanOrEqual(Number(r[7]));
      }
    }
    expect(observed + filled).toBe(sample.labels.length * sample.header.length);
    expect(filled).toBe(doc.filter((v) => v === null).length);
    const sidecar = JSON.parse(readFileSync(path.replace(/\.csv$/, '.settings.json'), 'utf8'));
    expect(sidecar.caution).toContain('model estimates');
    expect(sidecar.model.settings.centering).toBe('none');
    expect(sidecar.input.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(sidecar.intervals).toMatchObject({
      level: 0.8,
      method: 'cross-validated normalized conformal',
      boundsInclusive: true,
    });
    expect(sidecar.intervals.folds).toHaveLength(5);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'export-dialog.png') });
    // Writing again to the same file asks first; keeping it leaves the file as it was.
    const firstText = readFileSync(path, 'utf8');
    await page.selectOption('[data-testid="export-kind"]', 'filled-wide');
    await page.click('[data-testid="export-write"]');
    await page.waitForSelector('[data-testid="export-overwrite-dialog"]');
    await page.click('[data-testid="export-overwrite-dialog"] [data-testid="dialog-cancel"]');
    await expect.poll(() => page.textContent('[data-testid="export-status"]')).toContain('Not written');
    expect(readFileSync(path, 'utf8')).toBe(firstText);
    await page.click('[data-testid="export-cancel"]');
  });

  it('a kept project brings back the model settings and the runs, with the same estimates', async () => {
    await page.click('[data-testid="tab-runs"]');
    await page.click('[data-testid="run-evaluate-2"]');
    await expect.poll(() => page.textContent('[data-testid="run-cv-2"]'), { timeout: 30_000 }).toMatch(/^RMSE \d/);
    const cv = await page.textContent('[data-testid="run-cv-2"]');
    const before = await snapshot();
    const projectPath = join(exportDir, 'cupping.rankfill');
    await page.click('[data-testid=save-as-button]');
    await page.waitForSelector('[data-testid=path-dialog]');
    await page.fill('[data-testid=prompt-input]', projectPath);
    await page.click('[data-testid=dialog-confirm]');
    await expect.poll(() => page.textContent('[data-testid=notice]')).toContain(`Kept in ${projectPath}`);

    const fresh = await openProjectInFreshPage(browser, host.launchUrl, projectPath, 2400);
    await expect
      .poll(
        () =>
          fresh.evaluate(
            () => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length,
          ),
        { timeout: 30_000 },
      )
      .toBe(2);
    expect(await fresh.inputValue('[data-testid="model-centering"]')).toBe('none');
    const after = await fresh.evaluate(() => {
      const app = (
        window as unknown as { rankfillApp: { runs: { shown?: { result: { predictions: Float64Array } } } } }
      ).rankfillApp;
      return Array.from(app.runs.shown?.result.predictions ?? [], (x) => (Number.isFinite(x) ? x : null));
    });
    // Restored by refitting the saved settings (cold start); the saved run had been refitted
    // warm after edits, so both sit on the same optimum to within the fit's tolerance.
    expect(after.length).toBe(before.predictions.length);
    after.forEach((p, c) => expect(p ?? NaN).toBeCloseTo(before.predictions[c] ?? NaN, 2));
    await fresh.click('[data-testid="tab-runs"]');
    expect(await fresh.textContent('[data-testid="run-cv-2"]')).toBe(cv);
    await fresh.close();
  });
});
