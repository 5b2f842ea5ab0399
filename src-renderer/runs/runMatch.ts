/**
 * The one test of "does this run belong to the matrix on screen". A run is
 * drawn, explained, compared or exported only on the data set and the cell
 * layout it was computed on (see DocumentStore.layout), with the same shape.
 * Cell edits keep the layout: the run is then drawn while its live refit
 * catches up, and `runIsCurrent` tells whether it has.
 */
import type { DocumentStore } from '../state/documentStore';
import type { Run } from './runStore';

type DocView = Pick<DocumentStore, 'current' | 'layout' | 'dataSet' | 'revision'>;

export function runFitsDocument(run: Run | undefined | null, doc: DocView): run is Run {
  if (!run) return false;
  const m = doc.current;
  return (
    run.dataSet === doc.dataSet &&
    run.layout === doc.layout &&
    run.rows === m.rowLabels.length &&
    run.cols === m.colLabels.length &&
    run.result.predictions.length === m.values.length
  );
}

/** Fits the document and was computed on its exact revision (no edits since). */
export function runIsCurrent(run: Run | undefined | null, doc: DocView): run is Run {
  return runFitsDocument(run, doc) && run.docRevision === doc.revision;
}
