/**
 * The main window's construction options: the security settings of Electron's
 * own checklist (context isolation, sandboxed renderer, no Node in the page,
 * web security on, no webviews) live here, in one place a test can read.
 */
import type { BrowserWindowConstructorOptions } from 'electron';

export function mainWindowOptions(preloadPath: string): BrowserWindowConstructorOptions {
  return {
    width: 1360,
    height: 860,
    minWidth: 900,
    minHeight: 560,
    title: 'Rankfill',
    backgroundColor: '#f6f4ef',
    show: false,
    webPreferences: {
      preload: preloadPath,
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
      spellcheck: false,
      navigateOnDragDrop: false,
    },
  };
}
