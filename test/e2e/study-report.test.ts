/**
 * The study report end to end: written from the window (after a fill, a centering
 * comparison and an export) and from the command line, each opened in Chromium with every
 * request routed and refused unless it is the report file itself, checked for console
 * errors, its methods paragraph checked against the run's settings, printed to PDF (A4 and
 * Letter) and turned into PNG pages with pdftoppm when it is installed
 * (apt-get install -y poppler-utils), left in test-results/ to be looked at.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FitSettings } from '../../src-shared/engine/types';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

const results = join(repoRoot, 'test-results');

interface Opened {
  requests: string[];
  blocked: string[];
  consoleErrors: string[];
  methods: string;
  data: {
    run: { settings: FitSettings };
    evaluation: { k: number; seed: number; table: unknown[] };
    centering: unknown;
    exports: { path: string }[];
  };
  page: Page;
}

/** Opens a report with the network blocked: only the report's own file:// URL may load. */
async function openOffline(browser: Browser, file: string): Promise<Opened> {
  const context = await browser.newContext({ offline: true });
  const page = await context.newPage();
  const own = pathToFileURL(file).href;
  const requests: string[] = [];
  const blocked: string[] = [];
  const consoleErrors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') consoleErrors.push(m.text());
  });
  page.on('pageerror', (e) => consoleErrors.push(String(e)));
  await context.route('**/*', (route) => {
    const url = route.request().url();
    requests.push(url);
    if (url === own) return route.continue();
    blocked.push(url);
    return route.abort();
  });
  await page.goto(own);
  await page.waitForLoadState('load');
  const methods = (await page.textContent('[data-testid="report-methods-paragraph"]')) ?? '';
  const data = JSON.parse((await page.textContent('#rankfill-report-data')) ?? 'null') as Opened['data'];
  return { requests, blocked, consoleErrors, methods, data, page };
}

/** The words the methods paragraph must use for these settings (see src-shared/report/methodsText.ts). */
function expectMethodsMatch(methods: string, s: FitSettings, folds: number): void {
  expect(methods).toContain(`${folds}-fold cross-validation`);
  expect(methods).toContain(`(seed ${s.seed})`);
  if (s.model === 'lowrank') {
    expect(methods).toContain(`rank-${s.rank} factorization`);
    expect(methods).toContain(`(λ = ${s.lambda}`);
    const centering = {
      none: 'without removing any baseline',
      row: 'after removing each row’s mean',
      column: 'after removing each column’s mean',
      both: 'after removing row and column baselines',
    }[s.centering];
    expect(methods).toContain(centering);
    expect(methods).toContain('alternating least squares (ALS');
  } else {
    expect(methods).toContain('EM algorithm (Dempster, Laird & Rubin, 1977)');
  }
}

/** Prints to PDF on both paper sizes; returns the A4 PDF's page count and PNG pages (when pdftoppm exists). */
async function printAndRender(page: Page, stem: string): Promise<{ pages: number; pngs: string[] }> {
  const a4 = join(results, `${stem}-a4.pdf`);
  await page.pdf({ path: a4, format: 'A4', printBackground: true });
  await page.pdf({ path: join(results, `${stem}-letter.pdf`), format: 'Letter', printBackground: true });
  const pdf = readFileSync(a4);
  expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
  const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
  const pdftoppm = spawnSync('pdftoppm', ['-v']);
  if (pdftoppm.error) {
    console.warn('pdftoppm is missing (apt-get install -y poppler-utils): the PDF pages were not turned into PNGs');
    return { pages, pngs: [] };
  }
  const r = spawnSync('pdftoppm', ['-r', '60', '-png', a4, join(results, `${stem}-page`)]);
  expect(r.status).toBe(0);
  const pngs = readdirSync(results).filter((f) => f.startsWith(`${stem}-page`) && f.endsWith('.png'));
  return { pages, pngs };
}

