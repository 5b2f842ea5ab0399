/**
 * The per-user configuration folder for Rankfill:
 *   Linux/other: $XDG_CONFIG_HOME/rankfill or ~/.config/rankfill
 *   macOS:       ~/Library/Application Support/Rankfill
 *   Windows:     %APPDATA%\Rankfill
 * RANKFILL_CONFIG_DIR overrides all of these (used by tests and portable setups).
 */
import os from 'node:os';
import path from 'node:path';

export function defaultConfigDir(
  env: NodeJS.ProcessEnv = process.env,
  platform: NodeJS.Platform = process.platform,
): string {
  if (env.RANKFILL_CONFIG_DIR) return path.resolve(env.RANKFILL_CONFIG_DIR);
  const home = os.homedir();
  if (platform === 'win32') return path.join(env.APPDATA ?? path.join(home, 'AppData', 'Roaming'), 'Rankfill');
  if (platform === 'darwin') return path.join(home, 'Library', 'Application Support', 'Rankfill');
  return path.join(env.XDG_CONFIG_HOME ?? path.join(home, '.config'), 'rankfill');
}

/** Default folder for recovery snapshots. */
export function defaultRecoveryDir(env: NodeJS.ProcessEnv = process.env): string {
  return path.join(defaultConfigDir(env), 'recovery');
}

/** Default file of the recent-files list. */
export function defaultRecentFilesPath(env: NodeJS.ProcessEnv = process.env): string {
  return path.join(defaultConfigDir(env), 'recent-files.json');
}
