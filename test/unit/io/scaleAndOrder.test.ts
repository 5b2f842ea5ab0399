/**
 * Storing ratings as entered (issue 12): the scale check shared by typing, paste and import,
 * the import's chosen scale, the long layout's column order and the row-label header.
 */
import { describe, expect, it } from 'vitest';
import { isOnStep, neighbouringSteps, scaleRefusal } from '../../../src-shared/matrix/scaleCheck';
import { formatProblem, looksLong, parseDelimited } from '../../../src-shared/io';

describe('scaleRefusal', () => {
  const s19 = { min: 1, max: 9, step: 1 };
  it('accepts values on a step and refuses the others with the nearest allowed values', () => {
    expect(scaleRefusal(4, s19)).toBeUndefined();
    expect(scaleRefusal(4.4, s19)).toBe(
      "4.4 lies between the allowed values 4 and 5 (scale 1–9 in steps of 1); enter one of them or change the scale's step",
    );
    expect(scaleRefusal(12, s19)).toBe('12 lies outside the scale 1–9 in steps of 1');
    expect(scaleRefusal(0.5, s19)).toBe('0.5 lies outside the scale 1–9 in steps of 1');
  });
  it('decimal steps: 0.3 is on a 0.1 step although 0.3/0.1 = 2.9999999999999996 in binary floating point', () => {
    // Source: IEEE 754 double arithmetic (0.3 / 0.1 evaluates to 2.9999999999999996), from memory.
    expect(0.3 / 0.1).not.toBe(3);
    const s = { min: 0, max: 10, step: 0.1 };
    expect(isOnStep(0.3, s)).toBe(true);
    expect(isOnStep(7.7, s)).toBe(true);
    expect(neighbouringSteps(7.75, s)).toEqual([7.7, 7.800000000000001]);
    expect(scaleRefusal(7.75, s)).toMatch(/^7\.75 lies between the allowed values 7\.7 and 7\.8 /);
    expect(scaleRefusal(3.14159, { min: 0, max: 10, step: 0 })).toBeUndefined();
  });
  it('half points from an offset minimum: allowed values are min + k·step', () => {
    const s = { min: 0.5, max: 5, step: 0.5 };
    expect(isOnStep(2.5, s)).toBe(true);
    expect(scaleRefusal(2.7, s)).toMatch(/between the allowed values 2\.5 and 3 /);
  });
});

describe('import with a chosen scale', () => {
  const text = 'Wine,a,b,c\nw1,1,4.5,\nw2,2,3,11\n';
  it('reports each value outside the scale or off its step at its line and column', () => {
    const r = parseDelimited(text, { fileName: 'w.csv', scale: { min: 0, max: 10, step: 1 } });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map(formatProblem)).toEqual([
      "w.csv:2:3: 4.5 lies between the allowed values 4 and 5 (scale 0–10 in steps of 1); enter one of them or change the scale's step",
      'w.csv:3:4: 11 lies outside the scale 0–10 in steps of 1',
    ]);
  });
  it('a scale that fits becomes the matrix scale; the guess is the default and the corner is kept', () => {
    const ok = parseDelimited(text, { fileName: 'w.csv', scale: { min: 0, max: 12, step: 0.5 } });
    expect(ok.ok).toBe(true);
    if (!ok.ok) return;
    expect(ok.matrix.scale).toEqual({ min: 0, max: 12, step: 0.5 });
    expect(ok.info.scaleSource).toBe('given');
    expect(ok.info.rowHeader).toBe('Wine');
    const guessed = parseDelimited(text, { fileName: 'w.csv' });
    expect(guessed.ok && guessed.info.scaleSource).toBe('guessed');
    expect(guessed.ok && guessed.matrix.scale).toEqual({ min: 1, max: 11, step: 0.5 });
  });
});

describe('long layout: column order and row header', () => {
  const long = 'taster,item,score\nt1,item 10,3\nt1,item 2,4\nt2,item 1,5\nt2,item 10,2\n';
  it('as read (first appearance) by default, natural sort on request, values moved with their columns', () => {
    const asRead = parseDelimited(long, { fileName: 'l.csv' });
    const sorted = parseDelimited(long, { fileName: 'l.csv', columnOrder: 'sorted' });
    expect(asRead.ok && sorted.ok).toBe(true);
    if (!asRead.ok || !sorted.ok) return;
    expect(asRead.matrix.colLabels).toEqual(['item 10', 'item 2', 'item 1']);
    expect(sorted.matrix.colLabels).toEqual(['item 1', 'item 2', 'item 10']);
    expect(Array.from(sorted.matrix.values)).toEqual([NaN, 4, 3, 5, NaN, 2]);
    expect(sorted.info.rowHeader).toBe('taster');
  });
  it('looksLong: three fields, repeated row labels, column labels in the second field', () => {
    expect(looksLong(long)).toBe(true);
    expect(looksLong('x,a,b\nr1,1,2\nr1,2,3\n')).toBe(false);
    expect(looksLong('x,a,b,c\nr1,1,2,3\nr1,2,3,4\n')).toBe(false);
  });
});
