/**
 * The JSON syntax locator (src-shared/project/jsonSyntax.ts) and project validation
 * added by issue 11. Outside references: RFC 8259 (what is and is not JSON), and V8's
 * own JSON.parse as a second implementation — it must accept exactly the texts we
 * accept, and where it names a position we must name the same one.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatProblem } from '../../../src-shared/io/problem';
import { findJsonSyntaxError, peekMatrixShape } from '../../../src-shared/project/jsonSyntax';
import { parseProject, serializeProject } from '../../../src-shared/project/projectFile';
import type { ProjectDocument } from '../../../src-shared/project/projectDocument';

function doc(): ProjectDocument {
  return {
    matrix: {
      rowLabels: ['ann', 'bob', 'cid', 'dee'],
      colLabels: ['alpha', 'beta', 'gamma'],
      values: Float64Array.from([4, NaN, 5, 2, 1, NaN, NaN, 5, 4, 3, 3, 3]),
      scale: { min: 1, max: 5, step: 1 },
    },
    settings: null,
    runs: [],
    notes: 'a secret note that must never be echoed',
    createdAt: '2026-01-01T09:00:00.000Z',
    modifiedAt: '2026-01-02T10:00:00.000Z',
  };
}

describe('JSON syntax locator', () => {
  it('agrees with JSON.parse on validity, and on the place wherever V8 names one (fuzzed)', () => {
    const base = serializeProject(doc());
    const alphabet = ['N', 'a', ',', ']', '}', '"', ':', '\n', 'I', '-', '.', 'e', '0', ' ', '{', '['];
    let named = 0;
    fc.assert(
      fc.property(fc.nat(base.length - 1), fc.constantFrom(...alphabet), fc.boolean(), (at, ch, insert) => {
        const text = insert ? base.slice(0, at) + ch + base.slice(at) : base.slice(0, at) + ch + base.slice(at + 1);
        let v8: Error | null = null;
        try {
          JSON.parse(text);
        } catch (err) {
          v8 = err as Error;
        }
        const ours = findJsonSyntaxError(text);
        expect(ours === null).toBe(v8 === null);
        // V8 (Node 20) says "... in JSON at position N" for some errors and
        // "Unexpected token 'X', ..." for others: our offset must match either.
        const pos = v8 && /at position (\d+)/.exec(v8.message);
        const tok = v8 && /^Unexpected token '(.)'/.exec(v8.message);
        if (ours && pos) {
          named++;
          expect(ours.offset).toBe(Number(pos[1]));
        } else if (ours && tok) {
          named++;
          expect(text[ours.offset]).toBe(tok[1]);
        }
      }),
      { numRuns: 600, seed: 1111 },
    );
    expect(named).toBeGreaterThan(50); // the comparison really ran
  });

  it('locates NaN, Infinity and stray words exactly (before: 1:1 with a slice of the file)', () => {
    const text = serializeProject(doc());
    for (const [word, line] of [
      ['NaN', 11],
      ['Infinity', 12],
      ['-Infinity', 13],
      ['undefined', 11],
    ] as const) {
      // Replace the first cell of a values row.
      const lines = text.split('\n');
      lines[line - 1] = lines[line - 1].replace(/\[(-?\d+|null)/, `[${word}`);
      const damaged = lines.join('\n');
      const r = parseProject(damaged, 'p.rankfill');
      expect(r.ok).toBe(false);
      if (r.ok) continue;
      const p = r.problems[0];
      expect([p.line, p.column]).toEqual([line, lines[line - 1].indexOf(word) + 1]);
      // Only the offending token is quoted: no other text of the file.
      expect(p.message).not.toMatch(/rankfill-project|alpha|secret|ann/);
      expect(p.message.length).toBeLessThan(120);
    }
  });

  it('a long offending token is cut at 20 characters', () => {
    const r = findJsonSyntaxError('[1, ' + 'x'.repeat(500) + ']');
    expect(r).toEqual({
      offset: 4,
      reason: `unexpected "${'x'.repeat(20)}…" where a value should be`,
      endsEarly: false,
    });
  });

  it('does not overflow the stack on deep nesting', () => {
    const deep = '['.repeat(200_000) + ']'.repeat(199_999);
    const r = findJsonSyntaxError(deep);
    expect(r?.endsEarly).toBe(true);
  });

  it('reads the matrix shape from the label lists alone', () => {
    const text = serializeProject(doc());
    expect(peekMatrixShape(text)).toEqual({ rows: 4, cols: 3 });
    // Labels after the values (a hand-edited file) are found too; a damaged head gives null.
    const moved = JSON.stringify({ matrix: { values: [[1]], rowLabels: ['a'], colLabels: ['b', 'c'] } });
    expect(peekMatrixShape(moved)).toEqual({ rows: 1, cols: 2 });
    expect(peekMatrixShape('{"matrix": {"rowLabels": [NaN')).toBeNull();
    // A notes text mentioning rowLabels is not mistaken for the list.
    expect(
      peekMatrixShape('{"notes": "\\"rowLabels\\": [1,2,3]", "matrix": {"rowLabels": ["a"], "colLabels": ["b"]}}'),
    ).toEqual({ rows: 1, cols: 1 });
  });
});

describe('project validation on open', () => {
  const open = (text: string) => {
    const r = parseProject(text, 'p.rankfill');
    return r.ok ? 'ok' : formatProblem(r.problems[0]);
  };

  it('refuses observed values outside the project scale (before: 99 on 1–9 was accepted)', () => {
    const text = serializeProject(doc()).replace('[2,1,null]', '[2,99,null]');
    expect(open(text)).toBe("p.rankfill:12:10: matrix.values[1][1]: value 99 is outside the project's scale 1 to 5");
    expect(open(serializeProject(doc()).replace('[2,1,null]', '[2,0.5,null]'))).toMatch(/value 0.5 is outside/);
  });

  it('refuses a time that is not a time (before: "not a time" was accepted)', () => {
    for (const bad of ['not a time', '2026-13-01T00:00:00Z', '2026-01-01', '']) {
      const text = serializeProject(doc()).replace(
        '"createdAt": "2026-01-01T09:00:00.000Z"',
        `"createdAt": ${JSON.stringify(bad)}`,
      );
      expect(open(text)).toMatch(/^p\.rankfill:4:\d+: createdAt: not a valid time/);
    }
    const ok = serializeProject(doc()).replace('"2026-01-01T09:00:00.000Z"', '"2026-01-01T09:00:00+02:00"');
    expect(open(ok)).toBe('ok');
  });

  it('refuses unknown keys with their path, __proto__ included (before: dropped silently)', () => {
    const base = serializeProject(doc());
    expect(open(base.replace('"notes":', '"colour": "red",\n  "notes":'))).toMatch(
      /^p\.rankfill:\d+:\d+: colour: unknown key "colour"/,
    );
    expect(open(base.replace('"scale": {', '"scale": {"__proto__": {"x": 1}, '))).toMatch(
      /matrix\.scale\.__proto__: unknown key "__proto__"/,
    );
  });

  it('refuses a matrix over 20 million cells before parsing its body (before: opened after a 2.8 s stall)', () => {
    const rows = Array.from({ length: 5000 }, (_, i) => `r${i}`);
    const cols = Array.from({ length: 4001 }, (_, j) => `c${j}`);
    // The body is not even JSON: it is never parsed.
    const text = `{"format":"rankfill-project","version":1,"matrix":{"rowLabels":${JSON.stringify(rows)},"colLabels":${JSON.stringify(cols)},"values":[[NaN`;
    const t0 = performance.now();
    expect(open(text)).toBe(
      'p.rankfill:1:64: matrix: 5000 rows × 4001 columns = 20005000 cells; the limit is 20000000 cells',
    );
    expect(performance.now() - t0).toBeLessThan(1000);
  });
});
