/**
 * The study report of one run: a single self-contained HTML document (style, charts and
 * data inline; no script runs and nothing is fetched — its own Content-Security-Policy
 * forbids every request), in this order:
 *   1. the data: size, observed share, scale, the missing pattern, thin rows and columns;
 *   2. what was done: a methods paragraph generated from the settings, with references;
 *   3. how well it fills: cross-validated RMSE and MAE beside the baselines alone, the
 *      centering comparison and the tuning chart when they were run;
 *   (intervals, when the run carries them;)
 *   4. reading the filled values: the export's caution, in its words;
 *   5. provenance: app version, time, seed, input hash, exports written with the run.
 * Pure: data in, string out (the window and the command line only gather the input).
 */
import type { TunePayload } from '../api';
import { MODEL_ESTIMATE_CAUTION, PEOPLE_JUDGED_CAUTION } from '../io/exportFilled';
import { countChartSvg } from './countChartSvg';
import { errorBarSvg } from './errorBarSvg';
import { articleFor, count, esc, fmt, nameList, percent, tag } from './html';
import { methodsText, scaleWords } from './methodsText';
import { missingPattern, type MissingPattern } from './missingPattern';
import { patternMapSvg, patternMapWords } from './patternMapSvg';
import { rankChartSvg } from './rankChartSvg';
import type { ReportInput } from './reportInput';
import { evaluationRows } from './reportEvaluation';
import { REPORT_CSS } from './reportStyles';
import { CENTERING_SHORT, describeSettings } from './settingsWords';

export const REPORT_DATA_ID = 'rankfill-report-data';
const REPORT_FORMAT = 'rankfill-report';
const REPORT_FORMAT_VERSION = 1;

/** No request of any kind: styles only inline, images only as data: URLs (none are used). */
export const REPORT_CSP =
  "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'";

const num = (x: number | null | undefined): number => (x === null || x === undefined ? NaN : x);

function section(id: string, heading: string, ...body: string[]): string {
  return tag('section', { id, 'data-testid': `report-${id}` }, tag('h2', {}, esc(heading)), ...body);
}

function figure(svgMarkup: string, caption: string, extra = ''): string {
  return tag('figure', {}, svgMarkup, extra, tag('figcaption', {}, esc(caption)));
}

function facts(items: [string, string][]): string {
  return tag('dl', { class: 'rf-facts' }, ...items.map(([k, v]) => tag('dt', {}, esc(k)) + tag('dd', {}, v)));
}

function dataSection(input: ReportInput, p: MissingPattern, n: number): string {
  const m = input.matrix;
  const cells = p.rows * p.cols;
  let lo = Infinity;
  let hi = -Infinity;
  let sum = 0;
  for (const v of m.values) {
    if (v !== v) continue;
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
    sum += v;
  }
  const thinRule = `fewer than ${p.thinBelow} observed value${p.thinBelow === 1 ? '' : 's'}`;
  const thinWhy =
    input.run.settings.model === 'lowrank' && input.run.settings.rank > 0
      ? `With ${thinRule} a row or column cannot pin down its ${input.run.settings.rank} hidden trait${input.run.settings.rank === 1 ? '' : 's'}, so its filled values rest mostly on the baselines.`
      : 'With no observed value a row or column is filled from the other rows and columns alone.';
  const thinList = (what: string, idx: number[], labels: string[]) =>
    idx.length === 0
      ? tag('p', {}, esc(`No ${what} has ${thinRule}.`))
      : tag(
          'p',
          { class: 'rf-thin', 'data-testid': `report-thin-${what}s` },
          esc(
            `${count(idx.length)} ${what}${idx.length === 1 ? ' has' : 's have'} ${thinRule}: ${nameList(idx.map((i) => labels[i]))}.`,
          ),
        );
  return section(
    'data',
    `${n}. The data`,
    facts([
      ['Size', esc(`${count(p.rows)} rows × ${count(p.cols)} columns (${count(cells)} cells)`)],
      [
        'Observed',
        esc(
          `${count(p.observed)} cells (${percent(cells ? p.observed / cells : NaN)}); ${count(cells - p.observed)} blank (${percent(cells ? (cells - p.observed) / cells : NaN)})`,
        ),
      ],
      ['Rating scale', esc(scaleWords(m.scale))],
      ['Observed values', p.observed ? esc(`from ${lo} to ${hi}, mean ${fmt(sum / p.observed, 2)}`) : 'none'],
    ]),
    tag('h3', {}, 'Where the blanks are'),
    figure(patternMapSvg(p.map, p.rows, p.cols, 'report-map'), patternMapWords(p.map)),
    figure(
      countChartSvg(p.rowCounts, m.rowLabels, 'row', p.cols, p.thinBelow, 'report-row-counts'),
      `Observed cells in each row (out of ${count(p.cols)} columns)${p.rows > 80 ? ': how many rows have how many' : ''}. Thin rows are drawn in red.`,
    ),
    figure(
      countChartSvg(p.colCounts, m.colLabels, 'column', p.rows, p.thinBelow, 'report-col-counts'),
      `Observed cells in each column (out of ${count(p.rows)} rows)${p.cols > 80 ? ': how many columns have how many' : ''}. Thin columns are drawn in red.`,
    ),
    tag('h3', {}, 'Rows and columns too thin to fill reliably'),
    thinList('row', p.thinRows, m.rowLabels),
    thinList('column', p.thinCols, m.colLabels),
    tag('p', { class: 'rf-hint' }, esc(thinWhy)),
  );
}

