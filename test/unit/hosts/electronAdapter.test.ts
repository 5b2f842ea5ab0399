import { describe, expect, it, vi } from 'vitest';

// The Electron runtime cannot be downloaded here, so the adapter is exercised
// against a mocked `electron` module (types still come from the real package).
vi.mock('electron', () => ({
  app: {},
  BrowserWindow: class {},
  ipcMain: {},
  Menu: {},
  protocol: {},
  session: {},
}));

import type { IpcMain, MenuItemConstructorOptions, WebContents } from 'electron';
import { appMenuTemplate } from '../../../src-main/hosts/electron/appMenu';
import { registerIpc } from '../../../src-main/hosts/electron/ipcBridge';
import { guardSession, guardWebContents, isAppUrl } from '../../../src-main/hosts/electron/securityGuards';
import { mainWindowOptions } from '../../../src-main/hosts/electron/windowOptions';
import { ApiRouter, type ApiHandlers } from '../../../src-main/services/apiRouter';
import { IPC_CALL_CHANNEL, IPC_EVENT_CHANNEL } from '../../../src-shared/ipcChannels';

// Source: Electron's security checklist (electronjs.org/docs/latest/tutorial/security):
// context isolation, sandbox, no Node integration, web security on, no webviews.
describe('main window options', () => {
  it('carry the security settings', () => {
    const o = mainWindowOptions('/app/out/preload/preload.js');
    expect(o.webPreferences).toMatchObject({
      preload: '/app/out/preload/preload.js',
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
    });
  });
});

describe('IPC adapter', () => {
  const handlers = {
    'app.info': async () => ({ name: 'Rankfill', version: '1.2.3', apiVersion: 1, host: 'electron' as const }),
  } as unknown as ApiHandlers;

  function fakeIpc() {
    const handlers = new Map<string, (...a: unknown[]) => unknown>();
    const ipc = {
      handle: vi.fn((ch: string, fn: (...a: unknown[]) => unknown) => handlers.set(ch, fn)),
      removeHandler: vi.fn((ch: string) => handlers.delete(ch)),
    };
    return { ipc: ipc as unknown as IpcMain, handlers };
  }

  it('forwards calls from our own page to the router', async () => {
    const { ipc, handlers: h } = fakeIpc();
    registerIpc(ipc, new ApiRouter(handlers), () => []);
    const fn = h.get(IPC_CALL_CHANNEL)!;
    const reply = await fn({ senderFrame: { url: 'rankfill://app/index.html' } }, 'app.info', {});
    expect(reply).toEqual({ ok: true, data: { name: 'Rankfill', version: '1.2.3', apiVersion: 1, host: 'electron' } });
  });

  it('refuses calls from any other frame', async () => {
    const { ipc, handlers: h } = fakeIpc();
    registerIpc(ipc, new ApiRouter(handlers), () => []);
    const reply = await h.get(IPC_CALL_CHANNEL)!({ senderFrame: { url: 'https://example.com/' } }, 'app.info', {});
    expect(reply).toEqual({
      ok: false,
      error: { code: 'unauthorized', message: 'calls are accepted only from the Rankfill page' },
    });
  });

  it('answers an invalid message with an error reply', async () => {
    const { ipc, handlers: h } = fakeIpc();
    registerIpc(ipc, new ApiRouter(handlers), () => []);
    const reply = (await h.get(IPC_CALL_CHANNEL)!({ senderFrame: { url: 'rankfill://app/' } }, 'app.info', {
      nope: 1,
    })) as { ok: boolean; error: { code: string } };
    expect(reply.ok).toBe(false);
    expect(reply.error.code).toBe('bad-request');
  });

  it('sends validated events to the window and stops on dispose', () => {
    const { ipc, handlers: h } = fakeIpc();
    const router = new ApiRouter(handlers);
    const wc = { send: vi.fn(), isDestroyed: () => false } as unknown as WebContents;
    const dispose = registerIpc(ipc, router, () => [wc]);
    router.emit('menu.command', { command: 'model.fill' });
    expect(wc.send).toHaveBeenCalledWith(IPC_EVENT_CHANNEL, {
      event: 'menu.command',
      payload: { command: 'model.fill' },
    });
    dispose();
    expect(h.has(IPC_CALL_CHANNEL)).toBe(false);
    router.emit('menu.command', { command: 'model.fill' });
    expect(wc.send).toHaveBeenCalledTimes(1);
  });
});

describe('navigation and window guards', () => {
  it('deny new windows and navigation away from the app', () => {
    const listeners = new Map<string, (e: { preventDefault: () => void }, url?: string) => void>();
    let openHandler: (() => { action: string }) | undefined;
    const contents = {
      setWindowOpenHandler: (fn: () => { action: string }) => (openHandler = fn),
      on: (name: string, fn: (e: { preventDefault: () => void }, url?: string) => void) => listeners.set(name, fn),
    } as unknown as WebContents;
    guardWebContents(contents);
    expect(openHandler!()).toEqual({ action: 'deny' });
    const prevented = (name: string, url: string) => {
      const e = { preventDefault: vi.fn() };
      listeners.get(name)!(e, url);
      return e.preventDefault.mock.calls.length === 1;
    };
    expect(prevented('will-navigate', 'https://example.com/')).toBe(true);
    expect(prevented('will-navigate', 'rankfill://app/index.html')).toBe(false);
    expect(prevented('will-redirect', 'file:///etc/passwd')).toBe(true);
    expect(prevented('will-attach-webview', '')).toBe(true);
    expect(isAppUrl('rankfill://application/')).toBe(false);
  });

  it('grant no permissions', () => {
    let request: ((c: unknown, p: string, cb: (ok: boolean) => void) => void) | undefined;
    let check: (() => boolean) | undefined;
    const session = {
      setPermissionRequestHandler: (fn: typeof request) => (request = fn),
      setPermissionCheckHandler: (fn: typeof check) => (check = fn),
    };
    guardSession(session as never);
    const cb = vi.fn();
    request!({}, 'media', cb);
    expect(cb).toHaveBeenCalledWith(false);
    expect(check!()).toBe(false);
  });
});

describe('application menu', () => {
  it('has our own top-level menus and forwards commands to the page', () => {
    const sent: string[] = [];
    const t = appMenuTemplate((c) => sent.push(c), false);
    expect(t.map((m) => m.label)).toEqual(['&File', '&Edit', '&View', '&Model', '&Help']);
    const model = t[3].submenu as MenuItemConstructorOptions[];
    expect(model.map((m) => m.label)).toEqual([
      'Fill Blank Cells',
      'Weigh Centering Choices',
      'Search Rank and Regularization…',
    ]);
    (model[0].click as () => void)();
    expect(sent).toEqual(['model.fill']);
    const edit = t[1].submenu as MenuItemConstructorOptions[];
    expect(edit[0]).toMatchObject({ label: 'Take Back', accelerator: 'CmdOrCtrl+Z' });
  });
});
