import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

const tid = (id: string) => `[data-testid="${id}"]`;

describe('compare centering and tuning panels', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const pageErrors: string[] = [];

  beforeAll(async () => {
    host = await startHost();
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1500, height: 1300 } });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error') pageErrors.push(m.text());
    });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  it('compares the four centering modes on shared folds and marks the best', async () => {
    await page.click(tid('tab-centering'));
    await page.click(tid('centering-run'));
    await page.waitForSelector(`${tid('centering-results')}:not([hidden])`, { timeout: 30_000 });
    const rows = page.locator(`${tid('centering-table')} ${tid('centering-row')}`);
    expect(await rows.count()).toBe(4);
    const modes = await rows.evaluateAll((trs) => trs.map((tr) => (tr as HTMLElement).dataset.centering));
    expect(modes).toEqual(['none', 'row', 'column', 'both']);
    const rmse = (await page.locator(tid('centering-rmse')).allTextContents()).map((t) => Number(t.split('±')[0]));
    expect(rmse).toHaveLength(4);
    // An RMSE is a finite, non-negative number (definition of a root mean square).
    for (const v of rmse) expect(Number.isFinite(v) && v >= 0).toBe(true);
    const best = page.locator(`${tid('centering-row')}.rf-best`);
    expect(await best.count()).toBe(1);
    // The marked row has the smallest mean RMSE in the table (definition of "best").
    const bestRmse = Number((await best.locator(tid('centering-rmse')).textContent())!.split('±')[0]);
    expect(bestRmse).toBe(Math.min(...rmse));
    expect(await page.locator(`${tid('centering-chart')} canvas`).count()).toBeGreaterThan(0);
    // Each row also lists its five fold RMSEs.
    const folds = await page.locator(tid('centering-folds')).first().textContent();
    expect(folds!.match(/\d+\.\d+/g)).toHaveLength(5);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'compare-centering.png') });
    await page
      .locator(tid('side-panel'))
      .screenshot({ path: join(repoRoot, 'test-results', 'compare-centering-panel.png') });
  });

  it('"Use" puts a centering mode into the model form', async () => {
    await page.click(tid('centering-use-none'));
    expect(await page.locator(tid('model-centering')).inputValue()).toBe('none');
    await page.click(tid('centering-use-both'));
    expect(await page.locator(tid('model-centering')).inputValue()).toBe('both');
  });

  it('refuses a grid over the size limit with a message', async () => {
    await page.click(tid('tab-tuning'));
    await page.fill(tid('tuning-ranks'), Array.from({ length: 21 }, (_, i) => i).join(','));
    await page.fill(tid('tuning-lambdas'), Array.from({ length: 20 }, (_, i) => i + 1).join(','));
    await page.click(tid('tuning-run'));
    await expect.poll(() => page.textContent(tid('tuning-error'))).toContain('limit is 400');
  });

  it('runs a small tuning grid and applies the best setting to the model form', async () => {
    // Put settings into the form that are not in the grid, so applying visibly changes them.
    await page.click(tid('tab-model'));
    await page.fill(tid('model-rank'), '7');
    await page.fill(tid('model-lambda'), '33');
    await page.click(tid('tab-tuning'));
    await page.fill(tid('tuning-ranks'), '0, 1, 2');
    await page.fill(tid('tuning-lambdas'), '1, 10');
    expect(await page.isChecked(tid('tuning-centering-both'))).toBe(true);
    await page.click(tid('tuning-run'));
    await page.waitForSelector(`${tid('tuning-results')}:not([hidden])`, { timeout: 30_000 });
    expect(await page.isHidden(tid('tuning-error'))).toBe(true);
    const rows = page.locator(`${tid('tuning-table')} ${tid('tuning-row')}`);
    expect(await rows.count()).toBe(6);
    expect(await page.locator(`${tid('tuning-row')}.rf-best`).count()).toBe(1);
    expect(await page.locator(`${tid('tuning-row')}.rf-onese`).count()).toBe(1);
    expect(await page.locator(`${tid('tuning-chart')} canvas`).count()).toBeGreaterThan(0);
    const bestCells = await page.locator(`${tid('tuning-row')}.rf-best td`).allTextContents();
    await page.screenshot({ path: join(repoRoot, 'test-results', 'tuning-panel.png') });
    await page.locator(tid('side-panel')).screenshot({ path: join(repoRoot, 'test-results', 'tuning-panel-side.png') });
    await page.click(tid('tuning-apply-best'));
    await page.click(tid('tab-model'));
    expect(await page.locator(tid('model-rank')).inputValue()).toBe(bestCells[0]);
    expect(await page.locator(tid('model-lambda')).inputValue()).toBe(bestCells[1]);
    expect(['0', '1', '2']).toContain(bestCells[0]);
    expect(['1', '10']).toContain(bestCells[1]);
  });

  it('Stop ends a long tuning run and the panel keeps working', async () => {
    await page.click(tid('tab-tuning'));
    await page.fill(tid('tuning-ranks'), Array.from({ length: 20 }, (_, i) => i).join(','));
    await page.fill(tid('tuning-lambdas'), '0.1, 0.3, 1, 3, 10, 30, 100, 300');
    await page.click(tid('tuning-run'));
    await expect
      .poll(() => page.textContent(tid('tuning-progress-text')), { timeout: 15_000 })
      .toMatch(/\d+ of \d+ done/);
    await page.click(tid('tuning-stop'));
    await expect.poll(() => page.textContent(tid('tuning-progress-text')), { timeout: 15_000 }).toContain('Stopped');
    expect(await page.isEnabled(tid('tuning-run'))).toBe(true);
    // The earlier results stay: still the six rows of the small grid.
    expect(await page.locator(tid('tuning-row')).count()).toBe(6);
  });

  it('explains that centering does not apply to the Gaussian family and compares the low-rank family', async () => {
    await page.click(tid('tab-model'));
    await page.selectOption(tid('model-family'), 'gaussian');
    await page.click(tid('tab-centering'));
    await page.click(tid('centering-run'));
    await expect.poll(() => page.textContent(tid('centering-progress-text')), { timeout: 30_000 }).toContain('Done');
    expect(await page.textContent(tid('centering-family-note'))).toContain('does not apply to the Gaussian');
    expect(await page.locator(tid('centering-row')).count()).toBe(4);
    await page.click(tid('tab-model'));
    await page.selectOption(tid('model-family'), 'lowrank');
  });

  it('says the results belong to the previous data after another data set is opened', async () => {
    await page.selectOption(tid('sample-picker'), 'peer-review-round');
    await page.click(tid('tab-centering'));
    await expect.poll(() => page.textContent(tid('centering-stale'))).toContain('previous data set');
    await page.click(tid('tab-tuning'));
    expect(await page.isVisible(tid('tuning-stale'))).toBe(true);
    expect(pageErrors).toEqual([]);
  });
});
