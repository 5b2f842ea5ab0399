/**
 * The workbench's colours, shared by the window's charts (src-renderer/charts/chartStyle.ts
 * re-exports them) and the static study report, so both draw with the same inks.
 */
export const chartColours = {
  ink: '#22262b',
  inkSoft: '#5b6169',
  grid: '#e4dfd1',
  accent: '#1f7a74',
  estimate: '#c57a2c',
  best: '#b2402c',
  series: ['#1f7a74', '#c57a2c', '#3a60a0', '#8a4f8f', '#5d7f2e', '#b2402c'],
} as const;

/** Page colours of the workbench's style sheet (src-renderer/styles/app.css). */
export const pageColours = {
  paper: '#fbfaf6',
  paperDeep: '#f1ede2',
  rule: '#ddd7c8',
  estimateInk: '#9a5b17',
  warn: '#a23b2a',
} as const;

/** The dash patterns that tell centering modes apart in the tuning chart. */
export const LINE_DASHES: readonly (readonly number[])[] = [[], [6, 4], [2, 3], [9, 3, 2, 3]];
