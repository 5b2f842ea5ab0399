/**
 * Observed cells per row (or per column) as a small bar chart. Up to 80 rows: one bar
 * each, labelled when there is room, with the exact count in each bar's tooltip. More
 * rows: a histogram — how many rows have 0, 1, 2, … observed cells (counts grouped into
 * at most 40 equal bins).
 */
import { count, esc, tag } from './html';
import { chartColours, pageColours } from './palette';
import { plotHeight, plotWidth, svg, text, yAxis, yScale, type Frame } from './svgFrame';

const MAX_BARS = 80;
const MAX_BINS = 40;

/** Long labels keep their start and their end ("Submi…sion 12"), since labels often differ only at the end. */
export function shortLabel(label: string): string {
  return label.length > 12 ? `${label.slice(0, 5)}…${label.slice(-6)}` : label;
}

export function countChartSvg(
  counts: Int32Array,
  labels: string[],
  what: 'row' | 'column',
  total: number,
  thinBelow: number,
  testid: string,
): string {
  return counts.length <= MAX_BARS
    ? barsSvg(counts, labels, what, total, thinBelow, testid)
    : histogramSvg(counts, what, total, thinBelow, testid);
}

function barsSvg(
  counts: Int32Array,
  labels: string[],
  what: string,
  total: number,
  thinBelow: number,
  testid: string,
): string {
  const n = counts.length;
  const labelled = n <= 40;
  const f: Frame = {
    width: 640,
    height: labelled ? 170 : 130,
    left: 42,
    right: 8,
    top: 10,
    bottom: labelled ? 58 : 22,
  };
  const y = yScale(f, 0, Math.max(1, total));
  const slot = plotWidth(f) / Math.max(1, n);
  const bw = Math.max(1, slot * 0.72);
  let body = yAxis(f, 0, Math.max(1, total), 0, 'observed', 3);
  for (let i = 0; i < n; i++) {
    const x = f.left + i * slot + (slot - bw) / 2;
    const thin = counts[i] < thinBelow;
    const top = y(counts[i]);
    body += tag(
      'rect',
      {
        x,
        y: top,
        width: bw,
        height: Math.max(0, f.top + plotHeight(f) - top),
        fill: thin ? pageColours.warn : chartColours.accent,
      },
      tag('title', {}, esc(`${labels[i]}: ${counts[i]} of ${total} observed${thin ? ' (thin)' : ''}`)),
    );
    if (thin && counts[i] === 0)
      body += tag('rect', { x, y: f.top + plotHeight(f) - 2, width: bw, height: 2, fill: pageColours.warn });
    if (labelled) {
      const lx = x + bw / 2;
      const ly = f.top + plotHeight(f) + 8;
      const short = shortLabel(labels[i]);
      body += text(lx, ly, short, {
        'text-anchor': 'end',
        transform: `rotate(-55 ${lx.toFixed(2)} ${ly})`,
        'font-size': 9.5,
      });
    }
  }
  if (!labelled)
    body += text(f.left + plotWidth(f) / 2, f.height - 6, `${count(n)} ${what}s, in order`, {
      'text-anchor': 'middle',
    });
  return svg(f, `Observed cells per ${what}, out of ${total}`, body, testid);
}

function histogramSvg(counts: Int32Array, what: string, total: number, thinBelow: number, testid: string): string {
  let maxCount = 0;
  for (const c of counts) maxCount = Math.max(maxCount, c);
  const width = Math.max(1, Math.ceil((maxCount + 1) / MAX_BINS));
  const bins = new Int32Array(Math.ceil((maxCount + 1) / width));
  for (const c of counts) bins[Math.floor(c / width)]++;
  let tallest = 1;
  for (const b of bins) tallest = Math.max(tallest, b);
  const f: Frame = { width: 640, height: 150, left: 48, right: 8, top: 10, bottom: 34 };
  const y = yScale(f, 0, tallest);
  const slot = plotWidth(f) / bins.length;
  let body = yAxis(f, 0, tallest, 0, `${what}s`, 3);
  for (let b = 0; b < bins.length; b++) {
    const lo = b * width;
    const hi = lo + width - 1;
    const top = y(bins[b]);
    body += tag(
      'rect',
      {
        x: f.left + b * slot + 0.5,
        y: top,
        width: Math.max(1, slot - 1),
        height: f.top + plotHeight(f) - top,
        fill: hi < thinBelow ? pageColours.warn : chartColours.accent,
      },
      tag(
        'title',
        {},
        esc(
          `${count(bins[b])} ${what}s with ${lo === hi ? lo : `${lo}–${hi}`} observed cells${hi < thinBelow ? ' (thin)' : ''}`,
        ),
      ),
    );
  }
  const ticks = [0, Math.floor(bins.length / 2), bins.length - 1];
  for (const b of [...new Set(ticks)])
    body += text(f.left + (b + 0.5) * slot, f.top + plotHeight(f) + 13, String(b * width), { 'text-anchor': 'middle' });
  body += text(f.left + plotWidth(f) / 2, f.height - 4, `observed cells per ${what} (of ${count(total)})`, {
    'text-anchor': 'middle',
  });
  return svg(f, `How many ${what}s have how many observed cells`, body, testid);
}
