/**
 * The history of model runs for the open document, which run the grid shows,
 * and which two runs are being compared. Runs hold model output only; the
 * observed data stay in the DocumentStore.
 */
import type { CrossValidationPayload } from '../../src-shared/api';
import type { SeedStability } from '../../src-shared/engine/seedStability';
import type { CellTrust } from '../../src-shared/engine/trust';
import type { FitResult, FitSettings } from '../../src-shared/engine/types';
import type { ViewStore } from '../state/viewStore';

export interface RunEvaluation extends CrossValidationPayload {
  k: number;
  seed: number;
}

export interface Run {
  /** The run's number ("Run 11"); kept across save and reopen. */
  id: number;
  /** The name the user gave it, if any. */
  name?: string;
  settings: FitSettings;
  result: FitResult;
  trust?: CellTrust;
  /** When the Fill finished (ms since epoch). */
  createdAt: number;
  /** Document revision the current result was fitted on. */
  docRevision: number;
  /** The data set (DocumentStore.dataSet) and cell layout (DocumentStore.layout) it was fitted on. */
  dataSet: number;
  layout: number;
  rows: number;
  cols: number;
  /** Live refits since the Fill (after edits). */
  refits: number;
  evaluation?: RunEvaluation;
  /** How far the filled values move with seed + 1 (set by Evaluate; engine/seedStability.ts). */
  seedStability?: SeedStability;
}

export type RunEvent = { type: 'runs' } | { type: 'shown' } | { type: 'compare' } | { type: 'updated'; id: number };

/**
 * Which run is shown and which pair is compared live in the view store; this
 * class keeps the list and says when either changes. Numbering restarts with
 * every data set (`clear`).
 */
export class RunStore {
  private list: Run[] = [];
  private nextId = 1;
  private readonly listeners = new Set<(e: RunEvent) => void>();

  constructor(private readonly view: ViewStore) {}

  get shownId(): number | null {
    return this.view.state.shownRunId;
  }

  get compare(): { a: number; b: number } | null {
    return this.view.state.compare;
  }

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

  /** Add a run; `id` asks for a number (a run brought back from a project keeps its own) when it is free. */
  add(run: Omit<Run, 'id'>, id?: number): Run {
    const wanted = id !== undefined && Number.isInteger(id) && id >= 1 && !this.get(id) ? id : this.nextId;
    this.nextId = Math.max(this.nextId, wanted + 1);
    const r = { ...run, id: wanted };
    this.list.push(r);
    this.emit({ type: 'runs' });
    this.show(r.id);
    return r;
  }

  /** Replace a run's result after a live refit (on `layout`; a new layout drops the old spread). */
  refit(id: number, result: FitResult, trust: CellTrust | undefined, docRevision: number, layout: number): void {
    const r = this.get(id);
    if (!r) return;
    if (trust) r.trust = trust;
    else if (layout !== r.layout || result.predictions.length !== r.result.predictions.length) r.trust = undefined;
    r.result = result;
    r.rows = result.rows;
    r.cols = result.cols;
    r.layout = layout;
    r.docRevision = docRevision;
    r.refits++;
    // Cross-validated errors describe the data the run was evaluated on; after edits they are stale.
    r.evaluation = undefined;
    r.seedStability = undefined;
    this.emit({ type: 'updated', id });
  }

  /** Name a run (an empty name takes the name away). */
  rename(id: number, name: string): void {
    const r = this.get(id);
    if (!r) return;
    const n = name.trim().slice(0, 200);
    if (n) r.name = n;
    else delete r.name;
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

  setSeedStability(id: number, s: SeedStability): void {
    const r = this.get(id);
    if (!r) return;
    r.seedStability = s;
    this.emit({ type: 'updated', id });
  }

  show(id: number | null): void {
    this.view.set({ shownRunId: id });
    this.emit({ type: 'shown' });
  }

  setCompare(pair: { a: number; b: number } | null): void {
    this.view.set({ compare: pair });
    this.emit({ type: 'compare' });
  }

  /** Another data set was opened: no run of the old one stays, numbering starts again at 1. */
  clear(): void {
    this.list = [];
    this.nextId = 1;
    this.view.set({ shownRunId: null, compare: null });
    this.emit({ type: 'runs' });
    this.emit({ type: 'shown' });
    this.emit({ type: 'compare' });
  }
}
