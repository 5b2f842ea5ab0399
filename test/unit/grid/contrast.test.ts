/**
 * Measured contrast of the grid's colours, by the WCAG 2.1 definitions of
 * relative luminance and contrast ratio (W3C, "Web Content Accessibility
 * Guidelines 2.1", §1.4.3 and the glossary entries "relative luminance" and
 * "contrast ratio"). Text must reach 4.5 : 1 on every background it is drawn on,
 * the estimate's deepest tint included. The colours are read from the style
 * sheet and the tint function the page uses.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { palette } from '../../../src-renderer/grid/gridTheme';
import { estimateTint } from '../../../src-renderer/grid/overlayLayer';

type Rgb = [number, number, number];

const hex = (h: string): Rgb => {
  const m = /^#([0-9a-f]{6})$/i.exec(h.trim());
  if (!m) throw new Error(`not a colour: ${h}`);
  const n = parseInt(m[1], 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
};

/** An rgba() tint laid over an opaque background (source-over compositing). */
const over = (rgba: string, bg: Rgb): Rgb => {
  const m = /rgba\((\d+),\s*(\d+),\s*(\d+),\s*([\d.]+)\)/.exec(rgba);
  if (!m) throw new Error(`not rgba: ${rgba}`);
  const a = Number(m[4]);
  return [0, 1, 2].map((k) => Number(m[k + 1]) * a + bg[k] * (1 - a)) as Rgb;
};

const luminance = ([r, g, b]: Rgb) => {
  const lin = (c: number) => {
    const s = c / 255;
    return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
};

const contrast = (a: Rgb, b: Rgb) => {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
};

const css = readFileSync(join(__dirname, '../../../src-renderer/styles/app.css'), 'utf8');
const cssVar = (name: string) => {
  const m = new RegExp(`--${name}:\\s*(#[0-9a-fA-F]{6})`).exec(css);
  if (!m) throw new Error(`--${name} not in app.css`);
  return hex(m[1]);
};

describe('grid contrast (WCAG 2.1)', () => {
  const estimate = cssVar('rf-estimate');
  const ink = hex(palette.ink);
  const paper = hex(palette.paper);
  const band = hex(palette.band);
  // The deepest tint the page draws (largest spread or widest interval).
  const deepest = estimateTint({ predictions: new Float64Array(1), spread: Float64Array.of(1), maxSpread: 1 }, 0);
  const faintest = estimateTint({ predictions: new Float64Array(1), spread: Float64Array.of(0), maxSpread: 1 }, 0);

  it('the WCAG formula gives its textbook end points (black on white 21 : 1)', () => {
    expect(contrast([0, 0, 0], [255, 255, 255])).toBeCloseTo(21, 6);
    expect(contrast([119, 119, 119], [255, 255, 255])).toBeCloseTo(4.48, 2);
  });

  it('estimate text stays readable on its deepest tint, over paper and over the band', () => {
    const figures = {
      estimateOnDeepPaper: contrast(estimate, over(deepest, paper)),
      estimateOnDeepBand: contrast(estimate, over(deepest, band)),
      estimateOnFaintPaper: contrast(estimate, over(faintest, paper)),
      observedOnPaper: contrast(ink, paper),
      observedOnBand: contrast(ink, band),
    };
    // Printed so the closing note can state them.
    console.log(
      Object.entries(figures)
        .map(([k, v]) => `${k} ${v.toFixed(2)}:1`)
        .join(', '),
    );
    for (const [k, v] of Object.entries(figures)) expect(v, k).toBeGreaterThanOrEqual(4.5);
  });

  it('the band is far from the estimate tint: cool grey against amber, and lighter than the deepest tint', () => {
    const tintDeep = over(deepest, paper);
    // The band differs from the tint in lightness too, not in hue alone.
    expect(luminance(band) - luminance(tintDeep)).toBeGreaterThan(0.15);
    // Blue channel above red in the band; red far above blue in the tint.
    expect(band[2]).toBeGreaterThanOrEqual(band[0]);
    expect(tintDeep[0] - tintDeep[2]).toBeGreaterThan(50);
  });
});
