/**
 * One sheet of a stored line's depth section as SVG (GET …/section.svg?sheet=k, and the
 * share link's): a long line is paged over several sheets at match lines, and the page shows
 * every one of them. The answer says how many sheets there are in the Arcline-Sheet-Count
 * header, as the PNG export does; a sheet past the last is a 400 naming `sheet`.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { clientGone } from './compute/client-gone.js';
import { AppError } from './errors.js';
import type { StoredRevision } from './store.js';
import { SHEET_COUNT_HEADER } from './route-schemas.js';

/** Draws sheet `sheet` of the stored revision's section in the compute pool and answers it as SVG. */
export async function sectionSheetReply(app: FastifyInstance, reply: FastifyReply, stored: StoredRevision, sheet = 1): Promise<string> {
  const { svg, sheetCount } = await app.compute.run('sectionSheet', { survey: stored.survey, interpretation: stored.interpretation, sheet }, clientGone(reply));
  if (svg === null) {
    throw new AppError('invalid_request', {
      message: `The query parameter "sheet" asks for sheet ${sheet}, but this section has ${sheetCount} sheet${sheetCount === 1 ? '' : 's'}.`,
      path: '/sheet',
    });
  }
  reply.header(SHEET_COUNT_HEADER, String(sheetCount));
  reply.type('image/svg+xml; charset=utf-8');
  return svg;
}