function methodsSection(input: ReportInput, n: number): { html: string; paragraph: string } {
  const t = methodsText(input);
  const html = section(
    'methods',
    `${n}. What was done`,
    tag('p', { class: 'rf-hint' }, 'A methods paragraph, generated from the settings of this run, ready to paste:'),
    tag('p', { class: 'rf-methods', 'data-testid': 'report-methods-paragraph' }, esc(t.paragraph)),
    tag('h3', {}, 'References'),
    tag('ol', { class: 'rf-refs' }, ...t.references.map((r) => tag('li', {}, esc(r)))),
  );
  return { html, paragraph: t.paragraph };
}

function evaluationBlock(input: ReportInput): string {
  const e = input.evaluation;
  if (!e) return tag('p', {}, 'The run was not cross-validated for this report, so its accuracy is not known here.');
  const rows = evaluationRows(e, `This model (${describeSettings(input.run.settings)})`);
  const table = tag(
    'table',
    { 'data-testid': 'report-evaluation' },
    tag(
      'tr',
      {},
      tag('th', {}, 'Model'),
      tag('th', { class: 'rf-num' }, 'RMSE (± sd over folds)'),
      tag('th', { class: 'rf-num' }, 'MAE (± sd)'),
    ),
    ...rows.map((r) =>
      tag(
        'tr',
        { class: r.isRun ? 'rf-mark' : undefined },
        tag(
          'td',
          {},
          esc(r.words),
          tag('span', { class: 'rf-folds' }, esc(`RMSE of each fold: ${r.foldRmse.map((x) => fmt(x)).join(' · ')}`)),
        ),
        tag(
          'td',
          { class: 'rf-num' },
          r.error ? esc(`failed: ${r.error}`) : esc(`${fmt(r.meanRmse)} ± ${fmt(r.sdRmse)}`),
        ),
        tag('td', { class: 'rf-num' }, esc(`${fmt(r.meanMae)} ± ${fmt(r.sdMae)}`)),
      ),
    ),
  );
  const own = rows[0];
  const baselines = rows.slice(1).filter((r) => Number.isFinite(r.meanRmse));
  const bestBase = baselines.reduce<(typeof rows)[number] | undefined>(
    (a, r) => (!a || r.meanRmse < a.meanRmse ? r : a),
    undefined,
  );
  let verdict = '';
  if (own && Number.isFinite(own.meanRmse) && bestBase) {
    const change = (bestBase.meanRmse - own.meanRmse) / bestBase.meanRmse;
    verdict =
      change > 0
        ? `This model’s typical error (RMSE ${fmt(own.meanRmse)}) is ${percent(change)} lower than the best of the baselines alone (${bestBase.words.toLowerCase()}, ${fmt(bestBase.meanRmse)}): that is what the model adds.`
        : `This model’s typical error (RMSE ${fmt(own.meanRmse)}) is not lower than the best of the baselines alone (${bestBase.words.toLowerCase()}, ${fmt(bestBase.meanRmse)}): on this data the model adds nothing over the baselines. Consider a smaller rank or run the tuning.`;
  }
  const items = rows.map((r, i) => ({
    label: i === 0 ? 'this model' : r.words.replace(/ alone$/, '').toLowerCase(),
    mean: r.meanRmse,
    sd: r.sdRmse,
    folds: r.foldRmse,
    highlight: r.isRun,
  }));
  return (
    tag(
      'p',
      { class: 'rf-hint' },
      esc(
        `Scored by ${e.k}-fold cross-validation (seed ${e.seed}): the observed ratings are dealt into ${e.k} folds; each fold is hidden in turn, the model is fitted on the rest and its estimates for the hidden ratings are compared with them. RMSE is the typical size of an error in rating units, MAE the average absolute error; lower is better. Every row below was scored on the same folds.`,
      ),
    ) +
    table +
    (verdict ? tag('p', { 'data-testid': 'report-verdict' }, esc(verdict)) : '') +
    figure(
      errorBarSvg(items, 'RMSE (held-out cells)', 'this model', 'report-evaluation-chart'),
      'Dot: mean RMSE over the folds; whisker: ± one standard deviation; small circles: each fold.',
    )
  );
}

