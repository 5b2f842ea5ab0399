/**
 * Entry of the browser host (out/main/browserHost.js):
 *   node out/main/browserHost.js [--port N] [--no-open]
 * Serves the workbench on 127.0.0.1, prints the address, and opens the system
 * browser when there is a display.
 */
import { join } from 'node:path';
import { createServices } from '../../services/createServices';
import { createFitWorker } from '../../workers/createFitWorker';
import { createParseWorker } from '../../services/createParseWorker';
import { startHttpHost } from './httpHost';
import { openBrowser } from './openBrowser';

function parseArgs(argv: string[]): { port: number; open: boolean } {
  let port = 0;
  let open = true;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--port') {
      port = Number(argv[++i]);
      if (!Number.isInteger(port) || port < 0 || port > 65535) {
        console.error('rankfill serve: --port takes a number from 0 to 65535');
        process.exit(2);
      }
    } else if (a.startsWith('--port=')) {
      port = Number(a.slice(7));
    } else if (a === '--no-open') {
      open = false;
    } else {
      console.error(`rankfill serve: unknown option ${a}\nusage: npm run serve -- [--port N] [--no-open]`);
      process.exit(2);
    }
  }
  return { port, open };
}

async function main(): Promise<void> {
  const args = parseArgs(process.argv.slice(2));
  const log = (line: string) => console.error(`[rankfill] ${line}`);
  const services = createServices({ host: 'browser', createWorker: createFitWorker, createParseWorker, log });
  const host = await startHttpHost({
    router: services.router,
    rendererDir: join(__dirname, '../renderer'),
    port: args.port,
    log,
  });
  console.log(`Rankfill is ready at ${host.launchUrl}`);
  // The browser gets a one-time launch address, never the token (its command line is visible to `ps`).
  if (args.open) openBrowser(host.newLaunchUrl());
  const stop = () => {
    void host
      .close()
      .then(() => services.dispose())
      .finally(() => process.exit(0));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err) => {
  console.error(`rankfill serve: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
