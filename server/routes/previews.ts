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
import { interpret } from '../../engine/pipeline/interpret.js';
import { renderSection, renderTravelTimes } from '../../engine/render/index.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { surveyFromRequest } from '../survey-input.js';

type Renderer = (survey: Survey, interpretation: Interpretation) => string;

const PREVIEWS: ReadonlyArray<{ path: string; field: 'sectionSvg' | 'travelTimesSvg'; render: Renderer }> = [
  { path: '/api/v1/previews/section.svg', field: 'sectionSvg', render: (survey, interpretation) => renderSection(survey, interpretation) },
  { path: '/api/v1/previews/traveltimes.svg', field: 'travelTimesSvg', render: (survey, interpretation) => renderTravelTimes(survey, interpretation) },
];

/** The answer of POST /api/v1/previews: one interpretation and every figure drawn from it. */
export interface PreviewBundle {
  interpretation: Interpretation;
  sectionSvg: string;
  travelTimesSvg: string;
}

/** Interprets the survey once and draws every figure of PREVIEWS from that interpretation. */
export function previewBundle(survey: Survey): PreviewBundle {
  const interpretation = interpret(survey);
  const bundle: PreviewBundle = { interpretation, sectionSvg: '', travelTimesSvg: '' };
  for (const { field, render } of PREVIEWS) bundle[field] = render(survey, interpretation);
  return bundle;
}

function svgReply(reply: FastifyReply, svg: string): string {
  reply.type('image/svg+xml; charset=utf-8');
  // A preview depends only on the body, but the body is not part of any cache key.
  reply.header('Cache-Control', 'no-store');
  return svg;
}

export async function previewRoutes(app: FastifyInstance): Promise<void> {
  app.post('/api/v1/previews', async (request, reply) => {
    const survey = surveyFromRequest(request);
    reply.header('Cache-Control', 'no-store');
    return previewBundle(survey);
  });
  for (const { path, render } of PREVIEWS) {
    app.post(path, async (request, reply) => {
      const survey = surveyFromRequest(request);
      return svgReply(reply, render(survey, interpret(survey)));
    });
  }
}
