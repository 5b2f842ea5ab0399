/**
 * One small modal dialog helper (a native <dialog>): a title, a body and a row
 * of buttons; resolves with the chosen button's value, or `cancelValue` on Escape.
 * Every dialog of the editing and project features is built on this.
 */

import { el } from '../panels/dom';

interface ModalButton<T> {
  label: string;
  value: T;
  primary?: boolean;
  danger?: boolean;
  testId?: string;
}

export interface ModalOptions<T> {
  title: string;
  body: HTMLElement | string;
  buttons: ModalButton<T>[];
  cancelValue: T;
  testId?: string;
  /** Checked before closing with a non-cancel value; return a message to keep the dialog open. */
  validate?: (value: T) => string | undefined;
  wide?: boolean;
}

let openCount = 0;
/** True while any of our dialogs is open (keyboard shortcuts stand aside). */
export function modalOpen(): boolean {
  return openCount > 0;
}

export function showModal<T>(opts: ModalOptions<T>): Promise<T> {
  const dialog = el('dialog', {
    className: `rf-dialog${opts.wide ? ' rf-dialog-wide' : ''}`,
    testid: opts.testId ?? 'dialog',
  });
  const body = typeof opts.body === 'string' ? el('p', { text: opts.body }) : opts.body;
  const error = el('div', { className: 'rf-dialog-error', testid: 'dialog-error', attrs: { role: 'alert' } });
  error.hidden = true;
  const buttons = el('div', { className: 'rf-dialog-buttons' });
  dialog.append(el('h2', { text: opts.title }), el('div', { className: 'rf-dialog-body' }, [body]), error, buttons);
  document.body.append(dialog);
  openCount++;
  return new Promise<T>((resolve) => {
    let done = false;
    const finish = (value: T) => {
      if (done) return;
      if (!Object.is(value, opts.cancelValue) && opts.validate) {
        const msg = opts.validate(value);
        if (msg) {
          error.textContent = msg;
          error.hidden = false;
          return;
        }
      }
      done = true;
      openCount--;
      dialog.close();
      dialog.remove();
      resolve(value);
    };
    for (const b of opts.buttons) {
      const btn = el('button', {
        className: `rf-button${b.primary ? ' rf-primary' : ''}${b.danger ? ' rf-danger' : ''}`,
        text: b.label,
        testid: b.testId,
        attrs: { type: 'button' },
      });
      btn.addEventListener('click', () => finish(b.value));
      buttons.append(btn);
    }
    dialog.addEventListener('cancel', (e) => {
      e.preventDefault();
      finish(opts.cancelValue);
    });
    // Enter in a text field chooses the primary button.
    dialog.addEventListener('keydown', (e) => {
      if (e.key === 'Enter' && e.target instanceof HTMLInputElement && e.target.type !== 'checkbox') {
        const primary = opts.buttons.find((b) => b.primary);
        if (primary) {
          e.preventDefault();
          finish(primary.value);
        }
      }
      e.stopPropagation();
    });
    dialog.showModal();
    const first =
      dialog.querySelector<HTMLElement>('input, select, textarea') ?? dialog.querySelector<HTMLElement>('.rf-primary');
    first?.focus();
  });
}

/** A yes/no question; resolves true for the confirming button. */
/**
 * Ask to confirm. With `destructive`, the confirming button is drawn as dangerous and the
 * safe choice (cancel) is the highlighted default that Enter and the first focus pick.
 */
export async function confirmDialog(
  title: string,
  message: string | HTMLElement,
  confirmLabel: string,
  cancelLabel = 'Cancel',
  testId = 'confirm-dialog',
  options: { destructive?: boolean } = {},
): Promise<boolean> {
  const destructive = options.destructive === true;
  return showModal<boolean>({
    title,
    body: message,
    testId,
    cancelValue: false,
    buttons: [
      { label: cancelLabel, value: false, testId: 'dialog-cancel', primary: destructive },
      { label: confirmLabel, value: true, primary: !destructive, danger: destructive, testId: 'dialog-confirm' },
    ],
  });
}

/** Ask for one line of text; `check` returns a message to refuse the value. Null when cancelled. */
export async function promptDialog(opts: {
  title: string;
  label: string;
  initial?: string;
  confirmLabel?: string;
  check?: (value: string) => string | undefined;
  testId?: string;
  hint?: string;
  extra?: HTMLElement;
}): Promise<string | null> {
  const input = el('input', { testid: 'prompt-input', attrs: { type: 'text', spellcheck: 'false' } });
  input.value = opts.initial ?? '';
  const body = el('div', {}, [
    el('label', { className: 'rf-dialog-field' }, [el('span', { text: opts.label }), input]),
  ]);
  if (opts.hint) body.append(el('p', { className: 'rf-hint', text: opts.hint }));
  if (opts.extra) body.append(opts.extra);
  const ok = await showModal<boolean>({
    title: opts.title,
    body,
    testId: opts.testId ?? 'prompt-dialog',
    cancelValue: false,
    validate: () => opts.check?.(input.value),
    buttons: [
      { label: 'Cancel', value: false, testId: 'dialog-cancel' },
      { label: opts.confirmLabel ?? 'OK', value: true, primary: true, testId: 'dialog-confirm' },
    ],
  });
  return ok ? input.value : null;
}

/** A list shown inside a dialog (problems, refused cells, values outside a scale). */
export function listBlock(lines: readonly string[], testId = 'dialog-list'): HTMLElement {
  const ul = el('ul', { className: 'rf-dialog-list', testid: testId });
  for (const l of lines) ul.append(el('li', { text: l }));
  return ul;
}
