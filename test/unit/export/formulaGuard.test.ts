/**
 * CSV formula guard (issue 11). Source: OWASP, "CSV Injection" — cells beginning with
 * = + - @ (and tab, carriage return) are run as formulas by spreadsheets; prefixing a
 * single quote makes them text. Our decision (documented in writeDelimited.ts and the
 * README): only text cells (labels, headers) are guarded; numbers we format ourselves,
 * negative ones included, are never changed; a label that is a plain number is not a
 * formula and is left alone.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../../src-main/cli/main';
import { buildExport, buildMask } from '../../../src-shared/io/exportFilled';
import { parseDelimited } from '../../../src-shared/io/parseDelimited';
import { startsLikeFormula, textField, writeLongCsv, writeWideCsv } from '../../../src-shared/io/writeDelimited';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';

const dangerous = ['=SUM(A1:A9)', '+cmd|x', "-2+3+cmd|' /C calc'!A0", '@SUM(1)', '\tfoo', '\rbar'];

function matrix(): RatingMatrix {
  return {
    rowLabels: ['=HYPERLINK("http://x.example","click")', '-1.5', 'plain', '@evil'],
    colLabels: ['+1+1', 'ok', '-x'],
    values: Float64Array.from([-1.5, 2, NaN, 3, NaN, -4, 1, 1, 1, -2.25, 0, NaN]),
    scale: { min: -5, max: 5, step: 0 },
  };
}

describe('CSV formula guard (OWASP, "CSV Injection")', () => {
  it('prefixes an apostrophe to text cells starting with = + - @ tab CR', () => {
    for (const s of dangerous) expect(startsLikeFormula(s)).toBe(true);
    expect(textField('=SUM(A1:A9)', ',')).toBe("'=SUM(A1:A9)");
    expect(textField('@SUM(1)', ',')).toBe("'@SUM(1)");
    // Still valid RFC 4180 quoting after the prefix.
    expect(textField('=A1,B1', ',')).toBe(`"'=A1,B1"`);
    expect(textField('\tfoo', '\t')).toBe(`"'\tfoo"`);
  });

  it('leaves plain numbers and ordinary text alone', () => {
    for (const s of ['-1', '+2.5', '-3e2', '-.5', 'plain', 'a=b', 'e-mail']) {
      expect(startsLikeFormula(s)).toBe(false);
      expect(textField(s, ',')).toBe(s);
    }
  });

  it('guards labels in every writer, never the numbers (-1.5 stays a number)', () => {
    const m = matrix();
    const wide = writeWideCsv(m).split('\r\n');
    expect(wide[0]).toBe("row,'+1+1,ok,'-x");
    expect(wide[1]).toBe(`"'=HYPERLINK(""http://x.example"",""click"")",-1.5,2,`);
    expect(wide[2]).toBe('-1.5,3,,-4');
    expect(wide[4]).toBe("'@evil,-2.25,0,");
    const long = writeLongCsv(m).split('\r\n');
    expect(long).toContain("'@evil,'+1+1,-2.25");
    const mask = buildMask(m, ',').split('\r\n');
    expect(mask[4]).toBe("'@evil,observed,observed,filled");
    const fit = fitModel(m, { ...defaultLowRankSettings(), rank: 0 });
    const exported = buildExport(m, fit, undefined, { kind: 'long', roundToStep: false, decimals: 2, delimiter: ',' });
    expect(exported.split('\r\n')[1]).toMatch(
      /^"'=HYPERLINK\(""http:\/\/x\.example"",""click""\)",'\+1\+1,-1\.5,observed,/,
    );
    // No record anywhere starts a cell with a formula character, except plain numbers.
    const cells = [...wide, ...long, ...mask, ...exported.split('\r\n')].flatMap((l) => l.split(','));
    expect(cells.filter((c) => startsLikeFormula(c.replace(/^"/, '')))).toEqual([]);
  });

  it('the option off writes labels exactly, and the file reads back to the same labels', () => {
    const m = matrix();
    const text = writeWideCsv(m, { formulaGuard: false });
    expect(text.split('\r\n')[0]).toBe('row,+1+1,ok,-x');
    const back = parseDelimited(text, { fileName: 'x.csv' });
    expect(back.ok && back.matrix.rowLabels).toEqual(m.rowLabels);
  });

  it('the command line guards by default and writes labels raw with --raw-labels', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rankfill-guard-'));
    try {
      const input = join(dir, 'in.csv');
      writeFileSync(input, 'row,=cost,b\n@team,1,2\nplain,2,\n');
      const run = (...extra: string[]) =>
        runCli(['fill', input, '--out', join(dir, 'out.csv'), '--rank', '0', '--force', ...extra], {
          stdout: () => {},
          stderr: () => {},
        });
      expect(await run()).toBe(0);
      let lines = readFileSync(join(dir, 'out.csv'), 'utf8').split('\r\n');
      expect(lines[0]).toMatch(/,'=cost,b$/);
      expect(lines[1]).toBe("'@team,1,2");
      expect(await run('--raw-labels')).toBe(0);
      lines = readFileSync(join(dir, 'out.csv'), 'utf8').split('\r\n');
      expect(lines[0]).toMatch(/,=cost,b$/);
      expect(lines[1]).toBe('@team,1,2');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
