/**
 * POST /api/v1/interpretations — interprets a survey (JSON) or a pick table (text/csv)
 * and stores nothing. Being a pure computation behind a body limit, it needs no write
 * token even on the office network.
 */
import type { FastifyInstance } from 'fastify';
import { interpret } from '../../engine/pipeline/interpret.js';
import { surveyFromRequest } from '../survey-input.js';

export async function interpretationRoutes(app: FastifyInstance): Promise<void> {
  app.post('/api/v1/interpretations', async (request) => {
    const survey = surveyFromRequest(request);
    return interpret(survey);
  });
}
