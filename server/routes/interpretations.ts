/**
 * POST /api/v1/interpretations — interprets a survey (JSON) or a pick table (text/csv)
 * and stores nothing. Being a pure computation behind a body limit, it needs no write
 * token even on the office network.
 */
import type { FastifyInstance } from 'fastify';
import { surveyFromRequest } from '../survey-input.js';
import { clientGone } from '../compute/client-gone.js';

export async function interpretationRoutes(app: FastifyInstance): Promise<void> {
  app.post('/api/v1/interpretations', async (request, reply) => {
    const survey = surveyFromRequest(request);
    return app.compute.run('interpret', { survey }, clientGone(reply));
  });
}
