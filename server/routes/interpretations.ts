/**
 * POST /api/v1/interpretations — interprets a survey (JSON) or a pick table (text/csv)
 * and stores nothing. Being a pure computation behind a body limit, it needs no write
 * token even on the office network.
 */
import type { FastifyInstance } from 'fastify';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { errorResponses } from '../route-schemas.js';
import { surveyFromRequest, surveyInput } from '../survey-input.js';
import { clientGone } from '../compute/client-gone.js';

export async function interpretationRoutes(app: FastifyInstance): Promise<void> {
  const schema = {
    summary: 'Interpret a survey; stores nothing.',
    tags: ['interpretations'],
    response: { 200: InterpretationSchema, ...errorResponses(400, 413, 422, 503) },
  };
  app.post('/api/v1/interpretations', surveyInput(schema), async (request, reply) =>
    app.compute.run('interpret', { survey: surveyFromRequest(request) }, clientGone(reply)),
  );
}
