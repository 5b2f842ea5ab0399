/** Electron main-process entry (package.json "main" → out/main/index.js). */
import { runElectronHost } from './hosts/electron/electronMain';

runElectronHost();
