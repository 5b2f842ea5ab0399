/**
 * The history of model runs for the open document, which run the grid shows,
 * and which two runs are being compared. Runs hold model output only; the
 * observed data stay in the DocumentStore.
 */
import type { CrossValidationPayload } from '../../src-shared/api';
import type { CellTrust } from '../../src-shared/engine/trust';
import type { FitResult, FitSettings } from '../../src-shared/engine/types';

export interface RunEvaluation extends CrossValidationPayload {
  k: number;
  seed: number;
}

export interface Run {
  id: number;
  settings: FitSettings;
  result: FitResult;
  trust?: CellTrust;
  /** When the Fill finished (ms since epoch). */
  createdAt: number;
  /** Document revision the current result was fitted on. */
  docRevision: number;
  rows: number;
  cols: number;
  /** Live refits since the Fill (after edits). */
  refits: number;
  evaluation?: RunEvaluation;
}

export type RunEvent = { type: 'runs' } | { type: 'shown' } | { type: 'compare' } | { type: 'updated'; id: number };

export class RunStore {
  private list: Run[] = [];
  private nextId = 1;
  shownId: number | null = null;
  compare: { a: number; b: number } | null = null;
  private readonly listeners = new Set<(e: RunEvent) => void>();

  subscribe(l: (e: RunEvent) => void): () => void {
    this.listeners.add(l);
    return () => this.listeners.delete(l);
  }

  private emit(e: RunEvent): void {
    for (const l of this.listeners) l(e);
  }

  get runs(): readonly Run[] {
    return this.list;
  }

  get(id: number | null): Run | undefined {
    return id === null ? undefined : this.list.find((r) => r.id === id);
  }

  get shown(): Run | undefined {
    return this.get(this.shownId);
  }

  add(run: Omit<Run, 'id'>): Run {
    const r = { ...run, id: this.nextId++ };
    this.list.push(r);
    this.emit({ type: 'runs' });
    this.show(r.id);
    return r;
  }

  /** Replace a run's result after a live refit. */
  refit(id: number, result: FitResult, trust: CellTrust | undefined, docRevision: number): void {
    const r = this.get(id);
    if (!r) return;
    r.result = result;
    if (trust) r.trust = trust;
    r.docRevision = docRevision;
    r.refits++;
    // Cross-validated errors describe the data the run was evaluated on; after edits they are stale.
    r.evaluation = undefined;
    this.emit({ type: 'updated', id });
  }

  /** Replace a run's per-cell trust (spread, support, weak marks) once it has been recomputed. */
  setTrust(id: number, trust: CellTrust): void {
    const r = this.get(id);
    if (!r) return;
    r.trust = trust;
    this.emit({ type: 'updated', id });
  }

  setEvaluation(id: number, evaluation: RunEvaluation): void {
    const r = this.get(id);
    if (!r) return;
    r.evaluation = evaluation;
    this.emit({ type: 'updated', id });
  }

  show(id: number | null): void {
    this.shownId = id;
    this.emit({ type: 'shown' });
  }

  setCompare(pair: { a: number; b: number } | null): void {
    this.compare = pair;
    this.emit({ type: 'compare' });
  }

  clear(): void {
    this.list = [];
    this.shownId = null;
    this.compare = null;
    this.emit({ type: 'runs' });
    this.emit({ type: 'shown' });
    this.emit({ type: 'compare' });
  }
}
