import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatProblem } from '../../../src-shared/io/problem';
import type { LowRankSettings } from '../../../src-shared/engine/types';
import { locateJsonPath, positionOfOffset } from '../../../src-shared/project/locateJsonPath';
import type { ProjectDocument } from '../../../src-shared/project/projectDocument';
import { parseProject, serializeProject } from '../../../src-shared/project/projectFile';

const settings: LowRankSettings = {
  model: 'lowrank',
  rank: 2,
  lambda: 0.1,
  centering: 'both',
  scaleLambdaByCount: false,
  maxIterations: 200,
  tolerance: 1e-6,
  seed: 7,
  init: 'spectral',
  offsetLambda: 0.01,
  clipToScale: true,
  snapToStep: false,
};

function sampleDoc(): ProjectDocument {
  return {
    matrix: {
      rowLabels: ['ann', 'bob'],
      colLabels: ['alpha', 'beta', 'gamma'],
      values: new Float64Array([4, NaN, 5, 2, 1, NaN]),
      scale: { min: 1, max: 5, step: 0.5 },
    },
    settings,
    runs: [
      {
        id: 'r1',
        number: 1,
        name: 'first',
        fittedAt: '2026-01-02T09:59:00.000Z',
        savedAt: '2026-01-02T10:00:00.000Z',
        settings,
        metrics: { rmse: 0.5, mae: null },
        predictions: new Float64Array([4, 3.5, 5, 2, 1, 2.25]),
      },
      {
        id: 'r2',
        number: 11,
        name: '',
        fittedAt: '2026-01-02T10:59:00.000Z',
        savedAt: '2026-01-02T11:00:00.000Z',
        settings: { ...settings, rank: 1 },
        metrics: {},
      },
    ],
    notes: 'line one\nline "two"',
    createdAt: '2026-01-01T09:00:00.000Z',
    modifiedAt: '2026-01-02T11:00:00.000Z',
  };
}

function plain(doc: ProjectDocument) {
  return {
    ...doc,
    matrix: { ...doc.matrix, values: Array.from(doc.matrix.values) },
    runs: doc.runs.map((r) => ({ ...r, predictions: r.predictions ? Array.from(r.predictions) : undefined })),
  };
}