function centeringBlock(c: TunePayload): string {
  const rows = c.table.map((r, i) => ({ r, best: i === c.bestIndex }));
  const first = c.table[0]?.settings;
  const at = first && first.model === 'lowrank' ? `rank ${first.rank}, λ ${first.lambda}` : '';
  const table = tag(
    'table',
    { 'data-testid': 'report-centering' },
    tag(
      'tr',
      {},
      tag('th', {}, 'Centering'),
      tag('th', { class: 'rf-num' }, 'RMSE (± sd)'),
      tag('th', { class: 'rf-num' }, 'MAE'),
    ),
    ...rows.map(({ r, best }) =>
      tag(
        'tr',
        { class: best ? 'rf-mark' : undefined },
        tag(
          'td',
          {},
          esc(
            `${r.settings.model === 'lowrank' ? CENTERING_SHORT[r.settings.centering] : 'gaussian'}${best ? ' ★ best' : ''}`,
          ),
        ),
        tag(
          'td',
          { class: 'rf-num' },
          r.error ? esc(`failed: ${r.error}`) : esc(`${fmt(r.meanRmse)} ± ${fmt(r.sdRmse)}`),
        ),
        tag('td', { class: 'rf-num' }, esc(fmt(r.meanMae))),
      ),
    ),
  );
  const items = rows.map(({ r, best }) => ({
    label: r.settings.model === 'lowrank' ? CENTERING_SHORT[r.settings.centering] : 'gaussian',
    mean: num(r.meanRmse),
    sd: num(r.sdRmse),
    folds: r.folds.map((f) => num(f.rmse)),
    highlight: best,
  }));
  return (
    tag('h3', {}, 'Centering comparison') +
    tag(
      'p',
      { class: 'rf-hint' },
      esc(
        `The four ways of removing baselines, each at ${at}, scored on the same ${c.k} folds (seed ${c.seed}). When the whiskers overlap a lot, the data does not clearly prefer one of them.`,
      ),
    ) +
    table +
    figure(
      errorBarSvg(items, 'RMSE (held-out cells)', 'best', 'report-centering-chart'),
      'Dot: mean RMSE; whisker: ± one standard deviation over the folds; small circles: each fold; the best mode in red.',
    )
  );
}

function tuningBlock(t: TunePayload): string {
  const chart = rankChartSvg(t, 'report-tuning-chart');
  const best = t.table[t.bestIndex];
  const se = t.table[t.oneStandardErrorIndex];
  const what = (r: TunePayload['table'][number] | undefined) =>
    r ? `${describeSettings(r.settings)} (RMSE ${fmt(r.meanRmse)})` : 'none';
  const sorted = t.table.map((r, i) => ({ r, i })).sort((a, b) => num(a.r.meanRmse) - num(b.r.meanRmse) || a.i - b.i);
  const shown = sorted.slice(0, 30);
  const table = tag(
    'table',
    { class: 'rf-small', 'data-testid': 'report-tuning' },
    tag(
      'tr',
      {},
      tag('th', {}, 'Setting'),
      tag('th', { class: 'rf-num' }, 'RMSE (± sd)'),
      tag('th', { class: 'rf-num' }, 'MAE'),
    ),
    ...shown.map(({ r, i }) =>
      tag(
        'tr',
        { class: i === t.bestIndex || i === t.oneStandardErrorIndex ? 'rf-mark' : undefined },
        tag(
          'td',
          {},
          esc(
            `${describeSettings(r.settings)}${i === t.bestIndex ? ' ★' : ''}${i === t.oneStandardErrorIndex ? ' ◇' : ''}`,
          ),
        ),
        tag(
          'td',
          { class: 'rf-num' },
          r.error ? esc(`failed: ${r.error}`) : esc(`${fmt(r.meanRmse)} ± ${fmt(r.sdRmse)}`),
        ),
        tag('td', { class: 'rf-num' }, esc(fmt(r.meanMae))),
      ),
    ),
  );
  return (
    tag('h3', {}, 'Tuning') +
    tag(
      'p',
      {},
      esc(
        `${t.table.length} settings scored on the same ${t.k} folds (seed ${t.seed}). Lowest error: ${what(best)}. Simpler choice by the one-standard-error rule (any setting within one standard error of the best is about as good; the rule takes the smallest rank among them): ${what(se)}.`,
      ),
    ) +
    figure(chart.svg, 'Mean RMSE against rank; colour tells the λ, the dash pattern the centering.', chart.legend) +
    table +
    (sorted.length > shown.length
      ? tag(
          'p',
          { class: 'rf-hint' },
          esc(`The ${shown.length} settings with the lowest error are listed, of ${sorted.length}.`),
        )
      : '')
  );
}

