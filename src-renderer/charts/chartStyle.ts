/** Colours and fonts the charts share with the rest of the workbench. */
export const chartColours = {
  ink: '#22262b',
  inkSoft: '#5b6169',
  grid: '#e4dfd1',
  accent: '#1f7a74',
  estimate: '#c57a2c',
  best: '#b2402c',
  series: ['#1f7a74', '#c57a2c', '#3a60a0', '#8a4f8f', '#5d7f2e', '#b2402c'],
} as const;

export const chartFont = '11px "IBM Plex Sans", "Segoe UI", Ubuntu, sans-serif';

export const axisStyle = {
  stroke: chartColours.inkSoft,
  font: chartFont,
  labelFont: chartFont,
  grid: { stroke: chartColours.grid, width: 1 },
  ticks: { stroke: chartColours.grid, width: 1 },
};
