/**
 * Share links: GET only. /share/:token is a read-only HTML page of the latest revision;
 * /share/:token/{section.svg,traveltimes.svg,methods.svg,stations.csv} are its pieces (the
 * PDF and PNG files of its drawings are served by routes/exports.ts). No write
 * route exists under /share, so POST/PUT/DELETE there meet the 404 handler.
 * Responses are not cached, so a revoked link stops working at once.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { clientGone } from '../compute/client-gone.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';
import type { SurveyStore } from '../store.js';
import { requireShared } from '../lookup.js';
import { renderSharePage, SHARE_PAGE_CSP } from '../share-page.js';
import { stationsCsv, downloadName } from '../stations-csv.js';
import { Type } from '@sinclair/typebox';
import { errorResponses, fileResponse, sheetQuery } from '../route-schemas.js';
import { sectionSheetReply } from '../section-sheet.js';

/** Schema of a share read: a file of this media type, or 404 when the link is unknown or revoked. */
function shared(summary: string, mediaType: string) {
  return { schema: { summary, tags: ['share'], response: { 200: fileResponse(mediaType, summary), ...errorResponses(404) } } };
}

interface TokenParams {
  token: string;
}

function privateResponse(reply: FastifyReply): void {
  reply.header('Cache-Control', 'no-store');
  reply.header('X-Robots-Tag', 'noindex, nofollow');
}

export async function shareRoutes(app: FastifyInstance, options: { store: SurveyStore }): Promise<void> {
  const { store } = options;

  app.get<{ Params: TokenParams }>('/share/:token', shared('Read-only page of the latest revision.', 'text/html'), async (request, reply) => {
    const { token } = request.params;
    const { stored } = requireShared(store, token);
    const { sectionSheets, travelTimesSvg } = await app.compute.run(
      'drawings',
      { survey: stored.survey, interpretation: stored.interpretation },
      clientGone(reply),
    );
    const html = renderSharePage({
      survey: stored.survey,
      interpretation: stored.interpretation,
      name: stored.name,
      revision: stored.revision,
      storedAt: stored.createdAt,
      sectionSheets,
      travelTimesSvg,
      cautions: CAUTIONS,
      stationsCsvUrl: `/share/${token}/stations.csv`,
      drawingFilesUrl: `/share/${token}/`,
    });
    privateResponse(reply);
    reply.header('Content-Security-Policy', SHARE_PAGE_CSP);
    reply.type('text/html; charset=utf-8');
    return html;
  });

  const sectionRead = shared('The shared depth section: one sheet of it (?sheet=k, default 1); the Arcline-Sheet-Count header gives how many.', 'image/svg+xml');
  app.get<{ Params: TokenParams; Querystring: { sheet?: number } }>(
    '/share/:token/section.svg',
    { schema: { ...sectionRead.schema, querystring: Type.Object({ sheet: sheetQuery }), response: { ...sectionRead.schema.response, ...errorResponses(400, 404) } } },
    async (request, reply) => {
      const { stored } = requireShared(store, request.params.token);
      privateResponse(reply);
      return sectionSheetReply(app, reply, stored, request.query.sheet);
    },
  );

  app.get<{ Params: TokenParams }>('/share/:token/traveltimes.svg', shared('The shared time–distance plot.', 'image/svg+xml'), async (request, reply) => {
    const { stored } = requireShared(store, request.params.token);
    privateResponse(reply);
    reply.type('image/svg+xml; charset=utf-8');
    return app.compute.run('drawing', { figure: 'traveltimes', survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
  });

  // The page's "Methods compared" figure loads this only when opened: it interprets the line twice more.
  app.get<{ Params: TokenParams }>(
    '/share/:token/methods.svg',
    shared('The shared line\'s first refractor by plus-minus, GRM and time terms on one section, with where they differ by more than their combined 1σ.', 'image/svg+xml'),
    async (request, reply) => {
      const { stored } = requireShared(store, request.params.token);
      privateResponse(reply);
      const { methodsSvg } = await app.compute.run('methods', { survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
      reply.type('image/svg+xml; charset=utf-8');
      return methodsSvg;
    },
  );

  app.get<{ Params: TokenParams }>('/share/:token/stations.csv', shared('The shared stations table.', 'text/csv'), async (request, reply) => {
    const { stored } = requireShared(store, request.params.token);
    privateResponse(reply);
    reply.type('text/csv; charset=utf-8');
    reply.header('Content-Disposition', `attachment; filename="${downloadName(stored.name, 'stations.csv')}"`);
    return stationsCsv(stored.interpretation);
  });
}
