/** Opens a kept project in a fresh page of the browser host, through the page's own path dialog. */
import type { Browser, Page } from 'playwright-core';

export async function openProjectInFreshPage(
  browser: Browser,
  launchUrl: string,
  projectPath: string,
  width = 1800,
): Promise<Page> {
  const fresh = await browser.newPage({ viewport: { width, height: 1100 } });
  await fresh.goto(launchUrl);
  await fresh.waitForSelector('body[data-ready="true"]', { timeout: 30_000 });
  await fresh.click('[data-testid=open-project-button]');
  await fresh.waitForSelector('[data-testid=path-dialog]');
  await fresh.fill('[data-testid=prompt-input]', projectPath);
  await fresh.click('[data-testid=dialog-confirm]');
  return fresh;
}
