/**
 * Editing and project files end to end in the browser host (Chromium):
 * edit, undo, redo, copy and paste a block, rename a column, keep the project,
 * reopen it in a fresh page; the reopened matrix equals what was on screen.
 * Also: refused entries, import preview with problems, unsaved-changes prompt.
 * Expected cell values come from the sample CSV read here independently.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseProject } from '../../src-shared/project/projectFile';
import { launchBrowser } from './support/browser';
import { openProjectInFreshPage } from './support/projectPage';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

const csv = readFileSync(join(repoRoot, 'samples', 'coffee-cupping-panel.csv'), 'utf8')
  .trimEnd()
  .split('\n');
const header = csv[0].split(',').slice(1);
const rows = csv.slice(1).map((l) => l.split(','));
const cellOf = (i: number, j: number) => rows[i][j + 1];

const cell = (page: Page, i: number, j: number) => page.locator(`.ag-row[row-index="${i}"] .ag-cell[col-id="c${j}"]`);
const text = async (page: Page, i: number, j: number) => ((await cell(page, i, j).textContent()) ?? '').trim();

/** The matrix as drawn: header labels, row labels, observed cell texts (estimates count as blank). */
async function screenMatrix(page: Page) {
  return page.evaluate(() => {
    const cols = [...document.querySelectorAll('.ag-header-cell[col-id^="c"]')]
      .map((h) => [Number(h.getAttribute('col-id')!.slice(1)), (h.textContent ?? '').trim()] as const)
      .sort((a, b) => a[0] - b[0])
      .map((x) => x[1]);
    const rowEls = [...document.querySelectorAll('.ag-row')]
      .filter((r) => /^\d+$/.test(r.getAttribute('row-index') ?? ''))
      .sort((a, b) => Number(a.getAttribute('row-index')) - Number(b.getAttribute('row-index')));
    const labels = rowEls.map((r) => (r.querySelector('[col-id="rowLabel"]')?.textContent ?? '').trim());
    const values = rowEls.map((r) =>
      cols.map((_, j) => {
        const c = r.querySelector(`[col-id="c${j}"]`);
        if (!c) return null; // not rendered (virtualized): the test must see every cell
        if (c.classList.contains('rf-filled') || c.classList.contains('rf-diff')) return '';
        return (c.textContent ?? '').trim();
      }),
    );
    return { cols, labels, values };
  });
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

async function copy(page: Page): Promise<string> {
  return page.evaluate(() => {
    const dt = new DataTransfer();
    (document.activeElement ?? document.body).dispatchEvent(
      new ClipboardEvent('copy', { clipboardData: dt, bubbles: true, cancelable: true }),
    );
    return dt.getData('text/plain');
  });
}

describe('editing and project files in the browser host', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const dir = mkdtempSync(join(tmpdir(), 'rankfill-edit-'));
  const projectPath = join(dir, 'cupping-edited.rankfill');
  const pageErrors: string[] = [];

  beforeAll(async () => {
    host = await startHost([], { RANKFILL_CONFIG_DIR: join(dir, 'config') });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1800, height: 1100 } });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
    // Keep the grid free of model estimates so that blank cells read blank.
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

  it('types a rating, takes it back and brings it back (Ctrl+Z, Ctrl+Y) with labelled buttons', async () => {
    expect(cellOf(0, 0)).toBe('');
    await cell(page, 0, 0).click();
    await page.keyboard.type('7');
    await page.keyboard.press('Enter');
    await expect.poll(() => text(page, 0, 0)).toBe('7');
    expect(await page.textContent('[data-testid=undo-button]')).toContain('Undo: Enter rating');
    expect(await page.textContent('[data-testid=doc-title]')).toContain('•');
    await page.keyboard.press('Control+z');
    await expect.poll(() => text(page, 0, 0)).toBe('');
    expect(await page.textContent('[data-testid=redo-button]')).toContain('Redo: Enter rating');
    await page.keyboard.press('Control+y');
    await expect.poll(() => text(page, 0, 0)).toBe('7');
    await page.keyboard.press('Control+Shift+z'); // nothing left to redo: no change
    expect(await text(page, 0, 0)).toBe('7');
  });

  it('refuses an entry outside the scale, naming the range, and keeps the old value', async () => {
    const before = await text(page, 1, 0);
    await cell(page, 1, 0).click();
    await page.keyboard.type('12');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.textContent('[data-testid=notice]')).toContain('outside the scale 1–9');
    expect(await text(page, 1, 0)).toBe(before);
  });

  it('copies a selected block as tab-separated text', async () => {
    await cell(page, 1, 1).click();
    await cell(page, 2, 2).click({ modifiers: ['Shift'] });
    await expect.poll(() => page.locator('.ag-cell.rf-selected').count()).toBe(4);
    // Source: rows 2–3, columns 2–3 of samples/coffee-cupping-panel.csv.
    expect(await copy(page)).toBe(`${cellOf(1, 1)}\t${cellOf(1, 2)}\n${cellOf(2, 1)}\t${cellOf(2, 2)}\n`);
  });

  it('pastes a block after saying how many observed values change; one undo takes it all back', async () => {
    await cell(page, 1, 1).click();
    await paste(page, '3\t4\r\n\t6\r\n');
    await page.waitForSelector('[data-testid=paste-confirm-dialog]');
    // (1,1) 5→3, (1,2) 5→4, (2,1) blank→blank, (2,2) 5→6: 3 cells change, all 3 observed.
    expect(await page.textContent('[data-testid=paste-confirm-dialog]')).toContain('changes 3 cells, and 3 of them');
    await page.click('[data-testid=dialog-confirm]');
    await expect.poll(() => text(page, 1, 1)).toBe('3');
    expect([await text(page, 1, 2), await text(page, 2, 1), await text(page, 2, 2)]).toEqual(['4', '', '6']);
    expect(await page.textContent('[data-testid=undo-button]')).toContain('Paste 2 × 2 block');
    await page.click('[data-testid=undo-button]');
    await expect.poll(() => text(page, 1, 1)).toBe(cellOf(1, 1));
    expect(await text(page, 2, 2)).toBe(cellOf(2, 2));
    await page.click('[data-testid=redo-button]');
    await expect.poll(() => text(page, 1, 1)).toBe('3');
  });

  it('refuses a paste with an entry off the scale and lists the offending cell', async () => {
    await cell(page, 3, 0).click();
    // The paste starts at the focused cell: wait until the grid has moved its focus there.
    await page.waitForSelector('.ag-row[row-index="3"] .ag-cell[col-id="c0"].ag-cell-focus', { state: 'attached' });
    await paste(page, '2\tabc\n');
    await expect.poll(() => page.textContent('[data-testid=notice]')).toContain('Paste refused');
    const notice = (await page.textContent('[data-testid=notice]')) ?? '';
    expect(notice).toContain(`${rows[3][0]} × ${header[1]}: “abc” is not a number`);
    expect(await text(page, 3, 0)).toBe(cellOf(3, 0));
  });

  it('renames a column; a duplicate label is refused with a message', async () => {
    await cell(page, 0, 2).click();
    await page.click('[data-testid=rows-cols-menu] summary');
    await page.click('[data-testid=cmd-rename-column]');
    await page.fill('[data-testid=prompt-input]', header[0]);
    await page.click('[data-testid=dialog-confirm]');
    await expect
      .poll(() => page.textContent('[data-testid=dialog-error]'))
      .toContain(`already a column labelled “${header[0]}”`);
    await page.fill('[data-testid=prompt-input]', 'Aiko (second pass)');
    await page.click('[data-testid=dialog-confirm]');
    await expect.poll(() => page.textContent('.ag-header-cell[col-id="c2"]')).toContain('Aiko (second pass)');
  });

  it('swaps rows and columns as one change, and Undo swaps back', async () => {
    await page.click('[data-testid=transpose-button]');
    await expect
      .poll(() => page.textContent('[data-testid=status-shape]'))
      .toBe(`${header.length} rows × ${rows.length} columns`);
    await page.keyboard.press('Control+z');
    await expect
      .poll(() => page.textContent('[data-testid=status-shape]'))
      .toBe(`${rows.length} rows × ${header.length} columns`);
  });

  it('keeps the project, then a fresh page reopens exactly what was on screen', async () => {
    const shown = await screenMatrix(page);
    expect(shown.values.length).toBe(rows.length);
    expect(shown.values.flat().filter((v) => v === null)).toEqual([]);
    expect(shown.values[0][0]).toBe('7');
    expect(shown.cols[2]).toBe('Aiko (second pass)');
    await page.click('[data-testid=save-as-button]');
    await page.waitForSelector('[data-testid=path-dialog]');
    await page.fill('[data-testid=prompt-input]', projectPath);
    await page.click('[data-testid=dialog-confirm]');
    await expect.poll(() => page.textContent('[data-testid=notice]')).toContain(`Kept in ${projectPath}`);
    expect(await page.textContent('[data-testid=doc-title]')).not.toContain('•');
    // History survives a save.
    expect(await page.textContent('[data-testid=undo-button]')).toContain('Rename column');

    // The file on disk holds the same matrix.
    const parsed = parseProject(readFileSync(projectPath, 'utf8'), 'x');
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    expect(parsed.project.matrix.colLabels).toEqual(shown.cols);
    expect(parsed.project.matrix.rowLabels).toEqual(shown.labels);

    const fresh = await openProjectInFreshPage(browser, host.launchUrl, projectPath);
    await expect.poll(() => fresh.textContent('[data-testid=doc-title]')).toBe('cupping-edited');
    await fresh.waitForSelector(`.ag-row[row-index="${rows.length - 1}"]`, { state: 'attached' });
    expect(await screenMatrix(fresh)).toEqual(shown);
    // Recent files list the project.
    await fresh.click('[data-testid=recent-menu] summary');
    await expect.poll(() => fresh.textContent('[data-testid=recent-0]')).toBe(projectPath);
    await fresh.close();
  });

  it('asks before unsaved changes are left behind', async () => {
    await cell(page, 4, 1).click();
    await page.keyboard.type('2');
    await page.keyboard.press('Enter');
    await page.click('[data-testid=open-project-button]');
    await page.waitForSelector('[data-testid=unsaved-dialog]');
    await page.click('[data-testid=dialog-cancel]');
    await expect.poll(() => page.locator('[data-testid=unsaved-dialog]').count()).toBe(0);
    expect(await text(page, 4, 1)).toBe('2');
    await page.keyboard.press('Control+z');
    await expect.poll(() => page.textContent('[data-testid=doc-title]')).not.toContain('•');
  });

  it('previews an import with its problems as line:column: reason, and opens nothing when refused', async () => {
    const before = await page.textContent('[data-testid=status-shape]');
    await page.setInputFiles('[data-testid=import-file]', {
      name: 'ragged.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('id,a,b\nr1,1,2\nr2,3\n'),
    });
    await page.waitForSelector('[data-testid=import-dialog]');
    expect(await page.textContent('[data-testid=import-problems]')).toMatch(/3:\d+: /);
    expect(await page.locator('[data-testid=import-open]').count()).toBe(0);
    await page.click('[data-testid=dialog-cancel]');
    expect(await page.textContent('[data-testid=status-shape]')).toBe(before);
  });

  it('previews a semicolon file with decimal commas, then opens it', async () => {
    const body = 'who;q1;q2;q3\nann;3,5;4;\nbo;2;NA;4,5\n';
    await page.setInputFiles('[data-testid=import-file]', {
      name: 'survey.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(body),
    });
    await page.waitForSelector('[data-testid=import-dialog]');
    const summary = (await page.textContent('[data-testid=import-summary]')) ?? '';
    expect(summary).toContain('2 rows × 3 columns');
    expect(summary).toContain('4 values');
    expect(summary).toContain('semicolon, decimal comma');
    await page.click('[data-testid=import-open]');
    await expect.poll(() => page.textContent('[data-testid=status-shape]')).toBe('2 rows × 3 columns');
    expect(await text(page, 0, 0)).toBe('3.5');
    expect(await text(page, 1, 1)).toBe('');
    expect(pageErrors).toEqual([]);
  });
});
