/**
 * The objective per iteration, drawn live while a fit runs (uPlot): a log scale for
 * the low-rank objective, a linear one for the Gaussian model's log-likelihood.
 */
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { axisStyle, chartColours } from './chartStyle';

export class ObjectiveChart {
  private plot: uPlot;
  /** Log scale for a positive objective; a log-likelihood (negative) is drawn on a linear scale. */
  private logScale = true;

  constructor(
    private readonly host: HTMLElement,
    private readonly width = 290,
    private readonly height = 150,
  ) {
    this.plot = this.build();
  }

  private build(): uPlot {
    const { width, height, host } = this;
    return new uPlot(
      {
        width,
        height,
        legend: { show: false },
        cursor: { show: false },
        scales: { x: { time: false }, y: { distr: this.logScale ? 3 : 1 } },
        axes: [
          { ...axisStyle, label: 'iteration', size: 36 },
          { ...axisStyle, label: this.logScale ? 'objective' : 'log-likelihood', size: 52, values: (_u, vals) => vals.map((v) => (v === null ? '' : formatCompact(v))) },
        ],
        series: [{}, { stroke: chartColours.accent, width: 2, points: { show: false } }],
      },
      [[], []],
      host,
    );
  }

  set(iterations: number[], objective: number[]): void {
    const finite = objective.filter((v) => Number.isFinite(v));
    const wantLog = finite.every((v) => v > 0);
    if (wantLog !== this.logScale) {
      this.logScale = wantLog;
      this.plot.destroy();
      this.plot = this.build();
    }
    this.plot.setData([iterations, objective.map((v) => (Number.isFinite(v) && (!wantLog || v > 0) ? v : null))] as uPlot.AlignedData);
    // How many points are drawn (for tests and assistive checks; the canvas itself says nothing).
    this.host.dataset.points = String(iterations.length);
  }

  destroy(): void {
    this.plot.destroy();
  }
}

export function formatCompact(v: number): string {
  const a = Math.abs(v);
  if (a >= 1e6) return `${(v / 1e6).toPrecision(3)}M`;
  if (a >= 1e3) return `${(v / 1e3).toPrecision(3)}k`;
  return v.toPrecision(3);
}
