/**
 * The missing pattern as a picture: one square per block of cells (see missingPattern.ts),
 * filled with the window's teal in proportion to the block's observed share (blank =
 * paper). Neighbouring blocks of the same shade in a row are drawn as one rectangle, so
 * the file stays small.
 */
import { tag } from './html';
import { chartColours, pageColours } from './palette';
import type { PatternMap } from './missingPattern';
import { svg, text, type Frame } from './svgFrame';

const LEVELS = 5;

function rgb(hex: string): number[] {
  return [1, 3, 5].map((k) => parseInt(hex.slice(k, k + 2), 16));
}

/** The fill of a block whose observed share rounds to level / LEVELS. */
function patternShade(level: number): string {
  if (level === 0) return pageColours.paper;
  // Mix the accent into paper: level LEVELS = full accent.
  const a = rgb(chartColours.accent);
  const p = rgb(pageColours.paper);
  const t = level / LEVELS;
  return `#${a
    .map((c, k) =>
      Math.round(p[k] + (c - p[k]) * t)
        .toString(16)
        .padStart(2, '0'),
    )
    .join('')}`;
}

/** How the map reads, for its caption. */
export function patternMapWords(map: PatternMap): string {
  return map.rowsPerBlock === 1 && map.colsPerBlock === 1
    ? 'Rows top to bottom, columns left to right, one square per cell: teal = observed, paper = blank.'
    : `Rows top to bottom, columns left to right, one square per block of ${map.rowsPerBlock} × ${map.colsPerBlock} cells: the darker the teal, the more of the block is observed; paper = nothing observed.`;
}

/** 0 only for a block with nothing observed; any observed cell shows. */
export function levelOf(share: number): number {
  return share <= 0 ? 0 : Math.max(1, Math.round(share * LEVELS));
}

export function patternMapSvg(map: PatternMap, rows: number, cols: number, testid: string): string {
  const maxW = 600;
  const maxH = 360;
  const cell = Math.max(2, Math.min(18, Math.floor(Math.min(maxW / map.blockCols, maxH / map.blockRows))));
  const w = cell * map.blockCols;
  const h = cell * map.blockRows;
  const f: Frame = { width: Math.max(w + 12, 200), height: h + 30, left: 6, right: 6, top: 6, bottom: 24 };
  let body = tag('rect', {
    x: f.left - 0.5,
    y: f.top - 0.5,
    width: w + 1,
    height: h + 1,
    fill: pageColours.paper,
    stroke: pageColours.rule,
  });
  for (let bi = 0; bi < map.blockRows; bi++) {
    let bj = 0;
    while (bj < map.blockCols) {
      const level = levelOf(map.share[bi * map.blockCols + bj]);
      let end = bj + 1;
      while (end < map.blockCols && levelOf(map.share[bi * map.blockCols + end]) === level) end++;
      if (level > 0)
        body += tag('rect', {
          x: f.left + bj * cell,
          y: f.top + bi * cell,
          width: (end - bj) * cell,
          height: cell,
          fill: patternShade(level),
        });
      bj = end;
    }
  }
  const blockWords = patternMapWords(map);
  // Legend: blank … observed.
  const lx = f.left;
  const ly = f.top + h + 8;
  body += text(lx, ly + 9, 'blank');
  for (let l = 0; l <= LEVELS; l++)
    body += tag('rect', {
      x: lx + 34 + l * 12,
      y: ly,
      width: 12,
      height: 10,
      fill: patternShade(l),
      stroke: pageColours.rule,
      'stroke-width': 0.5,
    });
  body += text(lx + 34 + (LEVELS + 1) * 12 + 5, ly + 9, 'observed');
  const label = `Map of observed (teal) and blank cells: ${rows} rows × ${cols} columns, ${blockWords}`;
  return svg(f, label, body, testid);
}
