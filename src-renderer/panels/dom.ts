/**
 * The page's one helper for building markup without innerHTML (the page allows
 * no inline script): panels, dialogs and the edit bar all use `el`.
 */

export interface ElOptions {
  className?: string;
  testid?: string;
  title?: string;
  hidden?: boolean;
  disabled?: boolean;
  /** Text content (instead of children). */
  text?: string;
  /** Any other attributes (role, type, name, inputmode, …). */
  attrs?: Record<string, string>;
}

export function el<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  opts: ElOptions = {},
  children: (Node | string)[] = [],
): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  if (opts.className) node.className = opts.className;
  if (opts.testid) node.dataset.testid = opts.testid;
  if (opts.title) node.title = opts.title;
  if (opts.hidden) node.hidden = true;
  if (opts.disabled && 'disabled' in node) (node as HTMLButtonElement).disabled = true;
  if (tag === 'button') (node as HTMLButtonElement).type = 'button';
  for (const [k, v] of Object.entries(opts.attrs ?? {})) node.setAttribute(k, v);
  if (opts.text !== undefined) node.textContent = opts.text;
  node.append(...children);
  return node;
}

export function numberInput(
  testid: string,
  value: number,
  o: { min?: number; max?: number; step?: number } = {},
): HTMLInputElement {
  const input = el('input', { testid });
  input.type = 'number';
  if (o.min !== undefined) input.min = String(o.min);
  if (o.max !== undefined) input.max = String(o.max);
  if (o.step !== undefined) input.step = String(o.step);
  input.value = String(value);
  return input;
}

/** A labelled control with an optional one-line explanation under it. */
export function field(label: string, control: HTMLElement, explanation?: string): HTMLElement {
  const wrap = el('label', { className: 'rf-form-field' }, [
    el('span', { className: 'rf-form-label' }, [label]),
    control,
  ]);
  if (explanation) wrap.append(el('span', { className: 'rf-hint' }, [explanation]));
  return wrap;
}

export function fmt(x: number | null | undefined, digits = 3): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits);
}
