/** Where the static page (web/) lives, from source (server/) or from the build (dist/server/). */
import { existsSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export function findWebRoot(): string | null {
  const here = dirname(fileURLToPath(import.meta.url));
  const candidates = [resolve(here, '..', 'web'), resolve(here, '..', '..', 'web')];
  return candidates.find((dir) => existsSync(resolve(dir, 'index.html'))) ?? candidates.find((dir) => existsSync(dir)) ?? null;
}