describe('project file', () => {
  it('saves and reads back every field', () => {
    const doc = sampleDoc();
    const text = serializeProject(doc);
    const r = parseProject(text, 'p.rankfill');
    if (!r.ok) throw new Error(r.problems.map(formatProblem).join('\n'));
    expect(plain(r.project)).toEqual(plain(doc));
    // Missing cells are stored as null, never as 0 or NaN text.
    expect(text).toContain('[4,null,5]');
    expect(text.endsWith('\n')).toBe(true);
  });

  it('round-trips random labels and values (fast-check)', () => {
    const lab = fc.string({ unit: 'grapheme', minLength: 1, maxLength: 6 });
    fc.assert(
      fc.property(
        fc.uniqueArray(lab, { minLength: 1, maxLength: 5 }),
        fc.uniqueArray(lab, { minLength: 1, maxLength: 5 }),
        fc.array(fc.oneof(fc.constant(NaN), fc.double({ min: -1e15, max: 1e15, noNaN: true })), {
          minLength: 25,
          maxLength: 25,
        }),
        (rowLabels, colLabels, pool) => {
          const n = rowLabels.length * colLabels.length;
          const values = Float64Array.from(pool.slice(0, n), (x) => (Object.is(x, -0) ? 0 : x));
          const doc: ProjectDocument = {
            ...sampleDoc(),
            runs: [],
            matrix: { rowLabels, colLabels, values, scale: { min: -1e15, max: 1e15, step: 0 } },
          };
          const r = parseProject(serializeProject(doc), 'rt.rankfill');
          if (!r.ok) throw new Error(r.problems.map(formatProblem).join('\n'));
          expect(plain(r.project)).toEqual(plain(doc));
        },
      ),
      { numRuns: 150, seed: 424242 },
    );
  });

  it('refuses a newer format version with the agreed wording and no project', () => {
    const text = serializeProject(sampleDoc()).replace('"version": 2', '"version": 3');
    const r = parseProject(text, 'new.rankfill');
    expect(r).toEqual({
      ok: false,
      problems: [
        {
          file: 'new.rankfill',
          line: 3,
          column: 14,
          message: 'made by a newer Rankfill (format v3); this version reads up to v2',
        },
      ],
    });
  });

  it('reports every schema problem at its place in the text', () => {
    const text = serializeProject(sampleDoc())
      .replace('[2,1,null]', '[2,"x",1e999]')
      .replace('"rank":1', '"rank":"one"');
    const r = parseProject(text, 'bad.rankfill');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const lines = text.split('\n');
    const msgs = r.problems.map(formatProblem);
    expect(msgs.some((m) => m.startsWith('bad.rankfill:12:10: matrix.values[1][1]:'))).toBe(true);
    expect(lines[11].slice(9, 12)).toBe('"x"'); // line 12, column 10 is where "x" starts
    expect(msgs.some((m) => /^bad\.rankfill:12:\d+: matrix\.values\[1\]\[2\]:/.test(m))).toBe(true);
    expect(msgs.some((m) => /runs\[1\]\.settings/.test(m))).toBe(true);
  });

  it('locates paths and offsets in JSON text', () => {
    const text = '{\n  "a": [1,\n    {"b": "x"}],\n  "c": null\n}';
    expect(locateJsonPath(text, ['a', 1, 'b'])).toEqual({ line: 3, column: 11 });
    expect(locateJsonPath(text, ['c'])).toEqual({ line: 4, column: 8 });
    expect(locateJsonPath(text, ['missing'])).toEqual({ line: 1, column: 1 });
    expect(positionOfOffset('ab\r\ncd\ref', 8)).toEqual({ line: 3, column: 2 });
  });

  it('never throws on arbitrary text', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 200 }), (s) => {
        const r = parseProject(s, 'any.rankfill');
        expect(r.ok).toBe(false);
      }),
      { numRuns: 300, seed: 99 },
    );
  });
});

describe('format v1 → v2 migration', () => {
  // The fixture is a real version-1 file as this app wrote it before v2 (test/fixtures/good/panel.rankfill).
  it('opens a version-1 file: runs get their number, a user name stays, the fit time is the v1 savedAt', () => {
    const text = readFileSync(new URL('../../fixtures/good/panel.rankfill', import.meta.url), 'utf8');
    expect(text).toContain('"version": 1,');
    const r = parseProject(text, 'panel.rankfill');
    if (!r.ok) throw new Error(r.problems.map(formatProblem).join('\n'));
    expect(r.project.runs).toHaveLength(1);
    expect(r.project.runs[0]).toMatchObject({
      id: 'run-1',
      number: 1,
      name: 'rank 2',
      fittedAt: '2026-01-02T10:00:00.000Z',
      metrics: { heldOutRmse: 0.82 },
    });
    // Saved again, it is a version-2 file that reads back the same.
    const again = serializeProject(r.project);
    expect(again).toContain('"version": 2,');
    const r2 = parseProject(again, 'panel.rankfill');
    expect(r2.ok && r2.project.runs[0]).toMatchObject({ number: 1, name: 'rank 2' });
  });

  it('v1 names the app made ("Run 11: …") become no name; numbers come from the id, then the name, then the position', () => {
    const v1 = JSON.parse(readFileSync(new URL('../../fixtures/good/panel.rankfill', import.meta.url), 'utf8'));
    const run = v1.runs[0];
    v1.runs = [
      { ...run, id: 'run-11', name: 'Run 11: rank 2, λ 1, both' },
      { ...run, id: 'x', name: 'Run 4: rank 1' },
      { ...run, id: 'y', name: 'my favourite' },
      { ...run, id: 'run-11', name: 'copy' },
    ];
    const r = parseProject(JSON.stringify(v1), 'v1.rankfill');
    if (!r.ok) throw new Error(r.problems.map(formatProblem).join('\n'));
    expect(r.project.runs.map((x) => [x.number, x.name])).toEqual([
      [11, ''],
      [4, ''],
      [3, 'my favourite'],
      [12, 'copy'],
    ]);
  });
});
