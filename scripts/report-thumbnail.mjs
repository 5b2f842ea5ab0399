// Makes docs/report-thumbnail.png, the README's picture of a study report: the CLI writes the
// report of the invented coffee-cupping sample (with the centering comparison and tuning),
// Debian's Chromium prints it to A4, and pdftoppm (apt-get install -y poppler-utils) turns
// page 1 into a small PNG. Usage: node scripts/report-thumbnail.mjs
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, renameSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { findChromium } from './ensure-chromium.mjs';

const root = join(import.meta.dirname, '..');
// bin/rankfill.js runs the built CLI bundle.
if (!existsSync(join(root, 'out/cli/rankfill.js')))
  execFileSync('npm', ['run', 'build:cli'], { cwd: root, stdio: 'inherit' });
const work = mkdtempSync(join(tmpdir(), 'rankfill-thumb-'));
const html = join(work, 'Coffee cupping panel report.html');
execFileSync(
  process.execPath,
  [
    join(root, 'bin/rankfill.js'),
    'report',
    join(root, 'samples/coffee-cupping-panel.csv'),
    '--out',
    html,
    '--compare-centering',
  ],
  { stdio: 'inherit' },
);
const browser = await chromium.launch({ executablePath: findChromium(), args: ['--no-sandbox', '--disable-gpu'] });
const page = await (await browser.newContext({ offline: true })).newPage();
await page.goto(pathToFileURL(html).href);
const pdf = join(work, 'report.pdf');
await page.pdf({ path: pdf, format: 'A4', printBackground: true });
await browser.close();
mkdirSync(join(root, 'docs'), { recursive: true });
execFileSync('pdftoppm', ['-r', '48', '-f', '1', '-l', '2', '-png', pdf, join(work, 'page')]);
renameSync(join(work, 'page-1.png'), join(root, 'docs/report-thumbnail.png'));
renameSync(join(work, 'page-2.png'), join(root, 'docs/report-thumbnail-2.png'));
console.log('wrote docs/report-thumbnail.png and docs/report-thumbnail-2.png');
