/**
 * Mean cross-validated error against rank, one line per (λ, centering), with
 * the best point (ring) and the one-standard-error choice (diamond) marked and
 * the one-SE threshold as a dashed line (uPlot; marks in a draw hook). Colour
 * tells the λ apart, the dash pattern the centering; the legend is our own,
 * drawn under the chart.
 */
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { LINE_DASHES } from '../../src-shared/report/palette';
import { axisStyle, chartColours, chartFont } from './chartStyle';

interface RankLine {
  label: string;
  /** Index into the colour list (e.g. the λ's position). */
  colour: number;
  /** Index into the dash list (e.g. the centering's position). */
  dash: number;
  /** One value per rank (NaN = no point). */
  values: number[];
}

interface RankMark {
  rank: number;
  value: number;
}

export interface RankChartInput {
  ranks: number[];
  lines: RankLine[];
  best: RankMark | null;
  oneSE: RankMark | null;
  threshold: number;
}

const DASHES = LINE_DASHES;

function lineColour(i: number): string {
  return chartColours.series[i % chartColours.series.length];
}

function lineDash(i: number): number[] {
  return [...DASHES[i % DASHES.length]];
}

export class RankErrorChart {
  private plot: uPlot | null = null;
  private input: RankChartInput | null = null;
  private readonly plotHost: HTMLElement;
  private readonly legend: HTMLElement;

  constructor(
    private readonly host: HTMLElement,
    private readonly height = 210,
  ) {
    this.plotHost = document.createElement('div');
    this.plotHost.setAttribute('role', 'img');
    this.legend = document.createElement('div');
    this.legend.className = 'rf-chart-legend';
    host.append(this.plotHost, this.legend);
  }

  set(input: RankChartInput): void {
    this.input = input;
    this.plot?.destroy();
    const width = Math.max(220, this.host.clientWidth || 300);
    const px = uPlot.pxRatio;
    this.plotHost.setAttribute(
      'aria-label',
      `Mean RMSE against rank for ${input.lines.length} line(s)` +
        (input.best ? `; best at rank ${input.best.rank} (${input.best.value.toFixed(3)})` : '') +
        (input.oneSE ? `; one-standard-error choice at rank ${input.oneSE.rank}` : ''),
    );
    const ranks = input.ranks;
    this.plot = new uPlot(
      {
        width,
        height: this.height,
        legend: { show: false },
        cursor: { show: false },
        scales: {
          x: { time: false, range: () => [Math.min(...ranks) - 0.4, Math.max(...ranks) + 0.4] },
          y: { range: () => this.yRange() },
        },
        axes: [
          {
            ...axisStyle,
            label: 'rank',
            size: 26,
            labelSize: 16,
            splits: () => ranks,
            values: (_u, s) => s.map((v) => String(v)),
          },
          { ...axisStyle, label: 'mean RMSE', size: 48, values: (_u, vals) => vals.map((v) => v.toFixed(2)) },
        ],
        series: [
          {},
          ...input.lines.map((l) => ({
            stroke: lineColour(l.colour),
            width: 1.75,
            dash: lineDash(l.dash).map((d) => d * px),
            spanGaps: true,
            points: { show: true, size: 5, fill: lineColour(l.colour), stroke: lineColour(l.colour) },
          })),
        ],
        hooks: { draw: [(u) => this.drawMarks(u)] },
      },
      [ranks, ...input.lines.map((l) => l.values.map((v) => (Number.isFinite(v) ? v : null)))] as uPlot.AlignedData,
      this.plotHost,
    );
    this.renderLegend(input);
  }

  private yRange(): [number, number] {
    let lo = Infinity;
    let hi = -Infinity;
    const input = this.input;
    if (input) {
      for (const l of input.lines)
        for (const v of l.values)
          if (Number.isFinite(v)) {
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
          }
      if (Number.isFinite(input.threshold)) hi = Math.max(hi, input.threshold);
    }
    if (!Number.isFinite(lo)) return [0, 1];
    const pad = Math.max((hi - lo) * 0.12, 0.01);
    // Extra room under the lowest point for the "best" label.
    return [Math.max(0, lo - 2.2 * pad), hi + pad];
  }

