/**
 * What the page is looking at, apart from the data and the runs themselves:
 * the focused cell, the run shown in the grid, the pair being compared,
 * whether estimates are drawn, and the side panel's layout (open tab,
 * collapsed, width). The layout is remembered between sessions
 * (localStorage); the rest belongs to the open data set and is reset with it.
 */

export interface ViewLayout {
  sideTab: string;
  sideCollapsed: boolean;
  /** Side panel width in CSS pixels. */
  sideWidth: number;
}

export interface ViewState {
  focused: { row: number; col: number } | null;
  shownRunId: number | null;
  compare: { a: number; b: number } | null;
  overlayVisible: boolean;
  /** Level of the intervals shown and exported (0.5–0.99). */
  intervalLevel: number;
  layout: ViewLayout;
}

export type ViewKey = keyof ViewState;

export const SIDE_MIN_WIDTH = 260;
export const SIDE_MAX_WIDTH = 640;
const SIDE_DEFAULT_WIDTH = 340;
const LAYOUT_KEY = 'rankfill.layout.v1';

function clampSideWidth(w: number): number {
  return Math.round(Math.min(SIDE_MAX_WIDTH, Math.max(SIDE_MIN_WIDTH, Number.isFinite(w) ? w : SIDE_DEFAULT_WIDTH)));
}

/** A stored layout read back defensively (anything unreadable falls back to the default). */
export function parseLayout(text: string | null, defaultWidth = SIDE_DEFAULT_WIDTH): ViewLayout {
  const d: ViewLayout = { sideTab: 'model', sideCollapsed: false, sideWidth: clampSideWidth(defaultWidth) };
  if (!text) return d;
  try {
    const o = JSON.parse(text) as Partial<ViewLayout>;
    return {
      sideTab: typeof o.sideTab === 'string' && o.sideTab.length < 40 ? o.sideTab : d.sideTab,
      sideCollapsed: o.sideCollapsed === true,
      sideWidth: clampSideWidth(typeof o.sideWidth === 'number' ? o.sideWidth : d.sideWidth),
    };
  } catch {
    return d;
  }
}

interface LayoutStorage {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
}

export class ViewStore {
  private s: ViewState;
  private readonly listeners = new Set<(changed: ReadonlySet<ViewKey>) => void>();

  /** `defaultWidth`: the side panel's width when none is remembered (the page picks one for the window). */
  constructor(
    private readonly storage: LayoutStorage | null = null,
    defaultWidth = SIDE_DEFAULT_WIDTH,
  ) {
    let stored: string | null;
    try {
      stored = storage?.getItem(LAYOUT_KEY) ?? null;
    } catch {
      stored = null;
    }
    this.s = {
      focused: null,
      shownRunId: null,
      compare: null,
      overlayVisible: true,
      intervalLevel: 0.8,
      layout: parseLayout(stored, defaultWidth),
    };
  }

  get state(): Readonly<ViewState> {
    return this.s;
  }

  subscribe(l: (changed: ReadonlySet<ViewKey>) => void): () => void {
    this.listeners.add(l);
    return () => this.listeners.delete(l);
  }

  set(patch: Partial<ViewState>): void {
    const changed = new Set<ViewKey>();
    for (const k of Object.keys(patch) as ViewKey[]) if (!Object.is(this.s[k], patch[k])) changed.add(k);
    if (changed.size === 0) return;
    this.s = { ...this.s, ...patch };
    if (changed.has('layout')) {
      try {
        this.storage?.setItem(LAYOUT_KEY, JSON.stringify(this.s.layout));
      } catch {
        // A full or refused storage only means the layout is not remembered.
      }
    }
    for (const l of this.listeners) l(changed);
  }

  setLayout(patch: Partial<ViewLayout>): void {
    const next = { ...this.s.layout, ...patch };
    next.sideWidth = clampSideWidth(next.sideWidth);
    const l = this.s.layout;
    if (next.sideTab === l.sideTab && next.sideCollapsed === l.sideCollapsed && next.sideWidth === l.sideWidth) return;
    this.set({ layout: next });
  }

  /** Another data set was opened: nothing of the old one stays in view (the layout stays). */
  resetForNewData(): void {
    this.set({ focused: null, shownRunId: null, compare: null });
  }
}