function intervalsSection(input: ReportInput, n: number): string {
  const iv = input.intervals!;
  return section(
    'intervals',
    `${n}. How far each filled value may be off`,
    tag(
      'p',
      {},
      esc(
        `Each filled value comes with ${articleFor(percent(iv.level, 0))} ${percent(iv.level, 0)} ${iv.method}: a range that should hold the true rating about ${percent(iv.level, 0)} of the time.`,
      ),
    ),
    facts([
      ['Method', esc(iv.method)],
      ['Nominal coverage', esc(percent(iv.level, 0))],
      [
        'Checked coverage',
        esc(
          iv.coverage === null
            ? 'not checked'
            : `${percent(iv.coverage)} of held-out ratings fell inside their interval`,
        ),
      ],
      ['Mean width', esc(iv.meanWidth === null ? 'n/a' : `${fmt(iv.meanWidth, 2)} rating units`)],
      ['Sources', iv.sources.map((x) => esc(x)).join('<br>')],
    ]),
    iv.note ? tag('p', { class: 'rf-hint' }, esc(iv.note)) : '',
  );
}

function cautionSection(n: number): string {
  return section(
    'caution',
    `${n}. Reading the filled values`,
    tag('p', { class: 'rf-caution', 'data-testid': 'report-caution' }, esc(MODEL_ESTIMATE_CAUTION)),
    tag('p', { class: 'rf-caution rf-people', 'data-testid': 'report-people-caution' }, esc(PEOPLE_JUDGED_CAUTION)),
    tag(
      'p',
      { class: 'rf-hint' },
      'In the exported files filled values are marked: the wide files say so in their corner cell, and the long layout marks every filled record as “filled”. Observed ratings are always written exactly as entered.',
    ),
  );
}

function provenanceSection(input: ReportInput, n: number): string {
  const s = input.run.settings;
  const exports =
    input.exports.length === 0
      ? tag('p', { 'data-testid': 'report-exports' }, 'No export was written from this run before this report.')
      : tag(
          'ul',
          { 'data-testid': 'report-exports' },
          ...input.exports.map((x) =>
            tag(
              'li',
              {},
              tag('code', {}, esc(x.path)),
              x.sidecarPath ? ` with settings file ${tag('code', {}, esc(x.sidecarPath))}` : '',
              esc(` (${x.writtenAt})`),
            ),
          ),
        );
  return section(
    'provenance',
    `${n}. Provenance`,
    facts([
      ['Made by', esc(`${input.app.name} ${input.app.version}`)],
      ['Report made', esc(input.createdAt)],
      ['Data', esc(input.title) + (input.source ? ` — ${tag('code', {}, esc(input.source))}` : '')],
      ['Input SHA-256', tag('code', { 'data-testid': 'report-sha256' }, esc(input.inputSha256))],
      ['Hash of', 'row and column labels, scale and values (the same hash as the export’s settings file)'],
      [
        'Run',
        esc(
          `${input.run.label}: ${describeSettings(s)}${input.run.refitsAfterEdits ? `, refitted after ${input.run.refitsAfterEdits} edit${input.run.refitsAfterEdits === 1 ? '' : 's'}` : ''}`,
        ),
      ],
      ...(input.choice ? ([['Settings chosen', esc(input.choice.reason)]] as [string, string][]) : []),
      ['Seed', tag('span', { 'data-testid': 'report-seed' }, esc(String(s.seed)))],
      [
        'Fit',
        esc(
          `${input.run.iterations} ${s.model === 'gaussian' ? 'EM iterations' : 'sweeps'}, ${input.run.converged ? 'settled' : 'stopped at the limit'}; final ${s.model === 'gaussian' ? 'log-likelihood' : 'objective'} ${input.run.finalObjective === null ? 'n/a' : input.run.finalObjective.toPrecision(6)}`,
        ),
      ],
      ['Full settings', tag('code', {}, esc(JSON.stringify(s)))],
      ...(input.reportPath ? ([['This report', tag('code', {}, esc(input.reportPath))]] as [string, string][]) : []),
    ]),
    tag('h3', {}, 'Exports written with this run'),
    exports,
  );
}

