/**
 * The report's one style sheet, inline in its <head>: the workbench's paper, inks and
 * fonts (system fonts only — nothing is fetched), and print rules so the page prints to
 * A4 or Letter with its figures and tables kept whole.
 */
import { chartColours, pageColours } from './palette';

export const REPORT_CSS = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
html { background: ${pageColours.paperDeep}; }
body { margin: 0; color: ${chartColours.ink}; font-family: "IBM Plex Sans", "Segoe UI", Ubuntu, Cantarell, "DejaVu Sans", sans-serif; font-size: 14px; line-height: 1.5; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
.rf-report { max-width: 780px; margin: 24px auto; padding: 28px 36px 36px; background: ${pageColours.paper}; border: 1px solid ${pageColours.rule}; }
header { border-bottom: 2px solid ${chartColours.accent}; padding-bottom: 10px; margin-bottom: 14px; }
.rf-kicker { margin: 0; color: ${chartColours.accent}; font-weight: 600; letter-spacing: 0.06em; text-transform: uppercase; font-size: 11.5px; }
h1 { margin: 2px 0 4px; font-size: 24px; line-height: 1.2; }
h2 { margin: 26px 0 8px; font-size: 17px; border-bottom: 1px solid ${pageColours.rule}; padding-bottom: 3px; break-after: avoid; }
h3 { margin: 16px 0 6px; font-size: 14px; color: ${chartColours.inkSoft}; break-after: avoid; }
p { margin: 6px 0; }
.rf-sub, .rf-hint, figcaption { color: ${chartColours.inkSoft}; }
.rf-hint, figcaption { font-size: 12.5px; }
.rf-banner { margin: 10px 0 4px; padding: 7px 10px; border-left: 4px solid ${pageColours.estimateInk}; background: #f6ecd9; color: #5e3a0f; font-weight: 600; }
.rf-caution { padding: 8px 11px; border-left: 4px solid ${pageColours.estimateInk}; background: #f6ecd9; color: #4a300c; }
.rf-caution.rf-people { border-left-color: ${pageColours.warn}; background: #f8e3de; color: #5a1d12; }
.rf-methods { padding: 10px 12px; background: #fff; border: 1px solid ${pageColours.rule}; font-family: Georgia, "DejaVu Serif", serif; font-size: 14px; line-height: 1.55; }
ol.rf-refs { font-size: 12.5px; padding-left: 20px; color: ${chartColours.inkSoft}; }
dl.rf-facts { display: grid; grid-template-columns: max-content 1fr; gap: 3px 16px; margin: 8px 0; }
dl.rf-facts dt { color: ${chartColours.inkSoft}; }
dl.rf-facts dd { margin: 0; overflow-wrap: anywhere; }
code, .rf-mono { font-family: "IBM Plex Mono", "DejaVu Sans Mono", Menlo, monospace; font-size: 12px; overflow-wrap: anywhere; }
figure { margin: 10px 0 14px; break-inside: avoid; }
svg.rf-chart { display: block; max-width: 100%; height: auto; }
table { border-collapse: collapse; width: 100%; margin: 8px 0; font-variant-numeric: tabular-nums; break-inside: avoid; }
th, td { text-align: left; padding: 3px 8px 3px 0; border-bottom: 1px solid ${pageColours.rule}; vertical-align: top; }
th { color: ${chartColours.inkSoft}; font-weight: 600; font-size: 12.5px; }
td.rf-num, th.rf-num { text-align: right; }
tr.rf-mark td { color: ${chartColours.best}; font-weight: 600; }
.rf-folds { display: block; font-size: 11px; color: ${chartColours.inkSoft}; font-weight: 400; }
table.rf-small { font-size: 12px; }
.rf-legend { display: flex; flex-wrap: wrap; gap: 4px 14px; font-size: 12px; color: ${chartColours.inkSoft}; margin-top: 4px; }
.rf-legend-item { display: inline-flex; align-items: center; gap: 5px; }
.rf-thin { color: ${pageColours.warn}; }
.rf-two { display: grid; grid-template-columns: 1fr; gap: 4px; }
footer { margin-top: 28px; font-size: 11.5px; color: ${chartColours.inkSoft}; border-top: 1px solid ${pageColours.rule}; padding-top: 6px; }
@page { margin: 14mm 13mm 16mm; }
@media print {
  html, body { background: #fff; }
  body { font-size: 10.5pt; }
  .rf-report { max-width: none; margin: 0; padding: 0; border: none; background: #fff; }
  h2 { margin-top: 18px; }
  section { break-inside: auto; }
  a { color: inherit; text-decoration: none; }
}
`;
