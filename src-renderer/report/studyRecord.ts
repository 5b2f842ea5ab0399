/**
 * What the study report gathers besides the shown run: the last centering comparison and
 * tuning grid (with the document revision they were computed on, so a report only uses
 * results that belong to the data as it is now), the report's own cross-validation per
 * run, and the exports written from each run. Cleared when another document is opened.
 */
import type { TunePayload } from '../../src-shared/api';
import type { ReportExport } from '../../src-shared/report/reportInput';
import type { DocumentStore } from '../state/documentStore';

export type GridKind = 'centering' | 'tuning';

interface Stamped {
  reply: TunePayload;
  revision: number;
}

export class StudyRecord {
  private readonly grids = new Map<GridKind, Stamped>();
  private readonly evaluations = new Map<number, Stamped>();
  private readonly exports = new Map<number, ReportExport[]>();

  constructor(private readonly store: DocumentStore) {
    store.subscribe((e) => {
      if (e.type !== 'replaced') return;
      this.grids.clear();
      this.evaluations.clear();
      this.exports.clear();
    });
  }

  setGrid(kind: GridKind, reply: TunePayload, revision: number): void {
    this.grids.set(kind, { reply, revision });
  }

  /** The last result of that kind when it was computed on the current data; else null. */
  grid(kind: GridKind): TunePayload | null {
    const g = this.grids.get(kind);
    return g && g.revision === this.store.revision ? g.reply : null;
  }

  /** A result exists but belongs to an earlier state of the data. */
  gridIsStale(kind: GridKind): boolean {
    const g = this.grids.get(kind);
    return g !== undefined && g.revision !== this.store.revision;
  }

  setEvaluation(runId: number, reply: TunePayload, revision: number): void {
    this.evaluations.set(runId, { reply, revision });
  }

  evaluation(runId: number): TunePayload | null {
    const e = this.evaluations.get(runId);
    return e && e.revision === this.store.revision ? e.reply : null;
  }

  addExport(runId: number, x: ReportExport): void {
    const list = this.exports.get(runId) ?? [];
    list.push(x);
    this.exports.set(runId, list);
  }

  exportsOf(runId: number): ReportExport[] {
    return [...(this.exports.get(runId) ?? [])];
  }
}
