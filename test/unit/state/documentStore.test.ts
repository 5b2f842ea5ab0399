import { describe, expect, it } from 'vitest';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { parseProject, serializeProject } from '../../../src-shared/project/projectFile';
import { insertRow, transpose } from '../../../src-renderer/editing/matrixOps';
import { DocumentStore } from '../../../src-renderer/state/documentStore';

const N = NaN;
const m0 = (): RatingMatrix => ({
  rowLabels: ['a', 'b'],
  colLabels: ['x', 'y'],
  values: Float64Array.from([1, N, 3, 4]),
  scale: { min: 1, max: 5, step: 1 },
});
const vals = (s: DocumentStore) => Array.from(s.current.values, (v) => (Number.isNaN(v) ? null : v));

describe('document store', () => {
  it('undoes and redoes cell patches and whole-matrix changes in order', () => {
    const s = new DocumentStore(m0());
    s.setCells('Enter rating', [1], [2]);
    s.setCells('Paste 2 cells', [0, 3], [5, N]);
    s.swapMatrix('Swap rows and columns', transpose(s.current));
    expect(s.current.rowLabels).toEqual(['x', 'y']);
    expect(vals(s)).toEqual([5, 3, 2, null]);
    expect(s.undoLabel()).toBe('Swap rows and columns');
    expect(s.undo()).toBe(true);
    expect(s.current.rowLabels).toEqual(['a', 'b']);
    expect(vals(s)).toEqual([5, 2, 3, null]);
    expect(s.undo()).toBe(true);
    expect(vals(s)).toEqual([1, 2, 3, 4]);
    expect(s.undo()).toBe(true);
    expect(vals(s)).toEqual([1, null, 3, 4]);
    expect(s.undo()).toBe(false);
    expect(s.redoLabel()).toBe('Enter rating');
    s.redo();
    s.redo();
    s.redo();
    expect(s.current.rowLabels).toEqual(['x', 'y']);
    expect(vals(s)).toEqual([5, 3, 2, null]);
    expect(s.canRedo()).toBe(false);
  });

  it('a new change after undo drops the redo stack', () => {
    const s = new DocumentStore(m0());
    s.setCells('e', [1], [2]);
    s.undo();
    s.setCells('e', [1], [5]);
    expect(s.canRedo()).toBe(false);
    expect(vals(s)).toEqual([1, 5, 3, 4]);
  });

  it('setting a cell to its own value is not a change', () => {
    const s = new DocumentStore(m0());
    expect(s.setCells('e', [0, 1], [1, N])).toBe(false);
    expect(s.canUndo()).toBe(false);
  });

  it('history survives a save; dirty follows the saved revision', () => {
    const s = new DocumentStore(m0());
    s.replace(m0(), 't', { kind: 'new', name: '' });
    expect(s.dirty).toBe(false);
    const r = insertRow(s.current, 2, 'c');
    if (!r.ok) throw new Error(r.message);
    s.swapMatrix('Add row', r.matrix);
    expect(s.dirty).toBe(true);
    s.markSaved('/tmp/x.rankfill');
    expect(s.dirty).toBe(false);
    expect(s.filePath).toBe('/tmp/x.rankfill');
    expect(s.canUndo()).toBe(true);
    s.undo();
    expect(s.dirty).toBe(true);
    expect(s.current.rowLabels).toEqual(['a', 'b']);
    s.redo();
    expect(s.dirty).toBe(false);
  });

  it('round-trips through the project file format with contributors’ parts', () => {
    const s = new DocumentStore(m0());
    s.addContributor({ collect: (p) => (p.notes = 'from the notes panel') });
    s.setCells('e', [1], [2]);
    const text = serializeProject(s.toProject(new Date('2024-01-02T03:04:05Z')));
    const parsed = parseProject(text, 'x.rankfill');
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const t = new DocumentStore(m0());
    let loadedNotes = '';
    t.addContributor({ load: (p) => (loadedNotes = p.notes) });
    t.replaceProject(parsed.project, 'x', { kind: 'file', name: '/tmp/x.rankfill' }, '/tmp/x.rankfill');
    expect(vals(t)).toEqual([1, 2, 3, 4]);
    expect(t.current.rowLabels).toEqual(['a', 'b']);
    expect(t.parts.notes).toBe('from the notes panel');
    expect(loadedNotes).toBe('from the notes panel');
    expect(t.dirty).toBe(false);
    expect(t.canUndo()).toBe(false);
    t.markUnsaved();
    expect(t.dirty).toBe(true);
  });
});
