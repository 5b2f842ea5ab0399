import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { autoSettings } from '../../src-shared/engine/autoSettings';
import { defaultGrid } from '../../src-shared/engine/tuningGrid';
import { launchBrowser } from './support/browser';
import { readPageMatrix } from './support/pageMatrix';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

type PageRun = { settings: { rank: number; lambda: number; centering: string } };

describe('a first Fill chooses its settings from the data', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const tid = (id: string) => `[data-testid="${id}"]`;
  const runs = (): Promise<PageRun[]> =>
    page.evaluate(() =>
      (window as unknown as { rankfillApp: { runs: { runs: PageRun[] } } }).rankfillApp.runs.runs.map((r) => ({
        settings: r.settings,
      })),
    );

  beforeAll(async () => {
    host = await startHost([], { RANKFILL_CONFIG_DIR: mkdtempSync(join(tmpdir(), 'rankfill-config-')) });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1500, height: 1000 } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  it('shows the chosen values as editable settings with the reason, the same as the engine chooses', async () => {
    expect(await page.locator(tid('model-choice')).isHidden()).toBe(true);
    await page.click(tid('fill-button'));
    await expect.poll(async () => (await runs()).length, { timeout: 30_000 }).toBe(1);
    const note = (await page.textContent(tid('model-choice'))) ?? '';
    expect(note).toMatch(
      /^Chosen from the data — rank \d+.*: lowest 3-fold error of \d+ settings; .+\. Change any setting to use your own\.$/,
    );
    const [run] = await runs();
    expect(await page.inputValue(tid('model-rank'))).toBe(String(run.settings.rank));
    expect(await page.inputValue(tid('model-centering'))).toBe(run.settings.centering);
    // The page's worker chose what the engine chooses in-process on the same matrix.
    const m = await readPageMatrix(page);
    const here = autoSettings(m);
    expect(run.settings).toMatchObject({
      rank: here.settings.rank,
      lambda: here.settings.lambda,
      centering: here.settings.centering,
    });
    expect(note).toContain(here.reason);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'adaptive-fill.png') });
  });

  it('the Tuning tab suggests the data-derived ranks and λ values', async () => {
    await page.click(tid('tab-tuning'));
    const m = await readPageMatrix(page);
    const g = defaultGrid(m);
    expect(await page.inputValue(tid('tuning-ranks'))).toBe(g.ranks.join(', '));
    expect(await page.inputValue(tid('tuning-lambdas'))).toBe(g.lambdas.join(', '));
    expect(await page.textContent(tid('tuning-grid-note'))).toMatch(/^Suggested from this data: ranks up to \d+/);
    await page.screenshot({ path: join(repoRoot, 'test-results', 'tuning-suggested.png') });
    await page.click(tid('tab-model'));
  });

  it('the user’s own settings win once changed, also on the next data set', async () => {
    await page.fill(tid('model-rank'), '1');
    await expect.poll(() => page.locator(tid('model-choice')).isHidden()).toBe(true);
    await page.click(tid('fill-button'));
    await expect.poll(async () => (await runs()).length, { timeout: 30_000 }).toBe(2);
    expect((await runs())[1].settings.rank).toBe(1);
    // Another data set: its first Fill keeps the user's settings.
    const picker = page.locator(tid('sample-picker'));
    const options = await picker
      .locator('option:not([disabled])')
      .evaluateAll((os) => os.map((o) => (o as HTMLOptionElement).value));
    await picker.selectOption(options[1]);
    await expect.poll(async () => (await runs()).length).toBe(0);
    await page.click(tid('fill-button'));
    await expect.poll(async () => (await runs()).length, { timeout: 30_000 }).toBe(1);
    expect((await runs())[0].settings.rank).toBe(1);
    expect(await page.locator(tid('model-choice')).isHidden()).toBe(true);
  });

  it('Evaluate in the Runs tab also says whether the estimates rest on the start', async () => {
    await page.click(tid('tab-runs'));
    await page.click(tid('run-evaluate-1'));
    const line = page.locator(tid('run-seeds-1'));
    await line.waitFor({ timeout: 30_000 });
    const blanks = await page.evaluate(
      () =>
        Array.from(
          (window as unknown as { rankfillApp: { store: { current: { values: Float64Array } } } }).rankfillApp.store
            .current.values,
        ).filter((x) => Number.isNaN(x)).length,
    );
    expect(await line.textContent()).toMatch(
      new RegExp(
        `^(Seed check: with seed 2, \\d+ of ${blanks} filled cells move|Caution: the estimates depend on the start: with seed 2 instead of 1, \\d+ of ${blanks} filled cells)`,
      ),
    );
    await page.screenshot({ path: join(repoRoot, 'test-results', 'runs-seed-check.png') });
  });
});
