/**
 * The fit settings of the page: where they live. The Model tab renders this
 * store and writes to it; Fill, the centering comparison, tuning and project
 * files read it; "Use" / "Apply" buttons and opened projects set it.
 *
 * Both families keep their own fields (switching the family and back keeps
 * what was typed); the fields they share (iterations, seed, clipping) are
 * kept equal. Every value is normalised on the way in (whole ranks, λ ≥ 0,
 * shrinkage in [0, 0.95], …), so readers never see a half-typed number.
 */
import { defaultLowRankSettings } from '../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../src-shared/engine/gaussian';
import type {
  Centering,
  FitSettings,
  GaussianSettings,
  LowRankSettings,
  ModelFamily,
} from '../../src-shared/engine/types';

export interface SettingsState {
  family: ModelFamily;
  lowRank: LowRankSettings;
  gaussian: GaussianSettings;
}

/** Fields either family may be given; those of the other family are ignored. */
export type SettingsPatch = Partial<Omit<LowRankSettings, 'model'>> & Partial<Omit<GaussianSettings, 'model'>>;

const CENTERINGS: readonly Centering[] = ['none', 'row', 'column', 'both'];
export const MAX_RANK = 50;
export const MAX_ITERATIONS = 10_000;
export const MAX_SHRINKAGE = 0.95;

const finiteOr = (x: unknown, fallback: number): number => (typeof x === 'number' && Number.isFinite(x) ? x : fallback);
const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

/** The settings with every number brought into its allowed range (a pure function; unit-tested). */
export function normaliseSettings(s: FitSettings): FitSettings {
  const maxIterations = clamp(Math.round(finiteOr(s.maxIterations, 100)), 1, MAX_ITERATIONS);
  const seed = Math.round(finiteOr(s.seed, 0));
  if (s.model === 'gaussian') {
    return {
      ...s,
      maxIterations,
      seed,
      shrinkage: clamp(finiteOr(s.shrinkage, 0), 0, MAX_SHRINKAGE),
      transpose: !!s.transpose,
      clipToScale: !!s.clipToScale,
    };
  }
  return {
    ...s,
    maxIterations,
    seed,
    rank: clamp(Math.round(finiteOr(s.rank, 0)), 0, MAX_RANK),
    lambda: Math.max(0, finiteOr(s.lambda, 0)),
    centering: CENTERINGS.includes(s.centering) ? s.centering : 'both',
    clipToScale: !!s.clipToScale,
  };
}

function defaultSettingsState(): SettingsState {
  const lowRank = defaultLowRankSettings();
  const g = defaultGaussianSettings();
  // One value for the fields both families share.
  const gaussian: GaussianSettings = {
    ...g,
    maxIterations: lowRank.maxIterations,
    seed: lowRank.seed,
    clipToScale: lowRank.clipToScale,
  };
  return { family: 'lowrank', lowRank, gaussian };
}

/**
 * Who set the settings last: the defaults, the adaptive choice of a first Fill
 * (runs/firstFill.ts), or the user (typing in the Model tab, Use / Apply, an
 * opened project). Once the user has set them, they are never replaced by a choice.
 */
export type SettingsOrigin = 'default' | 'chosen' | 'user';

export class SettingsStore {
  private s: SettingsState = defaultSettingsState();
  private who: SettingsOrigin = 'default';
  private why = '';
  private readonly listeners = new Set<(s: FitSettings) => void>();

  get origin(): SettingsOrigin {
    return this.who;
  }

  /** The one-line reason of a choice ('' unless origin is 'chosen'). */
  get reason(): string {
    return this.who === 'chosen' ? this.why : '';
  }

  /** Take settings chosen from the data (a first Fill), with the line that says why. */
  choose(next: FitSettings, reason: string): void {
    this.who = 'chosen';
    this.why = reason;
    this.set(next, 'chosen');
  }

  /** The settings a Fill would use now. */
  get value(): FitSettings {
    return this.s.family === 'gaussian' ? { ...this.s.gaussian } : { ...this.s.lowRank };
  }

  /** Both families' fields (the Model tab shows the chosen family's). */
  get state(): Readonly<SettingsState> {
    return this.s;
  }

  subscribe(l: (s: FitSettings) => void): () => void {
    this.listeners.add(l);
    return () => this.listeners.delete(l);
  }

  /** Take these settings (their family becomes the chosen one). */
  set(next: FitSettings, origin: SettingsOrigin = 'user'): void {
    this.who = origin;
    const n = normaliseSettings(next);
    const shared = { maxIterations: n.maxIterations, seed: n.seed, clipToScale: n.clipToScale };
    this.s =
      n.model === 'gaussian'
        ? { family: 'gaussian', gaussian: n, lowRank: { ...this.s.lowRank, ...shared } }
        : { family: 'lowrank', lowRank: n, gaussian: { ...this.s.gaussian, ...shared } };
    this.emit();
  }

  /** Change some fields of the chosen family (shared fields change in both). */
  update(patch: SettingsPatch): void {
    const cur = this.value;
    this.set({ ...cur, ...patch, model: cur.model } as FitSettings);
  }

  /** Choose the family; each family keeps its own fields. */
  setFamily(family: ModelFamily): void {
    if (family === this.s.family) return;
    this.set(family === 'gaussian' ? this.s.gaussian : this.s.lowRank);
  }

  /** Back to the defaults. */
  reset(): void {
    this.s = defaultSettingsState();
    this.who = 'default';
    this.emit();
  }

  private emit(): void {
    const v = this.value;
    for (const l of this.listeners) l(v);
  }
}
