/**
 * Serves Demo A's SEG-2 files (samples/demo-line-<shot>.sg2, invented data written by
 * `npm run samples`) at /samples/<file>, so the page's "Load the demo gathers" can fetch
 * them and send them through the same upload path as a user's own files. Only those files,
 * read once at start (five files of about 53 kB); any other name is the ordinary 404.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance } from 'fastify';

/** The demo's gather files by name: "demo-line-" then the shot id, ".sg2". */
export const DEMO_GATHER_FILE = /^demo-line-[A-Za-z0-9-]{1,40}\.sg2$/;

/** samples/ beside the source (server/) or the build (dist/server/); null when neither has one. */
export function findSamplesDir(): string | null {
  const here = dirname(fileURLToPath(import.meta.url));
  return [resolve(here, '..', 'samples'), resolve(here, '..', '..', 'samples')].find((dir) => existsSync(dir)) ?? null;
}

export async function demoGathersRoute(app: FastifyInstance, options: { samplesDir: string }): Promise<void> {
  // O(files in samples/), once.
  const files = new Map<string, Buffer>();
  for (const name of readdirSync(options.samplesDir)) {
    if (DEMO_GATHER_FILE.test(name)) files.set(name, readFileSync(resolve(options.samplesDir, name)));
  }
  app.get<{ Params: { file: string } }>('/samples/:file', { schema: { hide: true } }, async (request, reply) => {
    const bytes = files.get(request.params.file);
    if (bytes === undefined) return reply.callNotFound();
    reply.type('application/octet-stream');
    return bytes;
  });
}
