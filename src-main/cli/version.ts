/** The app version from package.json ("unknown" when it cannot be read). */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

export function appVersion(): string {
  try {
    return (JSON.parse(readFileSync(join(__dirname, '..', '..', 'package.json'), 'utf8')) as { version: string })
      .version;
  } catch {
    return 'unknown';
  }
}
