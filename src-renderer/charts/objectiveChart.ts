/**
 * How a fit converges, drawn live while it runs (uPlot): the relative change of the
 * objective (low-rank) or of the log-likelihood (Gaussian) from one iteration to the next,
 *   r_t = |f_t − f_{t−1}| / max(|f_{t−1}|, tiny),
 * on a log scale. The objective itself moves by a fraction of a percent after the first
 * iterations and looks flat on any axis; its relative change falls by decades until it
 * passes the tolerance, so settling can be seen. The first iteration has no change to show.
 */
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { axisStyle, chartColours } from './chartStyle';
import { relativeChanges } from './relativeChange';

export class ObjectiveChart {
  private plot: uPlot;

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
        scales: { x: { time: false }, y: { distr: 3 } },
        axes: [
          { ...axisStyle, label: 'iteration', size: 36 },
          {
            ...axisStyle,
            label: 'relative change',
            size: 52,
            values: (_u, vals) => vals.map((v) => (v === null ? '' : v.toExponential(0))),
          },
        ],
        series: [{}, { stroke: chartColours.accent, width: 2, points: { show: false } }],
      },
      [[], []],
      host,
    );
  }

  set(iterations: number[], objective: number[]): void {
    this.plot.setData([iterations, relativeChanges(objective)] as uPlot.AlignedData);
    // How many points are drawn (for tests and assistive checks; the canvas itself says nothing).
    this.host.dataset.points = String(iterations.length);
  }

  destroy(): void {
    this.plot.destroy();
  }
}
