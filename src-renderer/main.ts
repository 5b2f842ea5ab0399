/** Page entry: connect to whichever host is present and start the workbench. */
import { messageOf, startApp } from './app';
import { connectToHost } from './bridge/hostBridge';

function styleNonce(): string {
  const meta = document.querySelector<HTMLMetaElement>('meta[name="rankfill-style-nonce"]');
  return meta?.content ?? '';
}

const bridge = connectToHost();
startApp(bridge, styleNonce())
  .then((app) => {
    (window as unknown as { rankfillApp: unknown }).rankfillApp = app;
    document.body.dataset.ready = 'true';
  })
  .catch((err: unknown) => {
    const el = document.querySelector<HTMLElement>('[data-testid="notice"]');
    if (el) {
      el.hidden = false;
      el.classList.add('rf-error');
      el.textContent = `Rankfill could not start: ${messageOf(err)}`;
    }
  });
