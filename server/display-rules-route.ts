/**
 * Serves the display rules (engine/output/display-precision.js) to the page. The rules live
 * in the engine, which must never import web/; the page's modules import them by their path
 * on disk relative to web/ ('../engine/output/display-precision.js'), which a browser resolves
 * to /engine/output/display-precision.js. So this one file, and nothing else of the engine,
 * is served at that path: one copy of the rules for the drawings, the warnings, the page, the
 * share page and stations.csv.
 */
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance } from 'fastify';

/** Where the page asks for the rules: web/'s relative import, resolved from the site root. */
export const DISPLAY_RULES_PATH = '/engine/output/display-precision.js';

/** The file beside this module's engine: the source from server/, the build's copy from dist/server/. */
function displayRulesFile(): string {
  return resolve(dirname(fileURLToPath(import.meta.url)), '..', 'engine', 'output', 'display-precision.js');
}

export async function displayRulesRoute(app: FastifyInstance): Promise<void> {
  // Read once: the file is part of the release, like the page's own files.
  const source = readFileSync(displayRulesFile(), 'utf8');
  app.get(DISPLAY_RULES_PATH, { schema: { hide: true } }, async (_request, reply) => {
    reply.type('text/javascript; charset=utf-8');
    return source;
  });
}
