/** The one-line notice under the title bar: refusals, import problems, host messages. */
export class Notice {
  private timer: ReturnType<typeof setTimeout> | undefined;

  constructor(private readonly el: HTMLElement) {}

  show(message: string, kind: 'info' | 'error' = 'info', ms = 6000): void {
    clearTimeout(this.timer);
    this.el.textContent = message;
    this.el.classList.toggle('rf-error', kind === 'error');
    this.el.hidden = false;
    if (ms > 0) this.timer = setTimeout(() => this.hide(), ms);
  }

  hide(): void {
    this.el.hidden = true;
    this.el.textContent = '';
  }
}
