/**
 * Mean error per category with the spread of its folds (uPlot; the marks are
 * drawn in a draw hook): a vertical whisker for mean ± 1 sd, a small open dot
 * for each fold's value, a filled dot for the mean. The best category is drawn
 * in the "best" colour with a ring and a label.
 */
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { axisStyle, chartColours, chartFont } from './chartStyle';

export interface ErrorBarItem {
  label: string;
  mean: number;
  sd: number;
  /** Each fold's value (NaN entries are skipped). */
  folds: number[];
  best: boolean;
}

export class ErrorBarChart {
  private plot: uPlot | null = null;
  private items: ErrorBarItem[] = [];

  constructor(
    private readonly host: HTMLElement,
    private readonly yLabel = 'RMSE (held-out cells)',
    private readonly height = 190,
  ) {
    host.setAttribute('role', 'img');
  }

  set(items: ErrorBarItem[]): void {
    this.items = items;
    this.host.setAttribute(
      'aria-label',
      `${this.yLabel} per setting: ` +
        items
          .map((i) => `${i.label} ${Number.isFinite(i.mean) ? i.mean.toFixed(3) : 'failed'}${i.best ? ' (best)' : ''}`)
          .join(', '),
    );
    this.plot?.destroy();
    const width = Math.max(220, this.host.clientWidth || 300);
    const xs = items.map((_, i) => i);
    const means = items.map((i) => (Number.isFinite(i.mean) ? i.mean : null));
    this.plot = new uPlot(
      {
        width,
        height: this.height,
        legend: { show: false },
        cursor: { show: false },
        scales: {
          x: { time: false, range: () => [-0.5, Math.max(0, items.length - 1) + 0.5] },
          y: { range: () => this.yRange() },
        },
        axes: [
          {
            ...axisStyle,
            size: 30,
            splits: () => xs,
            values: (_u, splits) => splits.map((v) => items[v]?.label ?? ''),
            grid: { show: false },
          },
          { ...axisStyle, label: this.yLabel, size: 48, values: (_u, vals) => vals.map((v) => v.toFixed(2)) },
        ],
        series: [{}, { stroke: chartColours.accent, paths: () => null, points: { show: false } }],
        hooks: { draw: [(u) => this.drawMarks(u)] },
      },
      [xs, means] as uPlot.AlignedData,
      this.host,
    );
  }

  private yRange(): [number, number] {
    let lo = Infinity;
    let hi = -Infinity;
    for (const it of this.items) {
      const vals = [
        ...it.folds,
        it.mean - (Number.isFinite(it.sd) ? it.sd : 0),
        it.mean + (Number.isFinite(it.sd) ? it.sd : 0),
      ];
      for (const v of vals) {
        if (!Number.isFinite(v)) continue;
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    }
    if (!Number.isFinite(lo)) return [0, 1];
    const pad = Math.max((hi - lo) * 0.12, 0.01);
    return [Math.max(0, lo - pad), hi + 2 * pad];
  }

  private drawMarks(u: uPlot): void {
    const ctx = u.ctx;
    const px = uPlot.pxRatio;
    const { left, top, width, height } = u.bbox;
    ctx.save();
    ctx.beginPath();
    ctx.rect(left, top, width, height);
    ctx.clip();
    this.items.forEach((it, i) => {
      if (!Number.isFinite(it.mean)) return;
      const colour = it.best ? chartColours.best : chartColours.accent;
      const x = u.valToPos(i, 'x', true);
      const y = u.valToPos(it.mean, 'y', true);
      // Whisker: mean ± 1 sd.
      if (Number.isFinite(it.sd) && it.sd > 0) {
        const y0 = u.valToPos(it.mean - it.sd, 'y', true);
        const y1 = u.valToPos(it.mean + it.sd, 'y', true);
        const cap = 7 * px;
        ctx.strokeStyle = colour;
        ctx.lineWidth = 1.5 * px;
        ctx.beginPath();
        ctx.moveTo(x, y0);
        ctx.lineTo(x, y1);
        ctx.moveTo(x - cap, y0);
        ctx.lineTo(x + cap, y0);
        ctx.moveTo(x - cap, y1);
        ctx.lineTo(x + cap, y1);
        ctx.stroke();
      }
      // Folds: small open dots beside the whisker, spread sideways so they do not hide each other.
      const folds = it.folds.filter(Number.isFinite);
      ctx.strokeStyle = chartColours.inkSoft;
      ctx.lineWidth = 1 * px;
      folds.forEach((v, f) => {
        const dx = (16 + (f % 2) * 6) * px;
        ctx.beginPath();
        ctx.arc(x + dx, u.valToPos(v, 'y', true), 2.5 * px, 0, Math.PI * 2);
        ctx.stroke();
      });
      // Mean.
      ctx.fillStyle = colour;
      ctx.beginPath();
      ctx.arc(x, y, 4.5 * px, 0, Math.PI * 2);
      ctx.fill();
      if (it.best) {
        ctx.strokeStyle = chartColours.best;
        ctx.lineWidth = 1.5 * px;
        ctx.beginPath();
        ctx.arc(x, y, 8.5 * px, 0, Math.PI * 2);
        ctx.stroke();
        ctx.font = chartFont.replace(/^(\d+)px/, (_m, n: string) => `bold ${Number(n) * px}px`);
        // Label above the upper whisker cap (or the ring when there is no whisker).
        const top =
          Number.isFinite(it.sd) && it.sd > 0
            ? Math.min(u.valToPos(it.mean + it.sd, 'y', true), y - 8.5 * px)
            : y - 8.5 * px;
        ctx.textAlign = 'center';
        ctx.textBaseline = 'bottom';
        ctx.fillText('best', x, top - 3 * px);
      }
    });
    ctx.restore();
  }

  destroy(): void {
    this.plot?.destroy();
    this.plot = null;
  }
}
