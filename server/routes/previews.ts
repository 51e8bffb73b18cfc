/**
 * Drawings of a line that is not stored. The body is the same as for
 * POST /api/v1/interpretations (a survey as JSON, or a pick table as text/csv) and goes
 * through the same door (surveyFromRequest), so a bad line answers the same coded 400 and an
 * oversized one 413. Nothing is stored, so like the interpretation route these need no write
 * token.
 *
 * - POST /api/v1/previews — interprets once and answers
 *   `{interpretation, sectionSvg, travelTimesSvg}`: what the page shows after Interpret.
 *   One interpretation (with its forward check) instead of three, and the JSON and the
 *   drawings cannot disagree because they come from the same object.
 * - POST /api/v1/previews/section.svg and /traveltimes.svg — one figure as an SVG document,
 *   kept for scripts that fetch a single drawing. These get the same script-free
 *   Content-Security-Policy as the stored drawings (security-headers.ts chooses it from the
 *   image/svg+xml content type).
 *
 * The SVG text inside the JSON is never parsed into the page: the page wraps it in an
 * image/svg+xml Blob and shows it in an <img>, where an SVG runs no script.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { Type } from '@sinclair/typebox';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { surveyFromRequest, surveyInput } from '../survey-input.js';
import { errorResponses, fileResponse, MethodsAnswerSchema } from '../route-schemas.js';
import { clientGone } from '../compute/client-gone.js';
import type { Figure } from '../compute/tasks.js';

/** The answer of POST /api/v1/previews. */
const PreviewBundleSchema = Type.Object(
  {
    interpretation: InterpretationSchema,
    sectionSvg: Type.String({ description: 'The depth section, an SVG document (its first sheet when the line is paged).' }),
    sectionSheets: Type.Array(Type.String(), {
      minItems: 1,
      description: 'Every sheet of the depth section, in order along the line, each an SVG document: one for a line that fits one sheet; a long line is paged over several that meet at match lines.',
    }),
    travelTimesSvg: Type.String({ description: 'The time–distance plot, an SVG document.' }),
    grmSvg: Type.Optional(Type.String({ description: 'With options.method "grm": the GRM functions of every XY tried, an SVG document.' })),
  },
  { additionalProperties: false, title: 'PreviewBundle' },
);

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
  // One interpretation and both drawings from it, in one worker task (compute/tasks.ts).
  const bundleSchema = {
    summary: 'Interpret a line that is not stored and draw both figures from that one interpretation.',
    tags: ['previews'],
    response: { 200: PreviewBundleSchema, ...errorResponses(400, 413, 422, 503) },
  };
  app.post('/api/v1/previews', surveyInput(bundleSchema), async (request, reply) => {
    const survey = surveyFromRequest(request);
    const bundle = await app.compute.run('preview', { survey }, clientGone(reply));
    reply.header('Cache-Control', 'no-store');
    return bundle;
  });
  // The line by every method (not stored): what the page's "Compare methods" shows for a preview.
  app.post(
    '/api/v1/previews/methods',
    surveyInput({
      summary: 'Interpret a line that is not stored by plus-minus, GRM and time terms: where they differ by more than their combined 1σ, and the overlay figure.',
      tags: ['previews'],
      response: { 200: MethodsAnswerSchema, ...errorResponses(400, 413, 422, 503) },
    }),
    async (request, reply) => {
      const survey = surveyFromRequest(request);
      const answer = await app.compute.run('methods', { survey }, clientGone(reply));
      reply.header('Cache-Control', 'no-store');
      return answer;
    },
  );
  for (const { path, figure } of PREVIEWS) {
    const svg = fileResponse('image/svg+xml', 'The drawing as SVG.');
    app.post(path, surveyInput({ summary: 'Draw a line that is not stored.', tags: ['previews'], response: { 200: svg, ...errorResponses(400, 413, 422, 503) } }), async (request, reply) => {
      const survey = surveyFromRequest(request);
      const { sectionSvg, travelTimesSvg } = await app.compute.run('preview', { survey }, clientGone(reply));
      return svgReply(reply, figure === 'section' ? sectionSvg : travelTimesSvg);
    });
  }
}
