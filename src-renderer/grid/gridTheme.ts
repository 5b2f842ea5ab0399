/**
 * Rankfill's own look for the grid, set through the grid's theming API:
 * a warm paper background, ink-coloured numbers in a tabular figure style,
 * a slate header and a teal accent for the focused cell.
 */
import { themeQuartz } from 'ag-grid-community';

export const palette = {
  paper: '#fbfaf6',
  paperAlt: '#f4f1e8',
  ink: '#22262b',
  inkSoft: '#5b6169',
  rule: '#ddd7c8',
  header: '#e8e3d6',
  accent: '#1f7a74',
  accentSoft: 'rgba(31, 122, 116, 0.14)',
} as const;

export const rankfillGridTheme = themeQuartz.withParams({
  backgroundColor: palette.paper,
  foregroundColor: palette.ink,
  oddRowBackgroundColor: palette.paperAlt,
  headerBackgroundColor: palette.header,
  headerTextColor: palette.ink,
  headerFontWeight: 600,
  borderColor: palette.rule,
  accentColor: palette.accent,
  rangeSelectionBorderColor: palette.accent,
  rangeSelectionBackgroundColor: palette.accentSoft,
  rowHoverColor: 'rgba(31, 122, 116, 0.06)',
  fontFamily: ['"IBM Plex Sans"', '"Segoe UI"', 'Ubuntu', 'Cantarell', 'sans-serif'],
  cellFontFamily: ['"IBM Plex Mono"', '"DejaVu Sans Mono"', 'Menlo', 'monospace'],
  fontSize: 13,
  headerHeight: 34,
  rowHeight: 28,
  spacing: 6,
  wrapperBorderRadius: 4,
  columnBorder: { color: palette.rule, width: 1, style: 'solid' },
  pinnedColumnBorder: { color: palette.inkSoft, width: 1, style: 'solid' },
  cellEditingBorder: { color: palette.accent, width: 2, style: 'solid' },
});
