/** GET /healthz — 200 {"status":"ok"} once the app (and its store) is ready. */
import type { FastifyInstance } from 'fastify';

export async function healthRoutes(app: FastifyInstance): Promise<void> {
  app.get('/healthz', async () => ({ status: 'ok' }));
}
