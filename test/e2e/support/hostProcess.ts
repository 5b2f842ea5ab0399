/**
 * Starts the built browser host (out/main/browserHost.js) as a child process,
 * as `npm run serve` would, and reads its address from the line it prints.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface RunningHost {
  child: ChildProcess;
  /** Base URL, e.g. http://127.0.0.1:43121/ */
  url: string;
  /** URL with the token fragment, as printed for the user. */
  launchUrl: string;
  token: string;
  port: number;
  output: () => string;
  stop(): Promise<void>;
}

export const repoRoot = join(__dirname, '../../..');

/** Starts the host with its own fresh config folder (recovery files, recent list) unless `env` names one. */
export function startHost(
  extraArgs: string[] = [],
  env: NodeJS.ProcessEnv = {},
  o: { open?: boolean } = {},
): Promise<RunningHost> {
  const configDir = mkdtempSync(join(tmpdir(), 'rankfill-e2e-config-'));
  const child = spawn(
    process.execPath,
    [join(repoRoot, 'out/main/browserHost.js'), '--port', '0', ...(o.open ? [] : ['--no-open']), ...extraArgs],
    {
      cwd: repoRoot,
      env: { ...process.env, RANKFILL_CONFIG_DIR: configDir, RANKFILL_EXPORT_DIR: join(configDir, 'exports'), ...env },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  let out = '';
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`host did not start in 20 s:\n${out}`)), 20_000);
    const onData = (d: Buffer) => {
      out += d.toString();
      const m = /Rankfill is ready at (http:\/\/127\.0\.0\.1:(\d+)\/)#token=(\S+)/.exec(out);
      if (m) {
        clearTimeout(timer);
        resolve({
          child,
          url: m[1],
          launchUrl: `${m[1]}#token=${m[3]}`,
          token: m[3],
          port: Number(m[2]),
          output: () => out,
          stop: () =>
            new Promise<void>((done) => {
              if (child.exitCode !== null) return done();
              child.once('exit', () => done());
              child.kill('SIGTERM');
            }),
        });
      }
    };
    child.stdout!.on('data', onData);
    child.stderr!.on('data', (d: Buffer) => (out += d.toString()));
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`host exited with ${code}:\n${out}`));
    });
  });
}
