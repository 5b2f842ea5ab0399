/**
 * The side panel: a row of tabs over one visible section at a time, drawn
 * from the view store's layout (open tab, folded away, width). Panels
 * register a tab and get their own container.
 *
 * Keyboard: the tab row is one Tab stop; Left/Right (and Home/End) move
 * between tabs. The grip on the panel's left edge resizes it by dragging or
 * with Left/Right; the fold button (or Ctrl+B) hides the panel and leaves a
 * narrow strip with a button that brings it back.
 */
import { SIDE_MAX_WIDTH, SIDE_MIN_WIDTH, type ViewStore } from '../state/viewStore';

const KEY_STEP = 24;

export class SidePanel {
  private readonly tabs: HTMLElement;
  private readonly body: HTMLElement;
  private readonly grip: HTMLElement;
  private readonly strip: HTMLElement;
  private readonly sections = new Map<string, { button: HTMLButtonElement; el: HTMLElement }>();
  private readonly listeners = new Set<(id: string) => void>();

  constructor(
    private readonly root: HTMLElement,
    private readonly view: ViewStore,
  ) {
    root.classList.add('rf-side-panel');
    this.tabs = document.createElement('div');
    this.tabs.className = 'rf-tabs';
    this.tabs.setAttribute('role', 'tablist');
    this.tabs.setAttribute('aria-label', 'Side panel');
    this.tabs.addEventListener('keydown', (e) => this.onTabKey(e));
    const fold = document.createElement('button');
    fold.type = 'button';
    fold.className = 'rf-side-fold';
    fold.textContent = '⟩';
    fold.title = 'Fold the side panel away (Ctrl+B)';
    fold.setAttribute('aria-label', 'Fold the side panel away');
    fold.dataset.testid = 'side-fold';
    fold.addEventListener('click', () => view.setLayout({ sideCollapsed: true }));
    const head = document.createElement('div');
    head.className = 'rf-side-head';
    head.append(this.tabs, fold);
    this.body = document.createElement('div');
    this.body.className = 'rf-tab-body';
    root.replaceChildren(head, this.body);

    // The grip and the folded strip sit beside the panel in the page's main row.
    this.grip = document.createElement('div');
    this.grip.className = 'rf-side-grip';
    this.grip.tabIndex = 0;
    this.grip.setAttribute('role', 'separator');
    this.grip.setAttribute('aria-orientation', 'vertical');
    this.grip.setAttribute('aria-label', 'Side panel width');
    this.grip.setAttribute('aria-valuemin', String(SIDE_MIN_WIDTH));
    this.grip.setAttribute('aria-valuemax', String(SIDE_MAX_WIDTH));
    this.grip.title = 'Drag, or use the arrow keys, to change the side panel’s width';
    this.grip.dataset.testid = 'side-grip';
    this.grip.addEventListener('keydown', (e) => {
      const d = e.key === 'ArrowLeft' ? KEY_STEP : e.key === 'ArrowRight' ? -KEY_STEP : 0;
      if (!d) return;
      e.preventDefault();
      view.setLayout({ sideWidth: view.state.layout.sideWidth + d });
    });
    this.grip.addEventListener('pointerdown', (e) => this.startDrag(e));
    this.strip = document.createElement('div');
    this.strip.className = 'rf-side-strip';
    const reopen = document.createElement('button');
    reopen.type = 'button';
    reopen.className = 'rf-side-reopen';
    reopen.textContent = '⟨';
    reopen.title = 'Bring the side panel back (Ctrl+B)';
    reopen.setAttribute('aria-label', 'Bring the side panel back');
    reopen.dataset.testid = 'side-reopen';
    reopen.addEventListener('click', () => view.setLayout({ sideCollapsed: false }));
    this.strip.append(reopen);
    root.before(this.grip);
    root.after(this.strip);

    view.subscribe((changed) => {
      if (changed.has('layout')) this.render();
    });
  }

  add(id: string, title: string): HTMLElement {
    const button = document.createElement('button');
    button.type = 'button';
    button.className = 'rf-tab';
    button.textContent = title;
    button.id = `rf-tab-${id}`;
    button.dataset.testid = `tab-${id}`;
    button.dataset.tab = id;
    button.setAttribute('role', 'tab');
    button.setAttribute('aria-controls', `rf-panel-${id}`);
    button.addEventListener('click', () => this.select(id));
    const el = document.createElement('section');
    el.className = 'rf-tab-section';
    el.id = `rf-panel-${id}`;
    el.dataset.testid = `panel-${id}`;
    el.setAttribute('role', 'tabpanel');
    el.setAttribute('aria-labelledby', button.id);
    el.hidden = true;
    this.tabs.append(button);
    this.body.append(el);
    this.sections.set(id, { button, el });
    this.render();
    return el;
  }

  get current(): string {
    const want = this.view.state.layout.sideTab;
    return this.sections.has(want) ? want : (this.sections.keys().next().value ?? want);
  }

  select(id: string): void {
    if (!this.sections.has(id)) return;
    this.view.setLayout({ sideTab: id, sideCollapsed: false });
    this.render();
    for (const l of this.listeners) l(id);
  }

  onSelect(l: (id: string) => void): void {
    this.listeners.add(l);
  }

  private render(): void {
    const { sideCollapsed, sideWidth } = this.view.state.layout;
    const current = this.current;
    for (const [key, s] of this.sections) {
      const on = key === current;
      s.el.hidden = !on;
      s.button.classList.toggle('rf-tab-on', on);
      s.button.setAttribute('aria-selected', String(on));
      s.button.tabIndex = on ? 0 : -1;
    }
    this.root.hidden = sideCollapsed;
    this.grip.hidden = sideCollapsed;
    this.strip.hidden = !sideCollapsed;
    this.root.style.width = `${sideWidth}px`;
    this.grip.setAttribute('aria-valuenow', String(sideWidth));
  }

  private onTabKey(e: KeyboardEvent): void {
    const ids = [...this.sections.keys()];
    const at = ids.indexOf(this.current);
    const next =
      e.key === 'ArrowRight'
        ? (at + 1) % ids.length
        : e.key === 'ArrowLeft'
          ? (at - 1 + ids.length) % ids.length
          : e.key === 'Home'
            ? 0
            : e.key === 'End'
              ? ids.length - 1
              : -1;
    if (next < 0) return;
    e.preventDefault();
    this.select(ids[next]);
    this.sections.get(ids[next])!.button.focus();
  }

  private startDrag(e: PointerEvent): void {
    e.preventDefault();
    const startX = e.clientX;
    const startW = this.view.state.layout.sideWidth;
    this.grip.setPointerCapture(e.pointerId);
    const move = (m: PointerEvent) => this.view.setLayout({ sideWidth: startW + (startX - m.clientX) });
    const up = () => {
      this.grip.removeEventListener('pointermove', move);
      this.grip.removeEventListener('pointerup', up);
    };
    this.grip.addEventListener('pointermove', move);
    this.grip.addEventListener('pointerup', up);
  }
}
