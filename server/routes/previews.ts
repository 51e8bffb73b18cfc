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
import { surveyFromRequest } from '../survey-input.js';
import { clientGone } from '../compute/client-gone.js';
import type { Figure } from '../compute/tasks.js';

const PREVIEWS: ReadonlyArray<{ path: string; figure: Figure }> = [
  { path: '/api/v1/previews/section.svg', figure: 'section' },
  { path: '/api/v1/previews/traveltimes.svg', figure: 'traveltimes' },
];

function svgReply(reply: FastifyReply, svg: string): string {
  reply.type('image/svg+xml; charset=utf-8');
  // A preview depends only on the body, but the body is not part of any cache key.
  reply.header('Cache-Control', 'no-store');
  return svg;
}

export async function previewRoutes(app: FastifyInstance): Promise<void> {
  for (const { path, figure } of PREVIEWS) {
    app.post(path, async (request, reply) => {
      const survey = surveyFromRequest(request);
      const { sectionSvg, travelTimesSvg } = await app.compute.run('preview', { survey }, clientGone(reply));
      return svgReply(reply, figure === 'section' ? sectionSvg : travelTimesSvg);
    });
  }
}
