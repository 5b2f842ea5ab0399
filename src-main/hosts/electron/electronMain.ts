/**
 * The Electron host: one window, the renderer served from our own scheme,
 * the typed API over IPC, our own menu. All logic is in the services.
 */
import { app, BrowserWindow, ipcMain, Menu, protocol, session } from 'electron';
import { join } from 'node:path';
import { APP_ORIGIN, APP_SCHEME } from '../../../src-shared/ipcChannels';
import { createServices } from '../../services/createServices';
import { createFitWorker } from '../../workers/createFitWorker';
import { appMenuTemplate } from './appMenu';
import { electronShell } from './desktopShell';
import { createParseWorker } from '../../services/createParseWorker';
import { RecentFiles } from '../../services/recentFiles';
import { registerIpc } from './ipcBridge';
import { serveRendererRequest } from './rendererProtocol';
import { guardSession, guardWebContents } from './securityGuards';
import { mainWindowOptions } from './windowOptions';

export function runElectronHost(): void {
  protocol.registerSchemesAsPrivileged([
    { scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true } },
  ]);
  if (!app.requestSingleInstanceLock()) {
    app.quit();
    return;
  }

  let mainWindow: BrowserWindow | null = null;
  const log = (line: string) => console.error(`[rankfill] ${line}`);

  app.on('web-contents-created', (_e, contents) => guardWebContents(contents));
  app.on('second-instance', () => {
    if (mainWindow) {
      if (mainWindow.isMinimized()) mainWindow.restore();
      mainWindow.focus();
    }
  });
  app.on('window-all-closed', () => app.quit());

  void app.whenReady().then(() => {
    const rendererDir = join(__dirname, '../renderer');
    protocol.handle(APP_SCHEME, (request) => serveRendererRequest(rendererDir, request.url));
    guardSession(session.defaultSession);

    // Closing asks the page first (unsaved changes); the page answers through app.closeWindow.
    let closeAllowed = false;
    let send: (command: string) => void = () => {};
    const rebuildMenu = (
      recent: string[],
      edit: { undo: string | null; redo: string | null } = { undo: null, redo: null },
    ) =>
      Menu.setApplicationMenu(
        Menu.buildFromTemplate(appMenuTemplate(send, process.platform === 'darwin', recent, edit)),
      );
    const shell = electronShell({ window: () => mainWindow, allowClose: () => (closeAllowed = true), rebuildMenu });
    const services = createServices({ host: 'electron', createWorker: createFitWorker, createParseWorker, shell, log });
    registerIpc(ipcMain, services.router, () => (mainWindow ? [mainWindow.webContents] : []));

    send = (command: string) => services.router.emit('menu.command', { command });
    rebuildMenu([]);
    void new RecentFiles()
      .list()
      .then((files) => shell.recentChanged?.(files.map((f) => f.path)))
      .catch(() => undefined);

    mainWindow = new BrowserWindow(mainWindowOptions(join(__dirname, '../preload/preload.js')));
    mainWindow.once('ready-to-show', () => mainWindow?.show());
    mainWindow.on('close', (e) => {
      if (closeAllowed) return;
      e.preventDefault();
      send('app.closeRequested');
    });
    // A page that stopped answering cannot ask; let the window close.
    mainWindow.on('unresponsive', () => (closeAllowed = true));
    mainWindow.on('closed', () => {
      mainWindow = null;
    });
    void mainWindow.loadURL(`${APP_ORIGIN}/index.html`);

    app.on('before-quit', () => {
      void services.dispose();
    });
  });
}
