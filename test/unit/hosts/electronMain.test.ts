import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it, vi } from 'vitest';

// A recording stand-in for the `electron` module: the runtime cannot be
// downloaded here, so the host's wiring is checked against this double.
const rec = vi.hoisted(() => ({
  privileged: [] as unknown[],
  protocolHandlers: new Map<string, unknown>(),
  ipcHandlers: new Map<string, unknown>(),
  windows: [] as {
    options: Record<string, unknown>;
    url?: string;
    listeners: Map<string, (e: { preventDefault(): void }) => void>;
  }[],
  menus: 0,
  appListeners: new Map<string, unknown>(),
  ready: undefined as undefined | (() => void),
}));

vi.mock('electron', () => {
  class BrowserWindow {
    webContents = { send: vi.fn(), isDestroyed: () => false };
    private readonly entry: (typeof rec.windows)[number];
    constructor(options: Record<string, unknown>) {
      this.entry = { options, listeners: new Map() };
      rec.windows.push(this.entry);
    }
    once() {}
    on(name: string, fn: (e: { preventDefault(): void }) => void) {
      this.entry.listeners.set(name, fn);
    }
    loadURL(url: string) {
      this.entry.url = url;
      return Promise.resolve();
    }
  }
  return {
    app: {
      requestSingleInstanceLock: () => true,
      quit: vi.fn(),
      on: (name: string, fn: unknown) => rec.appListeners.set(name, fn),
      whenReady: () => new Promise<void>((resolve) => (rec.ready = resolve)),
    },
    BrowserWindow,
    ipcMain: { handle: (ch: string, fn: unknown) => rec.ipcHandlers.set(ch, fn), removeHandler: vi.fn() },
    Menu: { buildFromTemplate: (t: unknown) => t, setApplicationMenu: () => rec.menus++ },
    protocol: {
      registerSchemesAsPrivileged: (s: unknown[]) => rec.privileged.push(...s),
      handle: (scheme: string, fn: unknown) => rec.protocolHandlers.set(scheme, fn),
    },
    session: { defaultSession: { setPermissionRequestHandler: vi.fn(), setPermissionCheckHandler: vi.fn() } },
    dialog: {},
  };
});
// The real factories import built worker paths (`?modulePath`), which only electron-vite resolves.
vi.mock('../../../src-main/workers/createFitWorker', () => ({ createFitWorker: vi.fn() }));
vi.mock('../../../src-main/services/createParseWorker', () => ({ createParseWorker: vi.fn() }));

describe('Electron host wiring (mocked electron)', () => {
  beforeAll(async () => {
    process.env.RANKFILL_CONFIG_DIR = mkdtempSync(join(tmpdir(), 'rankfill-electron-'));
    const { runElectronHost } = await import('../../../src-main/hosts/electron/electronMain');
    runElectronHost();
    rec.ready!();
    await new Promise((r) => setTimeout(r, 50));
  });

  it('registers our privileged scheme and serves the page from it', () => {
    expect(rec.privileged).toEqual([
      { scheme: 'rankfill', privileges: { standard: true, secure: true, supportFetchAPI: true } },
    ]);
    expect(rec.protocolHandlers.has('rankfill')).toBe(true);
  });

  it('opens one window with the security settings and the sandboxed preload, loading our page', () => {
    expect(rec.windows).toHaveLength(1);
    const w = rec.windows[0];
    expect(w.url).toBe('rankfill://app/index.html');
    const prefs = w.options.webPreferences as Record<string, unknown>;
    expect(prefs).toMatchObject({ contextIsolation: true, sandbox: true, nodeIntegration: false, webSecurity: true });
    expect(String(prefs.preload)).toMatch(/preload[\\/]preload\.js$/);
  });

  it('answers the typed API over IPC and sets our menu', async () => {
    const call = rec.ipcHandlers.get('rankfill:call') as (
      e: unknown,
      m: string,
      p: unknown,
    ) => Promise<{ ok: boolean; data?: { host: string } }>;
    const reply = await call({ senderFrame: { url: 'rankfill://app/index.html' } }, 'app.info', {});
    expect(reply.ok).toBe(true);
    expect(reply.data?.host).toBe('electron');
    expect(rec.menus).toBeGreaterThan(0);
  });

  it('asks the page before the window closes', () => {
    const w = rec.windows[0];
    const e = { preventDefault: vi.fn() };
    w.listeners.get('close')!(e);
    expect(e.preventDefault).toHaveBeenCalled();
  });
});
