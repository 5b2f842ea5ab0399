/**
 * The page's state stores: settings (normalised on the way in, both families
 * kept), the view (layout remembered, reset per data set), the run list
 * (numbering per data set) and the one "does this run belong to the matrix"
 * predicate. Expected values are worked by hand (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { insertRow, renameRow, transpose } from '../../../src-renderer/editing/matrixOps';
import { runFitsDocument, runIsCurrent } from '../../../src-renderer/runs/runMatch';
import { RunStore, type Run } from '../../../src-renderer/runs/runStore';
import { DocumentStore } from '../../../src-renderer/state/documentStore';
import { normaliseSettings, SettingsStore } from '../../../src-renderer/state/settingsStore';
import { parseLayout, SIDE_MAX_WIDTH, ViewStore } from '../../../src-renderer/state/viewStore';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import type { FitResult } from '../../../src-shared/engine/types';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';

const N = NaN;
const m0 = (): RatingMatrix => ({
  rowLabels: ['a', 'b'],
  colLabels: ['x', 'y', 'z'],
  values: Float64Array.from([1, N, 3, 4, 5, N]),
  scale: { min: 1, max: 5, step: 1 },
});

function memoryStorage() {
  const map = new Map<string, string>();
  return { getItem: (k: string) => map.get(k) ?? null, setItem: (k: string, v: string) => void map.set(k, v), map };
}

function runFor(doc: DocumentStore): Omit<Run, 'id'> {
  const m = doc.current;
  const cells = m.values.length;
  const result = {
    rows: m.rowLabels.length,
    cols: m.colLabels.length,
    predictions: new Float64Array(cells),
  } as unknown as FitResult;
  return {
    settings: defaultLowRankSettings(),
    result,
    createdAt: 0,
    docRevision: doc.revision,
    dataSet: doc.dataSet,
    layout: doc.layout,
    rows: result.rows,
    cols: result.cols,
    refits: 0,
  };
}

describe('settings store', () => {
  it('normalises what comes in: whole ranks within 0–50, λ ≥ 0, at least one iteration', () => {
    const s = normaliseSettings({ ...defaultLowRankSettings(), rank: 2.6, lambda: -3, maxIterations: 0, seed: 4.4 });
    expect(s).toMatchObject({ rank: 3, lambda: 0, maxIterations: 1, seed: 4 });
    expect(normaliseSettings({ ...defaultLowRankSettings(), rank: 500 })).toMatchObject({ rank: 50 });
    expect(normaliseSettings({ ...defaultLowRankSettings(), lambda: NaN })).toMatchObject({ lambda: 0 });
  });

  it('keeps each family’s own fields and the shared ones equal; tells subscribers', () => {
    const st = new SettingsStore();
    const seen: string[] = [];
    st.subscribe((v) => seen.push(`${v.model}:${v.seed}`));
    st.update({ rank: 4, seed: 7 });
    st.setFamily('gaussian');
    expect(st.value).toMatchObject({ model: 'gaussian', seed: 7 });
    st.update({ shrinkage: 2, rank: 9 }); // rank is not a Gaussian field; shrinkage is clamped
    expect(st.value).toMatchObject({ model: 'gaussian', shrinkage: 0.95 });
    st.setFamily('lowrank');
    expect(st.value).toMatchObject({ model: 'lowrank', rank: 4, seed: 7 });
    expect(seen).toEqual(['lowrank:7', 'gaussian:7', 'gaussian:7', 'lowrank:7']);
  });

  it('set() takes settings from elsewhere (a tuning choice, an opened project)', () => {
    const st = new SettingsStore();
    st.set({ ...defaultLowRankSettings(), centering: 'row', rank: 0, lambda: 10 });
    expect(st.value).toMatchObject({ centering: 'row', rank: 0, lambda: 10 });
    st.reset();
    expect(st.value).toEqual(defaultLowRankSettings());
  });
});

describe('view store', () => {
  it('remembers the side panel layout and reads a damaged record as the default', () => {
    const storage = memoryStorage();
    const v = new ViewStore(storage);
    v.setLayout({ sideWidth: 10_000, sideCollapsed: true, sideTab: 'runs' });
    expect(v.state.layout.sideWidth).toBe(SIDE_MAX_WIDTH);
    expect(new ViewStore(storage).state.layout).toEqual({
      sideTab: 'runs',
      sideCollapsed: true,
      sideWidth: SIDE_MAX_WIDTH,
    });
    expect(parseLayout('{not json')).toEqual(parseLayout(null));
  });

  it('a new data set clears focus, shown run and comparison, not the layout', () => {
    const v = new ViewStore();
    v.set({ focused: { row: 1, col: 1 }, shownRunId: 3, compare: { a: 1, b: 3 } });
    v.setLayout({ sideCollapsed: true });
    v.resetForNewData();
    expect(v.state).toMatchObject({ focused: null, shownRunId: null, compare: null, layout: { sideCollapsed: true } });
  });
});

describe('runs and the matrix they belong to', () => {
  it('numbering restarts with each data set; the shown run and comparison go', () => {
    const view = new ViewStore();
    const runs = new RunStore(view);
    const doc = new DocumentStore(m0());
    runs.add(runFor(doc));
    const b = runs.add(runFor(doc));
    runs.setCompare({ a: 1, b: 2 });
    expect(b.id).toBe(2);
    expect(view.state.shownRunId).toBe(2);
    runs.clear();
    expect(runs.runs).toHaveLength(0);
    expect(view.state).toMatchObject({ shownRunId: null, compare: null });
    expect(runs.add(runFor(doc)).id).toBe(1);
  });

  it('a run fits only its own data set and cell layout; undo brings the layout back', () => {
    const doc = new DocumentStore(m0());
    doc.replace(m0(), 'first', { kind: 'sample', name: 'a' });
    const runs = new RunStore(new ViewStore());
    const run = runs.add(runFor(doc));
    expect(runIsCurrent(run, doc)).toBe(true);
    doc.setCells('Enter rating', [1], [2]);
    expect(runFitsDocument(run, doc)).toBe(true); // same cells, the live refit catches up
    expect(runIsCurrent(run, doc)).toBe(false);
    const r = renameRow(doc.current, 0, 'A');
    if (r.ok) doc.swapMatrix('Rename', r.matrix, { keepsCells: true });
    expect(runFitsDocument(run, doc)).toBe(true);
    const added = insertRow(doc.current, 2, 'c');
    if (added.ok) doc.swapMatrix('Add row', added.matrix);
    expect(runFitsDocument(run, doc)).toBe(false);
    doc.undo();
    expect(runFitsDocument(run, doc)).toBe(true);
    doc.swapMatrix('Swap', transpose(doc.current));
    expect(runFitsDocument(run, doc)).toBe(false);
    doc.undo();
    // Another data set of the very same shape and values: still not this run's.
    doc.replace(m0(), 'second', { kind: 'sample', name: 'b' });
    expect(runFitsDocument(run, doc)).toBe(false);
  });
});
