/**
 * POST /api/v1/previews/section.svg and POST /api/v1/previews/traveltimes.svg — the depth
 * section and the time–distance plot of a line that is not stored. The body is the same as
 * for POST /api/v1/interpretations (a survey as JSON, or a pick table as text/csv) and goes
 * through the same door (surveyFromRequest), so a bad line answers the same coded 400 and an
 * oversized one 413. Stores nothing, so like the interpretation route it needs no write
 * token; the SVG gets the same script-free Content-Security-Policy as the stored drawings
 * (security-headers.ts chooses it from the image/svg+xml content type).
 *
 * Why a route per figure rather than one JSON answer with both: the page shows each figure
 * in an <img>, and an SVG document in an image runs no script and needs no escaping.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { interpret } from '../../engine/pipeline/interpret.js';
import { renderSection, renderTravelTimes } from '../../engine/render/index.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { surveyFromRequest, surveyInput } from '../survey-input.js';
import { errorResponses, fileResponse } from '../route-schemas.js';

type Renderer = (survey: Survey, interpretation: Interpretation) => string;

const PREVIEWS: ReadonlyArray<{ path: string; render: Renderer }> = [
  { path: '/api/v1/previews/section.svg', render: (survey, interpretation) => renderSection(survey, interpretation) },
  { path: '/api/v1/previews/traveltimes.svg', render: (survey, interpretation) => renderTravelTimes(survey, interpretation) },
];

function svgReply(reply: FastifyReply, svg: string): string {
  reply.type('image/svg+xml; charset=utf-8');
  // A preview depends only on the body, but the body is not part of any cache key.
  reply.header('Cache-Control', 'no-store');
  return svg;
}

export async function previewRoutes(app: FastifyInstance): Promise<void> {
  for (const { path, render } of PREVIEWS) {
    const svg = fileResponse('image/svg+xml', 'The drawing as SVG.');
    app.post(path, surveyInput({ summary: 'Draw a line that is not stored.', tags: ['previews'], response: { 200: svg, ...errorResponses(400, 413) } }), async (request, reply) => {
      const survey = surveyFromRequest(request);
      return svgReply(reply, render(survey, interpret(survey)));
    });
  }
}
