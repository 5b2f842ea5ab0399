/** The one-line notice under the title bar: refusals, import problems, host messages. */
export class Notice {
  private timer: ReturnType<typeof setTimeout> | undefined;
  private seq = 0;

  constructor(private readonly el: HTMLElement) {}

  /** Show a message; the returned id lets its sender take it back with `clear` once it no longer holds. */
  show(message: string, kind: 'info' | 'error' = 'info', ms = 6000): number {
    clearTimeout(this.timer);
    const id = ++this.seq;
    this.el.textContent = message;
    this.el.classList.toggle('rf-error', kind === 'error');
    this.el.hidden = false;
    if (ms > 0) this.timer = setTimeout(() => this.hide(), ms);
    return id;
  }

  /** Hide the message `id` if it is still the one shown. */
  clear(id: number): void {
    if (id === this.seq && !this.el.hidden) this.hide();
  }

  hide(): void {
    this.el.hidden = true;
    this.el.textContent = '';
  }
}
