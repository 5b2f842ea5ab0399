/**
 * The tuning chart, as in the window: mean cross-validated RMSE against rank, one line per
 * (λ, centering) — colour tells the λ, the dash pattern the centering — with the best point
 * ringed in red, the one-standard-error choice as a black diamond, and the one-SE threshold
 * as a dashed red line. The legend is HTML under the chart.
 */
import type { TunePayload } from '../api';
import type { Centering } from '../engine/types';
import { esc, fmt, round, tag } from './html';
import { chartColours, LINE_DASHES } from './palette';
import { CENTERING_SHORT } from './settingsWords';
import { paddedRange, plotWidth, svg, text, yAxis, yScale, type Frame } from './svgFrame';

interface Line {
  lambda: number;
  centering: Centering;
  colour: string;
  dash: string;
  values: number[];
}

const num = (x: number | null | undefined): number => (x === null || x === undefined ? NaN : x);

function lines(t: TunePayload): { ranks: number[]; lines: Line[] } {
  const ranks = [...new Set(t.table.flatMap((r) => (r.settings.model === 'lowrank' ? [r.settings.rank] : [])))].sort(
    (a, b) => a - b,
  );
  const lambdas: number[] = [];
  const centerings: Centering[] = [];
  const out = new Map<string, Line>();
  for (const r of t.table) {
    const s = r.settings;
    if (s.model !== 'lowrank') continue;
    if (!lambdas.includes(s.lambda)) lambdas.push(s.lambda);
    if (!centerings.includes(s.centering)) centerings.push(s.centering);
    const key = `${s.lambda}|${s.centering}`;
    let l = out.get(key);
    if (!l) {
      l = {
        lambda: s.lambda,
        centering: s.centering,
        colour: chartColours.series[lambdas.indexOf(s.lambda) % chartColours.series.length],
        dash: LINE_DASHES[centerings.indexOf(s.centering) % LINE_DASHES.length].join(' '),
        values: ranks.map(() => NaN),
      };
      out.set(key, l);
    }
    l.values[ranks.indexOf(s.rank)] = num(r.meanRmse);
  }
  return { ranks, lines: [...out.values()] };
}

export function rankChartSvg(t: TunePayload, testid: string): { svg: string; legend: string } {
  const { ranks, lines: ls } = lines(t);
  const f: Frame = { width: 640, height: 230, left: 52, right: 14, top: 14, bottom: 34 };
  const threshold = num(t.threshold);
  const [lo, hi] = paddedRange([...ls.flatMap((l) => l.values), threshold]);
  const y = yScale(f, lo, hi);
  const rMin = ranks[0] ?? 0;
  const rMax = ranks[ranks.length - 1] ?? 1;
  const x = (r: number) => f.left + (rMax === rMin ? plotWidth(f) / 2 : ((r - rMin) / (rMax - rMin)) * plotWidth(f));
  let body = yAxis(f, lo, hi, 3, 'mean RMSE');
  for (const r of ranks) body += text(x(r), f.height - 18, String(r), { 'text-anchor': 'middle' });
  body += text(f.left + plotWidth(f) / 2, f.height - 4, 'rank', { 'text-anchor': 'middle' });
  if (Number.isFinite(threshold)) {
    body += tag('line', {
      x1: f.left,
      x2: f.width - f.right,
      y1: y(threshold),
      y2: y(threshold),
      stroke: chartColours.best,
      'stroke-width': 1,
      'stroke-dasharray': '5 4',
    });
  }
  for (const l of ls) {
    let d = '';
    let pen = false;
    l.values.forEach((v, k) => {
      if (!Number.isFinite(v)) {
        pen = false;
        return;
      }
      d += `${pen ? 'L' : 'M'}${round(x(ranks[k]))} ${round(y(v))}`;
      pen = true;
    });
    if (d)
      body += tag('path', {
        d,
        fill: 'none',
        stroke: l.colour,
        'stroke-width': 1.8,
        'stroke-dasharray': l.dash || undefined,
      });
    l.values.forEach((v, k) => {
      if (Number.isFinite(v)) body += tag('circle', { cx: x(ranks[k]), cy: y(v), r: 2.4, fill: l.colour });
    });
  }
  const mark = (index: number) => {
    const r = t.table[index];
    return r && r.settings.model === 'lowrank' && Number.isFinite(num(r.meanRmse))
      ? { x: x(r.settings.rank), y: y(num(r.meanRmse)) }
      : null;
  };
  const best = mark(t.bestIndex);
  if (best)
    body += tag('circle', { cx: best.x, cy: best.y, r: 7, fill: 'none', stroke: chartColours.best, 'stroke-width': 2 });
  const se = mark(t.oneStandardErrorIndex);
  if (se)
    body += tag('path', {
      d: `M${round(se.x)} ${round(se.y - 6)}L${round(se.x + 6)} ${round(se.y)}L${round(se.x)} ${round(se.y + 6)}L${round(se.x - 6)} ${round(se.y)}Z`,
      fill: chartColours.ink,
    });
  const label = `Mean cross-validated RMSE against rank, ${ls.length} line${ls.length === 1 ? '' : 's'}; best and one-standard-error choice marked`;
  const several = new Set(ls.map((l) => l.centering)).size > 1;
  const swatch = (colour: string, dash: string) =>
    tag(
      'svg',
      { width: 26, height: 10, viewBox: '0 0 26 10', 'aria-hidden': 'true' },
      tag('line', {
        x1: 1,
        x2: 25,
        y1: 5,
        y2: 5,
        stroke: colour,
        'stroke-width': 2,
        'stroke-dasharray': dash || undefined,
      }),
    );
  const items = ls.map((l) =>
    tag(
      'span',
      { class: 'rf-legend-item' },
      swatch(l.colour, l.dash),
      esc(`λ ${l.lambda}${several ? `, ${CENTERING_SHORT[l.centering]}` : ''}`),
    ),
  );
  items.push(
    tag(
      'span',
      { class: 'rf-legend-item' },
      tag(
        'svg',
        { width: 14, height: 14, viewBox: '0 0 14 14', 'aria-hidden': 'true' },
        tag('circle', { cx: 7, cy: 7, r: 5.5, fill: 'none', stroke: chartColours.best, 'stroke-width': 2 }),
      ),
      'best',
    ),
    tag(
      'span',
      { class: 'rf-legend-item' },
      tag(
        'svg',
        { width: 14, height: 14, viewBox: '0 0 14 14', 'aria-hidden': 'true' },
        tag('path', { d: 'M7 1L13 7L7 13L1 7Z', fill: chartColours.ink }),
      ),
      'one-SE choice',
    ),
    tag(
      'span',
      { class: 'rf-legend-item' },
      swatch(chartColours.best, '5 4'),
      esc(`one-SE threshold (${fmt(threshold)})`),
    ),
  );
  return { svg: svg(f, label, body, testid), legend: tag('div', { class: 'rf-legend' }, ...items) };
}
