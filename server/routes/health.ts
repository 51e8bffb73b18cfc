/** GET /healthz — 200 {"status":"ok"} once the app (and its store) is ready. */
import type { FastifyInstance } from 'fastify';
import { HealthSchema } from '../route-schemas.js';

export async function healthRoutes(app: FastifyInstance): Promise<void> {
  app.get('/healthz', { schema: { summary: 'Ready check.', tags: ['service'], response: { 200: HealthSchema } } }, async () => ({ status: 'ok' as const }));
}
