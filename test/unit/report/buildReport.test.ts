import { describe, expect, it } from 'vitest';
import { tuneToPayload } from '../../../src-shared/apiCodec';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { tune } from '../../../src-shared/engine/tuning';
import { createRng } from '../../../src-shared/engine/random';
import { ESTIMATE_CAUTION, MODEL_ESTIMATE_CAUTION, PEOPLE_JUDGED_CAUTION } from '../../../src-shared/io/exportFilled';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { buildReport, REPORT_CSP, REPORT_DATA_ID } from '../../../src-shared/report/buildReport';
import type { ReportInput } from '../../../src-shared/report/reportInput';
import { reportEvaluationSettings } from '../../../src-shared/report/reportEvaluation';

function sampleMatrix(): RatingMatrix {
  const rng = createRng(11);
  const rows = 14;
  const cols = 9;
  const values = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) values[i * cols + j] = rng.next() < 0.3 ? NaN : 1 + Math.round(4 * rng.next());
  // Row 3 has one rating only: thin at rank 2.
  for (let j = 1; j < cols; j++) values[3 * cols + j] = NaN;
  values[3 * cols] = 4;
  const rowLabels = Array.from({ length: rows }, (_, i) => `Taster ${i + 1}`);
  rowLabels[5] = '<script>alert(1)</script>';
  return {
    rowLabels,
    colLabels: Array.from({ length: cols }, (_, j) => `Blend ${j + 1}`),
    values,
    scale: { min: 1, max: 5, step: 1 },
  };
}

function reportInput(extra: Partial<ReportInput> = {}): ReportInput {
  const matrix = sampleMatrix();
  const settings = defaultLowRankSettings();
  const fit = fitModel(matrix, settings);
  return {
    title: 'Taste & <test>',
    source: '/data/tasting.csv',
    app: { name: 'Rankfill', version: '0.1.0' },
    createdAt: '2026-12-02T10:00:00.000Z',
    matrix,
    inputSha256: 'f'.repeat(64),
    run: {
      label: 'Run 1',
      settings,
      iterations: fit.iterations,
      converged: fit.converged,
      finalObjective: fit.objectiveTrace.at(-1) ?? null,
      objectiveTrace: fit.objectiveTrace,
      refitsAfterEdits: 0,
    },
    evaluation: tuneToPayload(tune(matrix, { settings: reportEvaluationSettings(settings) }, 5, 1)),
    centering: null,
    tuning: null,
    exports: [
      {
        path: '/out/tasting filled.csv',
        sidecarPath: '/out/tasting filled.settings.json',
        writtenAt: '2026-12-02T09:59:00.000Z',
      },
    ],
    ...extra,
  };
}

function dataBlock(html: string): Record<string, unknown> {
  const m = new RegExp(`<script type="application/json" id="${REPORT_DATA_ID}">(.*?)</script>`, 's').exec(html);
  expect(m).not.toBeNull();
  return JSON.parse(m![1]) as Record<string, unknown>;
}