  private drawMarks(u: uPlot): void {
    const input = this.input;
    if (!input) return;
    const ctx = u.ctx;
    const px = uPlot.pxRatio;
    const { left, top, width, height } = u.bbox;
    ctx.save();
    ctx.beginPath();
    ctx.rect(left, top, width, height);
    ctx.clip();
    ctx.font = chartFont.replace(/^(\d+)px/, (_m, n: string) => `bold ${Number(n) * px}px`);
    ctx.textBaseline = 'bottom';
    if (Number.isFinite(input.threshold)) {
      const y = u.valToPos(input.threshold, 'y', true);
      ctx.strokeStyle = chartColours.best;
      ctx.globalAlpha = 0.55;
      ctx.lineWidth = 1 * px;
      ctx.setLineDash([3 * px, 3 * px]);
      ctx.beginPath();
      ctx.moveTo(left, y);
      ctx.lineTo(left + width, y);
      ctx.stroke();
      ctx.setLineDash([]);
      ctx.globalAlpha = 1;
    }
    const same =
      input.best && input.oneSE && input.best.rank === input.oneSE.rank && input.best.value === input.oneSE.value;
    if (input.best && Number.isFinite(input.best.value)) {
      const x = u.valToPos(input.best.rank, 'x', true);
      const y = u.valToPos(input.best.value, 'y', true);
      ctx.strokeStyle = chartColours.best;
      ctx.lineWidth = 2 * px;
      ctx.beginPath();
      ctx.arc(x, y, 7 * px, 0, Math.PI * 2);
      ctx.stroke();
      // Label under the ring (lines usually reach the best point from above); above it near the bottom edge.
      ctx.fillStyle = chartColours.best;
      ctx.textAlign = 'center';
      const below = y + 22 * px < top + height;
      ctx.textBaseline = below ? 'top' : 'bottom';
      ctx.fillText(
        same ? 'best = 1-SE' : 'best',
        Math.min(Math.max(x, left + 30 * px), left + width - 30 * px),
        below ? y + 9 * px : y - 9 * px,
      );
    }
    if (input.oneSE && Number.isFinite(input.oneSE.value)) {
      const x = u.valToPos(input.oneSE.rank, 'x', true);
      const y = u.valToPos(input.oneSE.value, 'y', true);
      const r = 6 * px;
      ctx.strokeStyle = chartColours.ink;
      ctx.lineWidth = 1.75 * px;
      ctx.beginPath();
      ctx.moveTo(x, y - r);
      ctx.lineTo(x + r, y);
      ctx.lineTo(x, y + r);
      ctx.lineTo(x - r, y);
      ctx.closePath();
      ctx.stroke();
      if (!same) {
        // Label beside the diamond: to its left unless the point sits near the left edge.
        ctx.fillStyle = chartColours.ink;
        const leftSide = x > left + width * 0.3;
        ctx.textAlign = leftSide ? 'right' : 'left';
        ctx.textBaseline = 'middle';
        ctx.fillText('1-SE', x + (leftSide ? -9 : 9) * px, y + 4 * px);
      }
    }
    ctx.restore();
  }

  private renderLegend(input: RankChartInput): void {
    const items: HTMLElement[] = input.lines.map((l) => {
      const item = document.createElement('span');
      item.className = 'rf-chart-legend-item';
      item.append(swatch(lineColour(l.colour), lineDash(l.dash)), document.createTextNode(l.label));
      return item;
    });
    const marks = document.createElement('span');
    marks.className = 'rf-chart-legend-item rf-chart-legend-marks';
    marks.textContent = '○ best · ◇ simpler choice within one standard error (1-SE) · dashed: best + 1 SE';
    this.legend.replaceChildren(...items, marks);
  }

  destroy(): void {
    this.plot?.destroy();
    this.plot = null;
    this.legend.replaceChildren();
  }
}

/** A short sample of a line, drawn with the same colour and dash as on the chart. */
function swatch(colour: string, dash: number[]): HTMLCanvasElement {
  const c = document.createElement('canvas');
  const px = uPlot.pxRatio;
  c.width = 26 * px;
  c.height = 10 * px;
  c.style.width = '26px';
  c.style.height = '10px';
  c.className = 'rf-chart-swatch';
  const ctx = c.getContext('2d');
  if (ctx) {
    ctx.strokeStyle = colour;
    ctx.lineWidth = 2 * px;
    ctx.setLineDash(dash.map((d) => d * px));
    ctx.beginPath();
    ctx.moveTo(0, 5 * px);
    ctx.lineTo(26 * px, 5 * px);
    ctx.stroke();
  }
  return c;
}
