/**
 * What an analyst expects (issue 12), end to end in the browser host: entries are stored
 * as typed or refused with the nearest allowed values; paste follows the same rule.
 * Expected values come from samples/coffee-cupping-panel.csv (scale 1–9, step 1) read here.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from './support/browser';
import { openProjectInFreshPage } from './support/projectPage';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

const csv = readFileSync(join(repoRoot, 'samples', 'coffee-cupping-panel.csv'), 'utf8')
  .trimEnd()
  .split('\n');
const rows = csv.slice(1).map((l) => l.split(','));
const cellOf = (i: number, j: number) => rows[i][j + 1];

const cell = (page: Page, i: number, j: number) => page.locator(`.ag-row[row-index="${i}"] .ag-cell[col-id="c${j}"]`);
const text = async (page: Page, i: number, j: number) => ((await cell(page, i, j).textContent()) ?? '').trim();
type AppHandle = {
  store: { current: { values: Float64Array; colLabels: string[]; scale: { min: number; max: number; step: number } } };
};
const stored = (page: Page, i: number, j: number) =>
  page.evaluate(
    ([r, c]) => {
      const m = (window as unknown as { rankfillApp: AppHandle }).rankfillApp.store.current;
      const v = m.values[r * m.colLabels.length + c];
      return Number.isNaN(v) ? null : v;
    },
    [i, j] as const,
  );

async function typeInto(page: Page, i: number, j: number, typed: string) {
  await cell(page, i, j).click();
  await page.keyboard.type(typed);
  await page.keyboard.press('Enter');
}

async function paste(page: Page, tsv: string) {
  await page.evaluate((t) => {
    const dt = new DataTransfer();
    dt.setData('text/plain', t);
    (document.activeElement ?? document.body).dispatchEvent(
      new ClipboardEvent('paste', { clipboardData: dt, bubbles: true, cancelable: true }),
    );
  }, tsv);
}

describe('issue 12 in the browser host', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const dir = mkdtempSync(join(tmpdir(), 'rankfill-analyst-'));
  const pageErrors: string[] = [];

  beforeAll(async () => {
    host = await startHost([], { RANKFILL_CONFIG_DIR: join(dir, 'config'), RANKFILL_EXPORT_DIR: join(dir, 'exports') });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1800, height: 1100 } });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
    await page.evaluate(() => {
      const box = [...document.querySelectorAll<HTMLInputElement>('input[type=checkbox]')].find((b) =>
        /Refit after each edit/.test(b.parentElement?.textContent ?? ''),
      );
      if (box?.checked) box.click();
    });
  });

  afterAll(async () => {
    await browser?.close();
    await host?.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  describe('entries', () => {
    it('an entry between two steps is refused, naming the nearest allowed values; the cell keeps its value', async () => {
      const before = cellOf(1, 0);
      await typeInto(page, 1, 0, '4.4');
      await expect
        .poll(() => page.textContent('[data-testid=notice]'))
        .toContain('4.4 lies between the allowed values 4 and 5 (scale 1–9 in steps of 1)');
      expect(await text(page, 1, 0)).toBe(before);
      expect(await stored(page, 1, 0)).toBe(before === '' ? null : Number(before));
      // A decimal comma is read the same way.
      await typeInto(page, 1, 0, '3,5');
      await expect
        .poll(() => page.textContent('[data-testid=notice]'))
        .toContain('3,5 lies between the allowed values 3 and 4');
      expect(await stored(page, 1, 0)).toBe(before === '' ? null : Number(before));
    });

    it('an entry on a step is stored exactly as typed', async () => {
      await typeInto(page, 2, 1, '6');
      await expect.poll(() => stored(page, 2, 1)).toBe(6);
      expect(await text(page, 2, 1)).toBe('6');
    });

    it('on a scale with half points, 3,5 is stored as 3.5 and shown so; on a continuous scale 4.437 is kept whole', async () => {
      const setScale = async (min: string, max: string, step: string) => {
        await page.click('[data-testid=scale-button]');
        await page.waitForSelector('[data-testid=scale-dialog]');
        await page.fill('[data-testid=scale-min]', min);
        await page.fill('[data-testid=scale-max]', max);
        await page.fill('[data-testid=scale-step]', step);
        await page.click('[data-testid=scale-dialog] [data-testid=dialog-confirm]');
        await expect
          .poll(() =>
            page.evaluate(() => (window as unknown as { rankfillApp: AppHandle }).rankfillApp.store.current.scale.step),
          )
          .toBe(Number(step));
      };
      await setScale('1', '9', '0.5');
      await typeInto(page, 3, 2, '3,5');
      await expect.poll(() => stored(page, 3, 2)).toBe(3.5);
      expect(await text(page, 3, 2)).toBe('3.5');
      await typeInto(page, 3, 2, '3.25');
      await expect
        .poll(() => page.textContent('[data-testid=notice]'))
        .toContain('3.25 lies between the allowed values 3 and 3.5');
      expect(await stored(page, 3, 2)).toBe(3.5);
      await setScale('1', '9', '0');
      await typeInto(page, 3, 3, '4.437');
      await expect.poll(() => stored(page, 3, 3)).toBe(4.437);
      expect(await text(page, 3, 3)).toBe('4.437');
      await setScale('1', '9', '0.5');
    });

    it('a paste with an off-step entry is refused whole, naming the cell and the nearest values', async () => {
      const before = [await stored(page, 5, 0), await stored(page, 5, 1)];
      await cell(page, 5, 0).click();
      await paste(page, '2\t4.2\n');
      await expect
        .poll(() => page.textContent('[data-testid=notice]'))
        .toContain('4.2 lies between the allowed values 4 and 4.5');
      expect([await stored(page, 5, 0), await stored(page, 5, 1)]).toEqual(before);
    });
  });

  describe('decompositions in the Cell tab', () => {
    /** Fill with these settings through the Model tab's controls, then read a blank cell's terms. */
    async function fillAndDecompose(settings: Record<string, unknown>) {
      const before = await page.evaluate(
        () => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length,
      );
      await page.evaluate((s) => {
        const app = (
          window as unknown as { rankfillApp: { settings: { set(s: unknown): void; state: Record<string, object> } } }
        ).rankfillApp;
        const family = (s as { model: string }).model === 'gaussian' ? 'gaussian' : 'lowRank';
        app.settings.set({ ...app.settings.state[family], ...s });
      }, settings);
      await page.click('[data-testid=tab-model]');
      await page.click('[data-testid=fill-button]');
      await expect
        .poll(
          () =>
            page.evaluate(
              () => (window as unknown as { rankfillApp: { runs: { runs: unknown[] } } }).rankfillApp.runs.runs.length,
            ),
          { timeout: 30_000 },
        )
        .toBe(before + 1);
      // Blank cells of the sample, checked against the engine's prediction for each.
      const blanks: [number, number][] = [];
      for (let i = 0; i < 8 && blanks.length < 3; i++)
        for (let j = 0; j < 6 && blanks.length < 3; j++) if (cellOf(i, j) === '' && i > 5) blanks.push([i, j]);
      const out: { sum: number; prediction: number; labels: string[] }[] = [];
      for (const [i, j] of blanks) {
        await cell(page, i, j).click();
        await page.click('[data-testid=tab-cell]');
        await page.waitForSelector('[data-testid=cell-facts][data-terms]');
        out.push(
          await page.evaluate(
            ([r, c]) => {
              const facts = document.querySelector<HTMLElement>('[data-testid=cell-facts]')!;
              const terms = JSON.parse(facts.dataset.terms!) as number[];
              const app = (
                window as unknown as {
                  rankfillApp: { runs: { shown: { result: { predictions: Float64Array; cols: number } } } };
                }
              ).rankfillApp;
              const res = app.runs.shown.result;
              const labels = [...facts.querySelectorAll('tr td:first-child')].map((td) => td.textContent ?? '');
              return { sum: terms.reduce((a, b) => a + b, 0), prediction: res.predictions[r * res.cols + c], labels };
            },
            [i, j] as const,
          ),
        );
      }
      return out;
    }

    for (const centering of ['none', 'row', 'column', 'both'] as const) {
      it(`low-rank, centering ${centering}: the shown terms add up to the engine's prediction (1e-9)`, async () => {
        const cells = await fillAndDecompose({ model: 'lowrank', centering, rank: 2, lambda: 1 });
        expect(cells.length).toBe(3);
        for (const c of cells) {
          expect(Math.abs(c.sum - c.prediction)).toBeLessThan(1e-9);
          expect(c.labels.some((l) => /^[=+] interaction \(hidden traits\)$/.test(l))).toBe(true);
          if (centering === 'both')
            expect(c.labels.slice(1, 4)).toEqual(['= global mean', '+ row offset', '+ column offset']);
        }
        // The side column says what it holds under this centering.
        if (centering === 'both')
          expect(await page.textContent(`.ag-header-cell[col-id="rowBaseline"]`)).toContain('Row part');
        if (centering === 'row')
          expect(await page.textContent(`.ag-header-cell[col-id="rowBaseline"]`)).toContain('Row mean');
      });
    }

    it('Gaussian: column mean μ + the regression on the row’s observed cells add up to the prediction (1e-9)', async () => {
      const cells = await fillAndDecompose({ model: 'gaussian', shrinkage: 0.05, transpose: false });
      for (const c of cells) {
        expect(Math.abs(c.sum - c.prediction)).toBeLessThan(1e-9);
        expect(c.labels[1]).toBe('= column mean μ (the model’s)');
        expect(c.labels[2]).toMatch(/^\+ regression on the \d+ observed cells of this row$/);
      }
      expect(await page.textContent('[data-testid=cell-spread-note]')).toContain('not a cross-validated error');
      await page.screenshot({ path: '/tmp/i12-cell-gaussian.png' });
    });

    it('the low-rank spread is labelled as the fold-model spread, not an error bar', async () => {
      await fillAndDecompose({ model: 'lowrank', centering: 'both', rank: 2, lambda: 1 });
      expect(await page.textContent('[data-testid=cell-facts]')).toContain('Fold-model spread');
      expect(await page.textContent('[data-testid=cell-spread-note]')).toContain('it is not an error bar');
      await page.screenshot({ path: '/tmp/i12-cell-lowrank.png' });
      await page.click('[data-testid=tab-model]');
      expect(Number(await page.getAttribute('[data-testid=objective-chart]', 'data-points'))).toBeGreaterThan(2);
      await page.screenshot({ path: '/tmp/i12-objective-chart.png' });
    });
  });

  describe('named runs across keep and reopen', () => {
    it('a run keeps its number, its name, its time and its cross-validated errors', async () => {
      const count = () =>
        page.evaluate(() =>
          (window as unknown as { rankfillApp: { runs: { runs: { id: number }[] } } }).rankfillApp.runs.runs.map(
            (r) => r.id,
          ),
        );
      // Two transpositions give the same matrix in a new cell layout: the earlier runs no
      // longer belong to it, so the next Fill is numbered past them and is the only one kept.
      await page.click('[data-testid=transpose-button]');
      await page.click('[data-testid=transpose-button]');
      const before = await count();
      await page.click('[data-testid=tab-model]');
      await page.click('[data-testid=fill-button]');
      await expect.poll(async () => (await count()).length, { timeout: 30_000 }).toBe(before.length + 1);
      const id = Math.max(...(await count()));
      expect(id).toBeGreaterThan(2);
      await page.click('[data-testid=tab-runs]');
      await page.click(`[data-testid=run-rename-${id}]`);
      await page.waitForSelector('[data-testid=run-name-dialog]');
      await page.fill('[data-testid=prompt-input]', 'tasting pick');
      await page.click('[data-testid=run-name-dialog] [data-testid=dialog-confirm]');
      await expect.poll(() => page.textContent(`[data-testid=run-head-${id}]`)).toContain(`Run ${id} “tasting pick”`);
      await page.click(`[data-testid=run-evaluate-${id}]`);
      await expect.poll(() => page.textContent(`[data-testid=run-cv-${id}]`), { timeout: 30_000 }).toMatch(/^RMSE \d/);
      const head = await page.textContent(`[data-testid=run-head-${id}]`);
      const cv = await page.textContent(`[data-testid=run-cv-${id}]`);
      const createdAt = await page.evaluate(
        (n) =>
          (
            window as unknown as { rankfillApp: { runs: { get(n: number): { createdAt: number } } } }
          ).rankfillApp.runs.get(n).createdAt,
        id,
      );

      const projectPath = join(dir, 'named-runs.rankfill');
      await page.click('[data-testid=save-as-button]');
      await page.waitForSelector('[data-testid=path-dialog]');
      await page.fill('[data-testid=prompt-input]', projectPath);
      await page.click('[data-testid=dialog-confirm]');
      await expect.poll(() => page.textContent('[data-testid=notice]')).toContain(`Kept in ${projectPath}`);
      const file = JSON.parse(readFileSync(projectPath, 'utf8'));
      expect(file.version).toBe(2);
      expect(file.runs).toHaveLength(1);
      expect(file.runs[0]).toMatchObject({
        number: id,
        name: 'tasting pick',
        fittedAt: new Date(createdAt).toISOString(),
      });

      const fresh = await openProjectInFreshPage(browser, host.launchUrl, projectPath);
      await expect
        .poll(
          () =>
            fresh.evaluate(() =>
              (window as unknown as { rankfillApp: { runs: { runs: { id: number }[] } } }).rankfillApp.runs.runs.map(
                (r) => r.id,
              ),
            ),
          { timeout: 30_000 },
        )
        .toEqual([id]);
      await fresh.click('[data-testid=tab-runs]');
      expect(await fresh.textContent(`[data-testid=run-head-${id}]`)).toBe(head);
      expect(await fresh.textContent(`[data-testid=run-cv-${id}]`)).toBe(cv);
      expect(
        await fresh.evaluate(
          (n) =>
            (
              window as unknown as { rankfillApp: { runs: { get(n: number): { createdAt: number } } } }
            ).rankfillApp.runs.get(n).createdAt,
          id,
        ),
      ).toBe(createdAt);
      await fresh.screenshot({ path: '/tmp/i12-runs-reopened.png' });
      await fresh.close();
    });
  });

  describe('import preview', () => {
    // An invented 0–10 questionnaire where nobody answered below 2.5: the guess is too narrow.
    const lines = ['Wine,fruit,oak,finish'];
    for (let i = 1; i <= 26; i++)
      lines.push(`w${i},${2.5 + ((i * 3) % 8)},${3 + (i % 7)},${i % 5 === 0 ? '' : 4 + ((i * 7) % 6)}`);
    const body = lines.join('\n') + '\n';

    it('shows the first 20 rows as a table under the file’s row-label title and explains the guessed scale', async () => {
      await page.setInputFiles('[data-testid=import-file]', {
        name: 'wines.csv',
        mimeType: 'text/csv',
        buffer: Buffer.from(body),
      });
      await page.waitForSelector('[data-testid=import-dialog]');
      const table = await page.evaluate(() =>
        [...document.querySelectorAll('[data-testid=import-table] tr')].map((tr) =>
          [...tr.children].map((c) => (c.textContent ?? '').trim()),
        ),
      );
      expect(table).toHaveLength(21); // header + 20 rows of 26
      expect(table[0]).toEqual(['Wine', 'fruit', 'oak', 'finish']);
      expect(table[1]).toEqual(lines[1].split(','));
      expect(table[20]).toEqual(lines[20].split(','));
      expect(await page.textContent('[data-testid=import-dialog]')).toContain('6 more rows not shown');
      const note = (await page.textContent('[data-testid=import-scale-note]')) ?? '';
      expect(note).toContain(
        'Guessed from the values: the lowest is 2.5, the highest 9.5, and every value is a multiple of 0.5',
      );
      await page.screenshot({ path: '/tmp/i12-import-preview.png' });
    });

    it('a scale set in the preview is used; off-step values are listed with line and column', async () => {
      await page.fill('[data-testid=import-scaleMin]', '0');
      await page.fill('[data-testid=import-scaleMax]', '10');
      await page.fill('[data-testid=import-scaleStep]', '1');
      await page.click('[data-testid=import-recheck]');
      await page.waitForSelector('[data-testid=import-problems]');
      // w1: fruit = 2.5 + 3 = 5.5 (line 2, field 2) lies between 5 and 6.
      expect(await page.textContent('[data-testid=import-problems]')).toContain(
        '2:2: 5.5 lies between the allowed values 5 and 6 (scale 0–10 in steps of 1)',
      );
      expect(await page.locator('[data-testid=import-open]').count()).toBe(0);
      await page.fill('[data-testid=import-scaleStep]', '0.5');
      await page.click('[data-testid=import-recheck]');
      await page.waitForSelector('[data-testid=import-open]');
      expect(await page.textContent('[data-testid=import-summary]')).toContain('0–10 in steps of 0.5');
      await page.click('[data-testid=import-open]');
      await expect
        .poll(() =>
          page.evaluate(() => (window as unknown as { rankfillApp: AppHandle }).rankfillApp.store.current.scale),
        )
        .toEqual({ min: 0, max: 10, step: 0.5 });
      // The row-label column keeps the file's title.
      expect(((await page.textContent('.ag-header-cell[col-id="rowLabel"]')) ?? '').trim()).toBe('Wine');
    });

    it('a long file’s columns can be kept as read or sorted', async () => {
      const long = 'taster,item,score\nt1,item 10,3\nt1,item 2,4\nt2,item 1,5\nt2,item 10,2\n';
      await page.setInputFiles('[data-testid=import-file]', {
        name: 'long.csv',
        mimeType: 'text/csv',
        buffer: Buffer.from(long),
      });
      await page.waitForSelector('[data-testid=import-dialog]');
      const header = () =>
        page.evaluate(() =>
          [...document.querySelectorAll('[data-testid=import-table] thead th')].map((c) =>
            (c.textContent ?? '').trim(),
          ),
        );
      expect(await header()).toEqual(['taster', 'item 10', 'item 2', 'item 1']);
      await page.selectOption('[data-testid=import-columnOrder]', 'sorted');
      await page.click('[data-testid=import-recheck]');
      await expect.poll(header).toEqual(['taster', 'item 1', 'item 2', 'item 10']);
      await page.click('[data-testid=dialog-cancel]');
    });
  });
});
