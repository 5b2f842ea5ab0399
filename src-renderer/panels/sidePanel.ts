/**
 * The side panel: a row of tabs over one visible section at a time. Panels
 * register a tab and get their own container.
 */
export class SidePanel {
  private readonly tabs: HTMLElement;
  private readonly body: HTMLElement;
  private readonly sections = new Map<string, { button: HTMLButtonElement; el: HTMLElement }>();
  private readonly listeners = new Set<(id: string) => void>();
  current: string | null = null;

  constructor(root: HTMLElement) {
    root.classList.add('rf-side-panel');
    this.tabs = document.createElement('div');
    this.tabs.className = 'rf-tabs';
    this.tabs.setAttribute('role', 'tablist');
    this.body = document.createElement('div');
    this.body.className = 'rf-tab-body';
    root.replaceChildren(this.tabs, this.body);
  }

  add(id: string, title: string): HTMLElement {
    const button = document.createElement('button');
    button.type = 'button';
    button.className = 'rf-tab';
    button.textContent = title;
    button.dataset.testid = `tab-${id}`;
    button.setAttribute('role', 'tab');
    button.addEventListener('click', () => this.select(id));
    const el = document.createElement('section');
    el.className = 'rf-tab-section';
    el.dataset.testid = `panel-${id}`;
    el.hidden = true;
    this.tabs.append(button);
    this.body.append(el);
    this.sections.set(id, { button, el });
    if (!this.current) this.select(id);
    return el;
  }

  select(id: string): void {
    for (const [key, s] of this.sections) {
      const on = key === id;
      s.el.hidden = !on;
      s.button.classList.toggle('rf-tab-on', on);
      s.button.setAttribute('aria-selected', String(on));
    }
    this.current = id;
    for (const l of this.listeners) l(id);
  }

  onSelect(l: (id: string) => void): void {
    this.listeners.add(l);
  }
}
