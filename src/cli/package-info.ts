/** The package's own version and root folder, read once from package.json. */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const PACKAGE_ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

let version: string | undefined;
export function toolVersion(): string {
  if (!version) {
    const pkg = JSON.parse(readFileSync(join(PACKAGE_ROOT, 'package.json'), 'utf8')) as { version: string };
    version = pkg.version;
  }
  return version;
}
