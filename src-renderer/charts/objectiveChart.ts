/**
 * The objective per iteration, drawn live while a fit runs (uPlot, log scale on y).
 */
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { axisStyle, chartColours } from './chartStyle';

export class ObjectiveChart {
  private readonly plot: uPlot;

  constructor(host: HTMLElement, width = 290, height = 150) {
    this.plot = new uPlot(
      {
        width,
        height,
        legend: { show: false },
        cursor: { show: false },
        scales: { x: { time: false }, y: { distr: 3 } },
        axes: [
          { ...axisStyle, label: 'iteration', size: 36 },
          { ...axisStyle, label: 'objective', size: 52, values: (_u, vals) => vals.map((v) => (v === null ? '' : formatCompact(v))) },
        ],
        series: [{}, { stroke: chartColours.accent, width: 2, points: { show: false } }],
      },
      [[], []],
      host,
    );
  }

  set(iterations: number[], objective: number[]): void {
    this.plot.setData([iterations, objective.map((v) => (v > 0 && Number.isFinite(v) ? v : null))] as uPlot.AlignedData);
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
