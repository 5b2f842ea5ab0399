/**
 * Opens the system browser on an address. The address handed over must never hold the
 * API token: a program's command line is readable by every local user (`ps`), so the
 * host passes a one-time launch address (see httpHost.ts) instead.
 */
import { spawn as nodeSpawn, type SpawnOptions } from 'node:child_process';

type Spawner = (
  command: string,
  args: string[],
  options: SpawnOptions,
) => { on(event: 'error', l: () => void): unknown; unref(): void };

export interface OpenBrowserEnv {
  platform?: NodeJS.Platform;
  env?: NodeJS.ProcessEnv;
  spawn?: Spawner;
}

/** The opener command and its arguments for an address. */
function openerCommand(url: string, platform: NodeJS.Platform): [string, string[]] {
  if (platform === 'darwin') return ['open', [url]];
  if (platform === 'win32') return ['explorer', [url]];
  return ['xdg-open', [url]];
}

/** Returns true when an opener was started (on Linux only with a display). */
export function openBrowser(url: string, o: OpenBrowserEnv = {}): boolean {
  const platform = o.platform ?? process.platform;
  const env = o.env ?? process.env;
  const hasDisplay = platform !== 'linux' || Boolean(env.DISPLAY || env.WAYLAND_DISPLAY);
  if (!hasDisplay) return false;
  const [cmd, args] = openerCommand(url, platform);
  try {
    const child = (o.spawn ?? (nodeSpawn as unknown as Spawner))(cmd, args, { stdio: 'ignore', detached: true });
    child.on('error', () => {});
    child.unref();
    return true;
  } catch {
    return false; // No system browser: the printed address is enough.
  }
}