/** The report's machine-readable summary (kept in the page as a JSON data block). */
function reportData(input: ReportInput, paragraph: string, p: MissingPattern): unknown {
  return {
    format: REPORT_FORMAT,
    version: REPORT_FORMAT_VERSION,
    app: input.app,
    createdAt: input.createdAt,
    title: input.title,
    source: input.source ?? null,
    input: { rows: p.rows, cols: p.cols, observed: p.observed, scale: input.matrix.scale, sha256: input.inputSha256 },
    thin: {
      below: p.thinBelow,
      rows: p.thinRows.map((i) => input.matrix.rowLabels[i]),
      cols: p.thinCols.map((j) => input.matrix.colLabels[j]),
    },
    run: {
      label: input.run.label,
      settings: input.run.settings,
      iterations: input.run.iterations,
      converged: input.run.converged,
      finalObjective: input.run.finalObjective,
      refitsAfterEdits: input.run.refitsAfterEdits,
    },
    evaluation: input.evaluation,
    centering: input.centering,
    tuning: input.tuning,
    intervals: input.intervals ?? null,
    choice: input.choice ?? null,
    exports: input.exports,
    methods: paragraph,
  };
}

/** JSON that is safe inside a <script type="application/json"> element. */
function jsonBlock(value: unknown): string {
  return JSON.stringify(value)
    .replace(/</g, '\\u003c')
    .replace(/>/g, '\\u003e')
    .replace(/&/g, '\\u0026')
    .replace(/\u2028/g, '\\u2028')
    .replace(/\u2029/g, '\\u2029');
}

export function buildReport(input: ReportInput): string {
  const p = missingPattern(input.matrix, input.run.settings);
  let n = 0;
  const data = dataSection(input, p, ++n);
  const methods = methodsSection(input, ++n);
  const accuracy = section(
    'accuracy',
    `${++n}. How well it fills`,
    evaluationBlock(input),
    input.centering ? centeringBlock(input.centering) : '',
    input.tuning ? tuningBlock(input.tuning) : '',
    !input.centering && !input.tuning
      ? tag('p', { class: 'rf-hint' }, 'No centering comparison or tuning was run on this data for this report.')
      : '',
  );
  const intervals = input.intervals ? intervalsSection(input, ++n) : '';
  const caution = cautionSection(++n);
  const provenance = provenanceSection(input, n + 1);
  const head =
    `<meta charset="utf-8">` +
    tag('meta', { 'http-equiv': 'Content-Security-Policy', content: REPORT_CSP }).replace('></meta>', '>') +
    `<meta name="viewport" content="width=device-width, initial-scale=1">` +
    tag('meta', { name: 'generator', content: `${input.app.name} ${input.app.version}` }).replace('></meta>', '>') +
    tag('title', {}, esc(`Study report — ${input.title}`)) +
    tag('style', {}, REPORT_CSS);
  const body = tag(
    'main',
    { class: 'rf-report' },
    tag(
      'header',
      {},
      tag('p', { class: 'rf-kicker' }, esc(`${input.app.name} study report`)),
      tag('h1', { 'data-testid': 'report-title' }, esc(input.title)),
      tag(
        'p',
        { class: 'rf-sub' },
        esc(`${input.run.label}: ${describeSettings(input.run.settings)} · made ${input.createdAt}`),
      ),
      tag(
        'p',
        { class: 'rf-banner' },
        'Filled values are estimates, not observations. See “Reading the filled values” below.',
      ),
    ),
    data,
    methods.html,
    accuracy,
    intervals,
    caution,
    provenance,
    tag(
      'footer',
      {},
      esc(
        `Made with ${input.app.name} ${input.app.version}. This page is self-contained: it loads nothing from anywhere and prints to A4 or Letter.`,
      ),
    ),
  );
  const dataBlock = `<script type="application/json" id="${REPORT_DATA_ID}">${jsonBlock(reportData(input, methods.paragraph, p))}</script>`;
  return `<!doctype html>\n<html lang="en"><head>${head}</head><body>${body}${dataBlock}</body></html>\n`;
}
