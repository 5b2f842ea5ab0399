/**
 * Rankfill's own look for the grid, built on the grid's bare theme (no stock
 * theme underneath): a ledger on warm paper. Column labels in small capitals
 * over a heavy ink rule; hairline row rules with a cool grey band on every
 * other row (cool, so it never reads as the warm estimate tint); a teal
 * focus frame; dark tooltips. Estimates are styled in styles/app.css
 * (italic, their own colour, a corner notch, and a tint) — never by hue alone.
 */
import { createTheme, iconSetMaterial } from 'ag-grid-community';

export const palette = {
  paper: '#fbfaf6',
  /** Every other row: a cool grey, far in hue from the amber estimate tint. */
  band: '#f1f3f4',
  ink: '#22262b',
  inkSoft: '#5b6169',
  rule: '#ddd7c8',
  header: '#ece7da',
  accent: '#1f7a74',
  accentSoft: 'rgba(31, 122, 116, 0.14)',
} as const;

export const rankfillGridTheme = createTheme()
  .withPart(iconSetMaterial)
  .withParams({
    backgroundColor: palette.paper,
    foregroundColor: palette.ink,
    textColor: palette.ink,
    oddRowBackgroundColor: palette.band,
    headerBackgroundColor: palette.header,
    headerTextColor: palette.ink,
    headerFontWeight: 600,
    headerFontSize: 12,
    headerRowBorder: { color: palette.ink, width: 2, style: 'solid' },
    headerColumnBorder: { color: palette.rule, width: 1, style: 'solid' },
    headerColumnBorderHeight: '60%',
    headerCellHoverBackgroundColor: '#e3ddcd',
    borderColor: palette.rule,
    rowBorder: { color: '#e7e2d6', width: 1, style: 'solid' },
    columnBorder: { color: '#e7e2d6', width: 1, style: 'solid' },
    pinnedColumnBorder: { color: palette.inkSoft, width: 1, style: 'solid' },
    wrapperBorder: { color: '#c9c1ad', width: 1, style: 'solid' },
    wrapperBorderRadius: 2,
    accentColor: palette.accent,
    rangeSelectionBorderColor: palette.accent,
    rangeSelectionBackgroundColor: palette.accentSoft,
    rowHoverColor: 'rgba(31, 122, 116, 0.06)',
    focusShadow: { radius: 0, spread: 2, color: palette.accent },
    fontFamily: ['"IBM Plex Sans"', '"Segoe UI"', 'Ubuntu', 'Cantarell', 'sans-serif'],
    cellFontFamily: ['"IBM Plex Mono"', '"DejaVu Sans Mono"', 'Menlo', 'monospace'],
    fontSize: 13,
    headerHeight: 32,
    rowHeight: 27,
    spacing: 5,
    cellHorizontalPadding: 8,
    iconSize: 12,
    cellEditingBorder: { color: palette.accent, width: 2, style: 'solid' },
  });

/** The grid's own words where it would otherwise use its stock texts. */
export const gridLocaleText: Record<string, string> = {
  noRowsToShow: 'No ratings to show yet: open a sample set, bring in a file, or add a row.',
  noMatchingRows: 'No rows match.',
  loadingOoo: 'Reading…',
};
