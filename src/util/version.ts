/** The version of tolrate, read from its package.json (in the source tree or the installed package). */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

export function packageVersion(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  for (const p of [join(here, '..', '..', 'package.json'), join(here, '..', 'package.json')]) {
    try {
      const pkg = JSON.parse(readFileSync(p, 'utf8')) as { name?: string; version?: string };
      if (pkg.name === 'tolrate' && pkg.version) return pkg.version;
    } catch {
      // try the next location
    }
  }
  return 'unknown';
}
