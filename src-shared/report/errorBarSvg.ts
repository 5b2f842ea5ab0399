/**
 * Mean error per setting with its fold spread, drawn like the window's centering chart:
 * a whisker for mean ± 1 sd, a small open circle per fold, a filled dot for the mean; the
 * highlighted item (best, or "this model") in the "best" colour with a ring and a label.
 */
import { esc, fmt, tag } from './html';
import { chartColours } from './palette';
import { paddedRange, plotWidth, svg, text, yAxis, yScale, type Frame } from './svgFrame';

export interface ErrorBarItem {
  label: string;
  mean: number;
  sd: number;
  folds: number[];
  highlight: boolean;
}

export function errorBarSvg(items: ErrorBarItem[], yLabel: string, highlightWord: string, testid: string): string {
  const f: Frame = { width: 640, height: 200, left: 52, right: 10, top: 18, bottom: 30 };
  const all: number[] = [];
  for (const it of items) {
    all.push(...it.folds);
    if (Number.isFinite(it.sd)) all.push(it.mean - it.sd, it.mean + it.sd);
    all.push(it.mean);
  }
  const [lo, hi] = paddedRange(all);
  const y = yScale(f, lo, hi);
  const slot = plotWidth(f) / Math.max(1, items.length);
  let body = yAxis(f, lo, hi, 2, yLabel);
  items.forEach((it, k) => {
    const cx = f.left + (k + 0.5) * slot;
    const ink = it.highlight ? chartColours.best : chartColours.accent;
    body += text(cx, f.height - 10, it.label, {
      'text-anchor': 'middle',
      fill: it.highlight ? chartColours.best : chartColours.ink,
    });
    if (!Number.isFinite(it.mean)) {
      body += text(cx, f.top + 20, 'failed', { 'text-anchor': 'middle' });
      return;
    }
    if (Number.isFinite(it.sd)) {
      body += tag('line', {
        x1: cx,
        x2: cx,
        y1: y(it.mean - it.sd),
        y2: y(it.mean + it.sd),
        stroke: ink,
        'stroke-width': 1.5,
      });
      for (const yy of [it.mean - it.sd, it.mean + it.sd])
        body += tag('line', { x1: cx - 6, x2: cx + 6, y1: y(yy), y2: y(yy), stroke: ink, 'stroke-width': 1.5 });
    }
    it.folds.forEach((v, t) => {
      if (!Number.isFinite(v)) return;
      const dx = 14 + (t % 2) * 5;
      body += tag('circle', {
        cx: cx + dx,
        cy: y(v),
        r: 2.6,
        fill: 'none',
        stroke: chartColours.inkSoft,
        'stroke-width': 1,
      });
    });
    body += tag(
      'circle',
      { cx, cy: y(it.mean), r: 4, fill: ink },
      tag('title', {}, esc(`${it.label}: mean ${fmt(it.mean)}, sd ${fmt(it.sd)}`)),
    );
    if (it.highlight) {
      body += tag('circle', { cx, cy: y(it.mean), r: 8, fill: 'none', stroke: chartColours.best, 'stroke-width': 1.5 });
      body += text(cx - 12, y(it.mean) - 8, highlightWord, {
        'text-anchor': 'end',
        fill: chartColours.best,
        'font-weight': 600,
      });
    }
  });
  const label = `${yLabel} per setting: ${items.map((i) => `${i.label} ${fmt(i.mean)}${i.highlight ? ` (${highlightWord})` : ''}`).join(', ')}`;
  return svg(f, label, body, testid);
}