describe('study report builder', () => {
  const html = buildReport(reportInput());

  it('is one self-contained document: no script that runs, no reference to anything outside it', () => {
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html).toContain(
      `<meta http-equiv="Content-Security-Policy" content="${REPORT_CSP.replace(/'/g, '&#39;')}">`,
    );
    expect(REPORT_CSP).toContain("default-src 'none'");
    // Every <script> is the JSON data block (never executed).
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    expect(scripts).toEqual([`<script type="application/json" id="${REPORT_DATA_ID}">`]);
    expect(html).not.toMatch(/\b(src|href)\s*=/i);
    expect(html).not.toMatch(/url\(|@import|<link\b|<img\b|<iframe\b/i);
    expect(html).not.toMatch(/https?:\/\/(?!www\.w3\.org\/2000\/svg")/);
  });

  it('escapes labels and titles from the data', () => {
    expect(html).not.toContain('<script>alert(1)</script>');
    expect(html).toContain('Taste &amp; &lt;test&gt;');
    expect(dataBlock(html).title).toBe('Taste & <test>');
  });

  it('puts the sections in the agreed order and names the thin row', () => {
    const order = ['report-data', 'report-methods', 'report-accuracy', 'report-caution', 'report-provenance'].map(
      (id) => html.indexOf(`data-testid="${id}"`),
    );
    expect(order.every((x) => x > 0)).toBe(true);
    expect([...order].sort((a, b) => a - b)).toEqual(order);
    expect(html).not.toContain('data-testid="report-intervals"');
    expect(html).toContain('1 row has fewer than 2 observed values: “Taster 4”.');
    expect(dataBlock(html).thin).toEqual({ below: 2, rows: ['Taster 4'], cols: [] });
  });

  it('shows the export’s caution in its own words, in two parts', () => {
    expect(`${MODEL_ESTIMATE_CAUTION} ${PEOPLE_JUDGED_CAUTION}`).toBe(ESTIMATE_CAUTION);
    const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/'/g, '&#39;');
    expect(html).toContain(`data-testid="report-caution">${esc(MODEL_ESTIMATE_CAUTION)}</p>`);
    expect(html).toContain(`data-testid="report-people-caution">${esc(PEOPLE_JUDGED_CAUTION)}</p>`);
  });

  it('lists the exports, the seed and the input hash in the provenance', () => {
    expect(html).toContain('/out/tasting filled.csv');
    expect(html).toContain('/out/tasting filled.settings.json');
    expect(html).toContain(`data-testid="report-sha256">${'f'.repeat(64)}</code>`);
    expect(html).toContain('data-testid="report-seed">1</span>');
  });

  it('keeps the run’s settings and errors in the data block, the first evaluation row being the run itself', () => {
    const d = dataBlock(html);
    const input = reportInput();
    expect((d.run as { settings: unknown }).settings).toEqual(input.run.settings);
    const ev = d.evaluation as { table: { settings: unknown; meanRmse: number }[] };
    expect(ev.table[0].settings).toEqual(input.run.settings);
    expect(ev.table.map((r) => (r.settings as { rank: number }).rank)).toEqual([2, 0, 0, 0]);
    expect(typeof d.methods).toBe('string');
    expect(html).toContain(`data-testid="report-methods-paragraph">`);
  });

  it('adds an intervals section between the errors and the cautions when the run carries intervals', () => {
    const withIntervals = buildReport(
      reportInput({
        intervals: {
          method: 'prediction interval',
          sources: ['Someone (2000). A source.'],
          level: 0.8,
          coverage: 0.81,
          meanWidth: 1.5,
        },
      }),
    );
    const at = (id: string) => withIntervals.indexOf(`data-testid="${id}"`);
    expect(at('report-intervals')).toBeGreaterThan(at('report-accuracy'));
    expect(at('report-intervals')).toBeLessThan(at('report-caution'));
    expect(withIntervals).toContain('4. How far each filled value may be off');
    expect(withIntervals).toContain('5. Reading the filled values');
    expect(withIntervals).toContain('81.0 % of held-out ratings fell inside their interval');
  });

  it('draws the centering comparison and the tuning chart only when they were run', () => {
    expect(html).not.toContain('data-testid="report-centering"');
    const m = sampleMatrix();
    const base = defaultLowRankSettings();
    const centering = tuneToPayload(
      tune(m, { settings: (['none', 'row', 'column', 'both'] as const).map((c) => ({ ...base, centering: c })) }, 5, 1),
    );
    const tuning = tuneToPayload(tune(m, { ranks: [0, 1, 2], lambdas: [1, 10], centerings: ['both'] }, 5, 1));
    const full = buildReport(reportInput({ centering, tuning }));
    expect(full).toContain('data-testid="report-centering"');
    expect(full).toContain('data-testid="report-centering-chart"');
    expect(full).toContain('data-testid="report-tuning-chart"');
    // One line per λ in the tuning chart: two paths.
    const chart = /data-testid="report-tuning-chart"[\s\S]*?<\/svg>/.exec(full)![0];
    expect(chart.match(/<path d="M/g)?.length).toBe(2 + 1); // two lines + the one-SE diamond
  });
});
