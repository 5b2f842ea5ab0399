// `npm run serve [-- --port N] [--no-open]`: build if needed, then run the loopback browser host.
import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { buildIfNeeded, root } from './buildState.mjs';

export function serve(args) {
  buildIfNeeded();
  const child = spawn(process.execPath, [join(root, 'out', 'main', 'browserHost.js'), ...args], {
    cwd: root,
    stdio: 'inherit',
  });
  const forward = (sig) => child.kill(sig);
  process.on('SIGINT', forward);
  process.on('SIGTERM', forward);
  child.on('exit', (code) => process.exit(code ?? 0));
}

if (process.argv[1] && process.argv[1].endsWith('serve.mjs')) serve(process.argv.slice(2));
