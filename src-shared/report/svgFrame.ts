/**
 * The pieces every static chart of the report shares: an <svg> with a viewBox (so it
 * scales to the page and prints sharply), a y axis with round ticks and grid lines, and
 * the workbench's font and inks.
 */
import { esc, niceTicks, round, tag } from './html';
import { chartColours } from './palette';

const SVG_FONT = '"IBM Plex Sans", "Segoe UI", Ubuntu, Cantarell, sans-serif';

export interface Frame {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
}

export function plotWidth(f: Frame): number {
  return f.width - f.left - f.right;
}

export function plotHeight(f: Frame): number {
  return f.height - f.top - f.bottom;
}

/** An <svg> element; `label` is read by screen readers and shown as the figure's tooltip. */
export function svg(f: Frame, label: string, body: string, testid?: string): string {
  return tag(
    'svg',
    {
      xmlns: 'http://www.w3.org/2000/svg',
      viewBox: `0 0 ${f.width} ${f.height}`,
      width: f.width,
      height: f.height,
      role: 'img',
      'aria-label': label,
      'font-family': SVG_FONT,
      'font-size': 11,
      'data-testid': testid,
      class: 'rf-chart',
    },
    tag('title', {}, esc(label)),
    body,
  );
}

export function text(x: number, y: number, s: string, attrs: Record<string, string | number | undefined> = {}): string {
  return tag('text', { x, y, fill: chartColours.inkSoft, ...attrs }, esc(s));
}

/** y scale from [lo, hi] onto the plot area (top = hi). */
export function yScale(f: Frame, lo: number, hi: number): (v: number) => number {
  const h = plotHeight(f);
  const span = hi - lo || 1;
  return (v) => f.top + h - ((v - lo) / span) * h;
}

/** Grid lines and labels for round values in [lo, hi]; returns the markup and the ticks. */
export function yAxis(f: Frame, lo: number, hi: number, digits: number, label: string, n = 4): string {
  const y = yScale(f, lo, hi);
  let out = '';
  for (const t of niceTicks(lo, hi, n)) {
    if (t < lo - 1e-9 || t > hi + 1e-9) continue;
    out += tag('line', {
      x1: f.left,
      x2: f.width - f.right,
      y1: y(t),
      y2: y(t),
      stroke: chartColours.grid,
      'stroke-width': 1,
    });
    out += text(f.left - 5, y(t) + 3.5, t.toFixed(digits), { 'text-anchor': 'end' });
  }
  const cy = f.top + plotHeight(f) / 2;
  out += text(11, cy, label, { 'text-anchor': 'middle', transform: `rotate(-90 11 ${round(cy)})` });
  return out;
}

/** [lo, hi] around the finite values with a little air, or [0, 1] when there are none. */
export function paddedRange(values: number[], pad = 0.08): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0) return [0, 1];
  let lo = Math.min(...finite);
  let hi = Math.max(...finite);
  if (hi === lo) {
    lo -= 0.5;
    hi += 0.5;
  }
  const d = (hi - lo) * pad;
  return [lo - d, hi + d];
}
