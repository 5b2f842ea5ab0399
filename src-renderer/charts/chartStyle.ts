/** Colours and fonts the charts share with the rest of the workbench. */
import { chartColours } from '../../src-shared/report/palette';

export { chartColours };

export const chartFont = '11px "IBM Plex Sans", "Segoe UI", Ubuntu, sans-serif';

export const axisStyle = {
  stroke: chartColours.inkSoft,
  font: chartFont,
  labelFont: chartFont,
  grid: { stroke: chartColours.grid, width: 1 },
  ticks: { stroke: chartColours.grid, width: 1 },
};
