/** Page entry: connect to whichever host is present and start the workbench. */
import { messageOf, startApp } from './app';
import { ApiCallError, connectToHost } from './bridge/hostBridge';

/** Why the page could not start, and what to do. */
function startFailure(err: unknown): string {
  if (err instanceof ApiCallError && err.code === 'unauthorized') {
    return (
      'Rankfill could not start: this page was opened without its access token. ' +
      'Open the address printed in the terminal where Rankfill was started (it ends in #token=…); ' +
      'the token is new each time Rankfill starts.'
    );
  }
  return `Rankfill could not start: ${messageOf(err)}`;
}

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
      el.textContent = startFailure(err);
    }
    // Nothing else is shown: the grid's own empty text would only distract from the reason.
    document.body.dataset.startFailed = 'true';
    document.querySelector<HTMLElement>('[data-testid="grid"]')?.setAttribute('hidden', '');
  });
