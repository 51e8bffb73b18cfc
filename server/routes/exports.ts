/**
 * Exports of a stored line's drawings (api-v1.md): the section, the time–distance plot and
 * the method comparison as vector PDF (one page per sheet, for reports) and PNG (one sheet, for e-mail). The
 * files are made in the compute pool (task `exportFile`), with the same queue and time
 * limit as every drawing; the route only reads the stored revision and answers.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { clientGone } from '../compute/client-gone.js';
import { AppError } from '../errors.js';
import { requireRevision, requireShared } from '../lookup.js';
import { downloadName } from '../stations-csv.js';
import type { StoredRevision, SurveyStore } from '../store.js';
import {
  binaryFileResponse,
  errorResponses,
  SHEET_COUNT_HEADER,
  sectionPdfQuerySchema,
  sectionPngQuerySchema,
  travelTimesPdfQuerySchema,
  travelTimesPngQuerySchema,
  methodsPdfQuerySchema,
  methodsPngQuerySchema,
} from '../route-schemas.js';
import { describeExportFonts, findExportFonts, type FontFiles } from '../export/export-fonts.js';
import { EXPORT_DEFAULTS, EXPORT_LIMITS, type ExportFormat, type ExportOptions } from '../export/export-options.js';
import type { ExportFigure } from '../export/export-file.js';
import type { PaperName } from '../export/paper.js';

export interface ExportRouteOptions {
  store: SurveyStore;
  /** Font files to embed; absent: looked up in the system's font folders (export-fonts.ts). */
  fonts?: FontFiles | null;
}

interface ExportQuery {
  revision?: number;
  paper?: string;
  scale?: number;
  exaggeration?: number;
  arcs?: boolean;
  dpi?: number;
  sheet?: number;
}

/** The answer header giving how many sheets the drawing has (declared in route-schemas.ts). */
export { SHEET_COUNT_HEADER };

const MEDIA: Record<ExportFormat, string> = { pdf: 'application/pdf', png: 'image/png' };

const ROUTES: { figure: ExportFigure; format: ExportFormat; querystring: object; summary: string }[] = [
  { figure: 'section', format: 'pdf', querystring: sectionPdfQuerySchema, summary: 'The depth section as vector PDF, one page per sheet.' },
  { figure: 'section', format: 'png', querystring: sectionPngQuerySchema, summary: 'One sheet of the depth section as PNG.' },
  { figure: 'traveltimes', format: 'pdf', querystring: travelTimesPdfQuerySchema, summary: 'The time–distance plot as vector PDF.' },
  { figure: 'traveltimes', format: 'png', querystring: travelTimesPngQuerySchema, summary: 'The time–distance plot as PNG.' },
  { figure: 'methods', format: 'pdf', querystring: methodsPdfQuerySchema, summary: 'The first refractor by every method on one section (methods.svg) as vector PDF.' },
  { figure: 'methods', format: 'png', querystring: methodsPngQuerySchema, summary: 'The first refractor by every method on one section (methods.svg) as PNG.' },
];

function exportOptions(query: ExportQuery): ExportOptions {
  return {
    paper: (query.paper?.toUpperCase() as PaperName | undefined) ?? EXPORT_DEFAULTS.paper,
    scale: query.scale,
    verticalExaggeration: query.exaggeration,
    showArcs: query.arcs ?? EXPORT_DEFAULTS.showArcs,
    dpi: query.dpi ?? EXPORT_DEFAULTS.dpi,
    sheet: query.sheet ?? EXPORT_DEFAULTS.sheet,
  };
}

export async function exportRoutes(app: FastifyInstance, options: ExportRouteOptions): Promise<void> {
  const { store } = options;
  const fonts = options.fonts === undefined ? findExportFonts() : options.fonts;
  app.log.info(describeExportFonts(fonts));

  /** Makes the file of a stored revision in the compute pool and answers it, or a 400 that names the parameter. */
  async function answer(stored: StoredRevision, figure: ExportFigure, format: ExportFormat, query: ExportQuery, reply: FastifyReply): Promise<Buffer> {
    const exportOptionsValue = exportOptions(query);
    const result = await app.compute.run(
      'exportFile',
      {
        figure,
        format,
        survey: stored.survey,
        interpretation: stored.interpretation,
        options: exportOptionsValue,
        line: { name: stored.name, revision: stored.revision, createdAt: stored.createdAt },
        fonts,
      },
      clientGone(reply),
    );
    if (result.kind === 'sheet-out-of-range') {
      throw new AppError('invalid_request', {
        message: `The query parameter "sheet" asks for sheet ${exportOptionsValue.sheet}, but this drawing has ${result.sheetCount} sheet${result.sheetCount === 1 ? '' : 's'}.`,
        path: '/sheet',
      });
    }
    if (result.kind === 'sheet-options') {
      // The sheet renderer's own refusal (e.g. a section too tall for the sheet at this
      // exaggeration); its option names are the query's (verticalExaggeration → exaggeration).
      const first = result.problems[0];
      const field = first?.field === 'verticalExaggeration' ? 'exaggeration' : first?.field ?? 'scale';
      throw new AppError('invalid_request', { message: result.problems.map((p) => p.message).join(' '), path: `/${field}` });
    }
    if (result.kind === 'too-many-sheets') {
      throw new AppError('invalid_request', {
        message:
          `${exportOptionsValue.scale === undefined ? 'This line' : `At 1:${exportOptionsValue.scale} this line`} needs ${result.sheetCount} sheets; ` +
          `one PDF holds at most ${EXPORT_LIMITS.sheets}. Choose a smaller scale (a larger N) or A3 paper.`,
        path: '/scale',
      });
    }
    const sheetPart = result.sheetCount > 1 && format === 'png' ? `-sheet${result.sheet}` : '';
    reply.type(MEDIA[format]);
    reply.header('Content-Disposition', `attachment; filename="${downloadName(stored.name, `r${stored.revision}-${figure}${sheetPart}.${format}`)}"`);
    reply.header(SHEET_COUNT_HEADER, String(result.sheetCount));
    return Buffer.from(result.bytes.buffer, result.bytes.byteOffset, result.bytes.byteLength);
  }

  for (const { figure, format, querystring, summary } of ROUTES) {
    app.get<{ Params: { id: string }; Querystring: ExportQuery }>(
      `/api/v1/surveys/:id/${figure}.${format}`,
      {
        schema: {
          summary,
          tags: ['surveys'],
          querystring,
          response: { 200: binaryFileResponse(MEDIA[format], summary), ...errorResponses(400, 404, 422, 503) },
        },
      },
      async (request, reply) => {
        const { stored } = requireRevision(store, request.params.id, request.query.revision);
        return answer(stored, figure, format, request.query, reply);
      },
    );
    // The same file of a shared line's latest revision, for the read-only share page; not
    // cached, so a revoked link stops working at once (as every /share read).
    app.get<{ Params: { token: string }; Querystring: ExportQuery }>(
      `/share/:token/${figure}.${format}`,
      {
        schema: {
          summary: `${summary} (shared line, latest revision)`,
          tags: ['share'],
          querystring,
          response: { 200: binaryFileResponse(MEDIA[format], summary), ...errorResponses(400, 404, 422, 503) },
        },
      },
      async (request, reply) => {
        const { stored } = requireShared(store, request.params.token);
        reply.header('Cache-Control', 'no-store');
        reply.header('X-Robots-Tag', 'noindex, nofollow');
        return answer(stored, figure, format, { ...request.query, revision: undefined }, reply);
      },
    );
  }
}
