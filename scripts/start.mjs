// `npm start`: open the Electron workbench; when the Electron runtime is missing or
// cannot start, say so in one line and open the browser host instead.
import { spawn } from 'node:child_process';
import { buildIfNeeded, root } from './buildState.mjs';
import { findElectronRuntime } from './electronRuntime.mjs';
import { serve } from './serve.mjs';

const args = process.argv.slice(2);
const runtime = findElectronRuntime();

if (!runtime.ok) {
  console.log(`Rankfill: Electron cannot start because ${runtime.reason}; opening the browser workbench instead.`);
  serve(args);
} else {
  buildIfNeeded();
  const started = Date.now();
  let stderr = '';
  const child = spawn(runtime.executable, [root], { cwd: root, stdio: ['ignore', 'inherit', 'pipe'] });
  child.stderr.on('data', (d) => {
    stderr += d;
    process.stderr.write(d);
  });
  const fallBack = (why) => {
    console.log(`Rankfill: Electron cannot start because ${why}; opening the browser workbench instead.`);
    serve(args);
  };
  child.on('error', (err) => fallBack(err.message));
  child.on('exit', (code, signal) => {
    // A runtime that dies within seconds (no display, missing libraries) is a failed start.
    if ((code !== 0 || signal) && Date.now() - started < 8000) {
      const last = stderr.trim().split('\n').pop() || `it exited with ${signal ?? `code ${code}`}`;
      fallBack(last.slice(0, 200));
    } else process.exit(code ?? 0);
  });
}