describe('study report', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const exportDir = mkdtempSync(join(tmpdir(), 'rankfill-report-'));

  beforeAll(async () => {
    mkdirSync(results, { recursive: true });
    // bin/rankfill.js runs the built CLI bundle: build it when a focused run comes before any build.
    if (!existsSync(join(repoRoot, 'out/cli/rankfill.js')))
      spawnSync('npm', ['run', 'build:cli'], { cwd: repoRoot, encoding: 'utf8' });
    host = await startHost([], { RANKFILL_EXPORT_DIR: exportDir });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1500, height: 950 } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
  });

  it('is written from the window: fill, compare centering, export, then Report…', async () => {
    await page.selectOption('[data-testid="model-centering"]', 'row');
    await page.click('[data-testid="fill-button"]');
    await page.waitForSelector('.ag-row .ag-cell.rf-filled');
    await page.click('[data-testid="tab-centering"]');
    await page.click('[data-testid="centering-run"]');
    await expect.poll(() => page.locator('[data-testid="centering-row"]').count(), { timeout: 30_000 }).toBe(4);
    await page.click('[data-testid="export-button"]');
    await page.waitForSelector('[data-testid="export-dialog"][open]');
    const exportPath = await page.inputValue('[data-testid="export-path"]');
    await page.click('[data-testid="export-write"]');
    await expect.poll(() => page.textContent('[data-testid="export-status"]')).toContain('Written:');
    await page.click('[data-testid="export-cancel"]');

    await page.click('[data-testid="report-button"]');
    await page.waitForSelector('[data-testid="report-dialog"][open]');
    expect(await page.textContent('[data-testid="report-contents"]')).toContain('the centering comparison');
    const reportPath = await page.inputValue('[data-testid="report-path"]');
    expect(reportPath.startsWith(exportDir)).toBe(true);
    expect(reportPath.endsWith('report.html')).toBe(true);
    await page.screenshot({ path: join(results, 'report-dialog.png') });
    await page.click('[data-testid="report-write"]');
    await expect
      .poll(() => page.textContent('[data-testid="report-status"]'), { timeout: 30_000 })
      .toContain('Written:');
    expect(existsSync(reportPath)).toBe(true);
    // A second write to the same file asks first; declining leaves it as it was.
    const before = readFileSync(reportPath, 'utf8');
    await page.click('[data-testid="report-write"]');
    await page.waitForSelector('[data-testid="report-overwrite-dialog"]');
    await page.click('[data-testid="report-overwrite-dialog"] button:has-text("Keep it")');
    await expect.poll(() => page.textContent('[data-testid="report-status"]')).toContain('Not written');
    expect(readFileSync(reportPath, 'utf8')).toBe(before);
    await page.click('[data-testid="report-close"]');

    const settings = (await page.evaluate(
      () =>
        (window as unknown as { rankfillApp: { runs: { shown: { settings: unknown } } } }).rankfillApp.runs.shown
          .settings,
    )) as FitSettings;
    const opened = await openOffline(browser, reportPath);
    try {
      expect(opened.blocked).toEqual([]);
      expect(opened.requests).toEqual([pathToFileURL(reportPath).href]);
      expect(opened.consoleErrors).toEqual([]);
      expect(opened.data.run.settings).toEqual(settings);
      expectMethodsMatch(opened.methods, settings, 5);
      expect(opened.methods).toContain('after removing each row’s mean');
      expect(opened.data.centering).not.toBeNull();
      expect(opened.data.exports.map((x) => x.path)).toEqual([exportPath]);
      expect(await opened.page.textContent('[data-testid="report-exports"]')).toContain(exportPath);
      expect(await opened.page.locator('[data-testid="report-centering-chart"]').count()).toBe(1);
      expect(await opened.page.textContent('[data-testid="report-caution"]')).toContain(
        'Filled values are model estimates',
      );
      // When the run's trust carries an interval calibration, the report has the intervals section at the page's level.
      const hasIntervals = await page.evaluate(() =>
        Boolean(
          (window as unknown as { rankfillApp: { runs: { shown: { trust?: { intervals?: unknown } } } } }).rankfillApp
            .runs.shown.trust?.intervals,
        ),
      );
      expect(await opened.page.locator('[data-testid="report-intervals"]').count()).toBe(hasIntervals ? 1 : 0);
      if (hasIntervals)
        expect(opened.methods).toContain(
          'Each filled value was given an 80 % cross-validated normalized conformal prediction interval',
        );
      await opened.page.screenshot({ path: join(results, 'report-window.png'), fullPage: true });
      const printed = await printAndRender(opened.page, 'report-window');
      expect(printed.pages).toBeGreaterThanOrEqual(3);
      if (printed.pngs.length) expect(printed.pngs.length).toBe(printed.pages);
    } finally {
      await opened.page.context().close();
    }
  });

  it('says so in the methods when the first Fill chose the settings from the data', async () => {
    const fresh = await browser.newPage({ viewport: { width: 1500, height: 950 } });
    try {
      await fresh.goto(host.launchUrl);
      await fresh.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
      await fresh.click('[data-testid="fill-button"]');
      await fresh.waitForSelector('.ag-row .ag-cell.rf-filled', { timeout: 60_000 });
      await fresh.click('[data-testid="report-button"]');
      await fresh.waitForSelector('[data-testid="report-dialog"][open]');
      await fresh.fill('[data-testid="report-path"]', join(exportDir, 'chosen report.html'));
      await fresh.click('[data-testid="report-write"]');
      await expect
        .poll(() => fresh.textContent('[data-testid="report-status"]'), { timeout: 30_000 })
        .toContain('Written:');
      const html = readFileSync(join(exportDir, 'chosen report.html'), 'utf8');
      expect(html).toMatch(
        /The settings were chosen automatically: \d+ candidate settings .* were scored by a quick 3-fold cross-validation/,
      );
    } finally {
      await fresh.close();
    }
  });

  it('is written from the command line with the same model options as fill', async () => {
    const out = join(exportDir, 'cli report.html');
    const csv = join(exportDir, 'cli filled.csv');
    const r = spawnSync(
      process.execPath,
      [
        join(repoRoot, 'bin/rankfill.js'),
        'report',
        join(repoRoot, 'samples/peer-review-round.csv'),
        '--out',
        out,
        '--rank',
        '3',
        '--lambda',
        '10',
        '--centering',
        'column',
        '--seed',
        '5',
        '--tune',
        '--ranks',
        '0,1,2,3',
        '--lambdas',
        '1,10',
        '--level',
        '0.9',
        '--csv',
        csv,
      ],
      { encoding: 'utf8', timeout: 120_000 },
    );
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const opened = await openOffline(browser, out);
    try {
      expect(opened.blocked).toEqual([]);
      expect(opened.consoleErrors).toEqual([]);
      expect(opened.data.run.settings).toMatchObject({
        model: 'lowrank',
        rank: 3,
        lambda: 10,
        centering: 'column',
        seed: 5,
      });
      expectMethodsMatch(opened.methods, opened.data.run.settings, 5);
      expect(opened.methods).toContain('cross-validation of ranks 0, 1, 2, 3 × λ 1, 10 was also run (seed 5)');
      expect(opened.data.exports.map((x) => x.path)).toEqual([csv]);
      expect(await opened.page.locator('[data-testid="report-tuning-chart"]').count()).toBe(1);
      expect(await opened.page.textContent('[data-testid="report-intervals"]')).toContain('Nominal coverage90 %');
      expect(opened.methods).toContain(
        'Each filled value was given a 90 % cross-validated normalized conformal prediction interval',
      );
      await opened.page.screenshot({ path: join(results, 'report-cli.png'), fullPage: true });
      const printed = await printAndRender(opened.page, 'report-cli');
      expect(printed.pages).toBeGreaterThanOrEqual(3);
    } finally {
      await opened.page.context().close();
    }
  });
});
