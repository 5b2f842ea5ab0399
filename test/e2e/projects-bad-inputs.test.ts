/**
 * The bad-input corpus (test/fixtures/bad) through the running browser host:
 * every ratings file goes to the import preview and every project file to
 * project.open. Each must answer with a clear, located message (never a stack
 * trace), the host must stay up, and, in the page, a refused import or open
 * must leave the open project unchanged.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { callApi, type PageWithApp } from './support/apiCall';
import { launchBrowser } from './support/browser';
import { repoRoot, startHost, type RunningHost } from './support/hostProcess';

const badDir = join(repoRoot, 'test/fixtures/bad');
const files = readdirSync(badDir).sort();

interface RefusalReply {
  ok: boolean;
  problems: { line: number; column: number; message: string }[];
}

const call = (host: RunningHost, method: string, payload: unknown) => callApi<RefusalReply>(host, method, payload);

describe('bad inputs through the browser host', () => {
  let host: RunningHost;
  let browser: Browser;
  let page: Page;
  const configDir = mkdtempSync(join(tmpdir(), 'rankfill-bad-'));

  beforeAll(async () => {
    host = await startHost([], { RANKFILL_CONFIG_DIR: configDir });
  });
  afterAll(async () => {
    await browser?.close();
    await host?.stop();
    rmSync(configDir, { recursive: true, force: true });
  });

  it(`every file of the corpus (${files.length}) is refused with a located message, and the host stays up`, async () => {
    expect(files.length).toBeGreaterThanOrEqual(25);
    const rows: string[] = [];
    let crashes = 0;
    for (const name of files) {
      const reply = name.endsWith('.rankfill')
        ? await call(host, 'project.open', { path: join(badDir, name) })
        : await call(host, 'document.previewImport', {
            fileName: name,
            text: readFileSync(join(badDir, name), 'utf8'),
          });
      if (!reply.ok) {
        crashes++;
        rows.push(`${name}: API error ${reply.error?.code}: ${reply.error?.message}`);
        continue;
      }
      const data = reply.data!;
      expect(data.ok, name).toBe(false);
      expect(data.problems.length, name).toBeGreaterThan(0);
      for (const p of data.problems) {
        expect(p.line, name).toBeGreaterThanOrEqual(1);
        expect(p.column, name).toBeGreaterThanOrEqual(1);
        expect(p.message, name).not.toMatch(/\n\s+at |TypeError|ReferenceError|undefined/);
      }
      rows.push(`${name}: ${data.problems[0].line}:${data.problems[0].column}: ${data.problems[0].message}`);
    }
    console.log(`bad-input corpus through the host: ${files.length} files, crashes: ${crashes}\n${rows.join('\n')}`);
    expect(crashes).toBe(0);
    expect(host.child.exitCode).toBeNull();
    expect((await call(host, 'app.info', {})).ok).toBe(true);
  });

  it('in the page, a refused import and a refused project leave the open project unchanged', async () => {
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1500, height: 900 } });
    await page.goto(host.launchUrl);
    await page.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
    const snapshot = () =>
      page.evaluate(() => {
        const s = (window as unknown as PageWithApp).rankfillApp.store;
        return JSON.stringify({
          t: s.title,
          r: s.current.rowLabels,
          c: s.current.colLabels,
          v: Array.from(s.current.values as Float64Array, (x: number) => (Number.isNaN(x) ? null : x)),
        });
      });
    const before = await snapshot();
    await page.setInputFiles('[data-testid=import-file]', join(badDir, 'unbalanced-quote.csv'));
    await page.waitForSelector('[data-testid=import-problems]');
    expect(await page.textContent('[data-testid=import-problems]')).toMatch(/\d+:\d+: /);
    await page.click('[data-testid=dialog-cancel]');
    expect(await snapshot()).toBe(before);

    await page.click('[data-testid=open-project-button]');
    await page.waitForSelector('[data-testid=path-dialog]');
    await page.fill('[data-testid=prompt-input]', join(badDir, 'future-version.rankfill'));
    await page.click('[data-testid=dialog-confirm]');
    await expect
      .poll(() => page.textContent('[data-testid=notice]'))
      .toContain('was not opened (the open project is unchanged)');
    expect(await page.textContent('[data-testid=notice]')).toMatch(/future-version\.rankfill:\d+:\d+: /);
    expect(await snapshot()).toBe(before);
  });
});
