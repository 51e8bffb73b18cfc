/**
 * Stored surveys (api-v1.md): store, list, read, correct (new revision), draw, tabulate,
 * and manage the share link. Writes carry the write guard; reads are open.
 * Every write validates the whole body before the store is touched.
 * A share link is a read key to the line: the list never carries it, a read shows it only to
 * a request that could write (isWriter; others get `shareUrl: null`), and the writes that
 * make or keep one (store, revision, reissue) answer with it.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { clientGone } from '../compute/client-gone.js';
import type { SurveyStore, SurveySummary, StoredRevision } from '../store.js';
import type { RequestHook } from '../write-limit.js';
import { AppError } from '../errors.js';
import { surveyFromRequest, surveyInput } from '../survey-input.js';
import { Type } from '@sinclair/typebox';
import {
  authorQuerySchema,
  errorResponses,
  fileResponse,
  MethodsAnswerSchema,
  revisionQuerySchema,
  revisionWriteQuerySchema,
  sectionSvgQuerySchema,
  SectionSheetsSchema,
  RevisionCreatedSchema,
  ShareIssuedSchema,
  StoredSurveySchema,
  SurveyCreatedSchema,
  SurveyListSchema,
} from '../route-schemas.js';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { requireRevision, requireSurvey, shareUrlFor } from '../lookup.js';
import { stationsCsv, downloadName } from '../stations-csv.js';
import { LAYOUT_CHANGE_CONFIRM, layoutChange, layoutChangeMessage } from '../revision-layout.js';
import type { Survey } from '../../engine/survey/survey.js';
import { sectionSheetReply } from '../section-sheet.js';

export interface SurveyRouteOptions {
  store: SurveyStore;
  guard: RequestHook;
  /** Whether the request could write: only a writer sees a line's share link on a read. */
  isWriter: (request: import('fastify').FastifyRequest) => boolean;
}

interface IdParams {
  id: string;
}
interface RevisionQuery {
  revision?: number;
}
interface SectionSvgQuery extends RevisionQuery {
  sheet?: number;
}
interface RevisionWriteQuery {
  layoutChange?: typeof LAYOUT_CHANGE_CONFIRM;
  author?: string;
}

const tags = ['surveys'];

/** Schema of a GET of one stored revision (by ?revision, default the latest) answering `ok`. */
function revisionRead(summary: string, ok: object) {
  return { schema: { summary, tags, querystring: revisionQuerySchema, response: { 200: ok, ...errorResponses(400, 404) } } };
}

/** The paths of one revision's views. */
export function links(id: string, revision: number, latest: number): Record<string, string> {
  const query = revision === latest ? '' : `?revision=${revision}`;
  const base = `/api/v1/surveys/${id}`;
  return {
    self: `${base}${query}`,
    section: `${base}/section.svg${query}`,
    traveltimes: `${base}/traveltimes.svg${query}`,
    methods: `${base}/methods.svg${query}`,
    stations: `${base}/stations.csv${query}`,
    interpretation: `${base}/interpretation.json${query}`,
  };
}

function listItem(summary: SurveySummary): Record<string, unknown> {
  return {
    id: summary.id,
    name: summary.name,
    createdAt: summary.createdAt,
    updatedAt: summary.updatedAt,
    latestRevision: summary.latestRevision,
    url: `/api/v1/surveys/${summary.id}`,
  };
}

function setSvg(reply: FastifyReply, svg: string): string {
  reply.type('image/svg+xml; charset=utf-8');
  return svg;
}

function download(reply: FastifyReply, type: string, fileName: string): void {
  reply.type(type);
  reply.header('Content-Disposition', `attachment; filename="${fileName}"`);
}

export async function surveyRoutes(app: FastifyInstance, options: SurveyRouteOptions): Promise<void> {
  const { store, guard, isWriter } = options;

  const fetchRevision = (id: string, revision?: number): { summary: SurveySummary; stored: StoredRevision } =>
    requireRevision(store, id, revision);

  const writeErrors = errorResponses(400, 401, 413);
  app.post<{ Querystring: { author?: string } }>(
    '/api/v1/surveys',
    {
      onRequest: guard,
      ...surveyInput({ summary: 'Store a survey and its interpretation.', tags, querystring: Type.Object({ author: authorQuerySchema }), response: { 201: SurveyCreatedSchema, ...writeErrors } }),
    },
    async (request, reply) => {
    const survey = surveyFromRequest(request);
    const interpretation = await app.compute.run('interpret', { survey }, clientGone(reply));
    const { summary, revision } = store.createSurvey(survey, interpretation, { author: request.query.author ?? null });
    reply.status(201).header('Location', `/api/v1/surveys/${summary.id}`);
    return {
      id: summary.id,
      name: summary.name,
      createdAt: summary.createdAt,
      revision: revision.revision,
      shareUrl: shareUrlFor(summary.shareToken),
      url: `/api/v1/surveys/${summary.id}`,
      links: links(summary.id, 1, 1),
      interpretation,
    };
  });

  app.get('/api/v1/surveys', { schema: { summary: 'List stored surveys.', tags, response: { 200: SurveyListSchema } } }, async () => store.listSurveys().map(listItem));

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id',
    revisionRead('One stored survey (a revision of it) with its interpretation.', StoredSurveySchema),
    async (request) => {
      const { summary, stored } = fetchRevision(request.params.id, request.query.revision);
      return {
        id: summary.id,
        name: stored.name,
        createdAt: summary.createdAt,
        updatedAt: summary.updatedAt,
        revision: stored.revision,
        revisionCreatedAt: stored.createdAt,
        latestRevision: summary.latestRevision,
        revisions: store.listRevisions(summary.id),
        gathers: store.listGathers(summary.id).map((g) => ({ ...g, traces: `/api/v1/surveys/${summary.id}/gathers/${encodeURIComponent(g.shotId)}/traces` })),
        shareUrl: isWriter(request) ? shareUrlFor(summary.shareToken) : null,
        links: links(summary.id, stored.revision, summary.latestRevision),
        survey: stored.survey,
        interpretation: stored.interpretation,
      };
    },
  );

  app.get<{ Params: IdParams; Querystring: SectionSvgQuery }>(
    '/api/v1/surveys/:id/section.svg',
    {
      schema: {
        summary: 'The depth section: one sheet of it (?sheet=k, default 1); the Arcline-Sheet-Count header gives how many.',
        tags,
        querystring: sectionSvgQuerySchema,
        response: { 200: fileResponse('image/svg+xml', 'One sheet of the depth section as SVG.'), ...errorResponses(400, 404) },
      },
    },
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      return sectionSheetReply(app, reply, stored, request.query.sheet);
    },
  );

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/section-sheets.json',
    revisionRead('How many sheets the depth section is paged over, and the SVG of each (the page shows every sheet).', SectionSheetsSchema),
    async (request, reply) => {
      const { summary, stored } = fetchRevision(request.params.id, request.query.revision);
      const sheetCount = await app.compute.run('sectionSheetCount', { survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
      // The sheets of the revision asked for (the latest when none was).
      const revision = request.query.revision === undefined ? '' : `revision=${stored.revision}&`;
      const sheets = Array.from({ length: sheetCount }, (_, i) => `/api/v1/surveys/${summary.id}/section.svg?${revision}sheet=${i + 1}`);
      return { sheetCount, sheets };
    },
  );

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/traveltimes.svg',
    revisionRead('The time–distance plot with fitted branches.', fileResponse('image/svg+xml', 'The time–distance plot as SVG.')),
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      const svg = await app.compute.run('drawing', { figure: 'traveltimes', survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
      return setSvg(reply, svg);
    },
  );

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/grm.svg',
    revisionRead(
      'The GRM functions (velocity analysis and time-depth) for every XY tried, the optimum marked; a page saying there are none when the line was not interpreted by GRM.',
      fileResponse('image/svg+xml', 'The GRM functions as SVG.'),
    ),
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      const svg = await app.compute.run('drawing', { figure: 'grm', survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
      return setSvg(reply, svg);
    },
  );

  // The refractor by every method on one section (engine/render/method-comparison.ts); the stored interpretation is reused for its own method.
  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/methods.svg',
    revisionRead(
      'The first refractor by plus-minus, GRM and time terms on one section, each in its own line style, with where they differ by more than their combined 1σ.',
      fileResponse('image/svg+xml', 'The method comparison as SVG.'),
    ),
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      const { methodsSvg } = await app.compute.run('methods', { survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
      return setSvg(reply, methodsSvg);
    },
  );

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/methods.json',
    revisionRead('The method comparison as data: whether each method ran, where they differ by more than their combined 1σ, and the figure.', MethodsAnswerSchema),
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      return app.compute.run('methods', { survey: stored.survey, interpretation: stored.interpretation }, clientGone(reply));
    },
  );

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/stations.csv',
    revisionRead('One row per geophone.', fileResponse('text/csv', 'Stations as CSV.')),
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      download(reply, 'text/csv; charset=utf-8', downloadName(stored.name, `r${stored.revision}-stations.csv`));
      return stationsCsv(stored.interpretation);
    },
  );

  app.get<{ Params: IdParams; Querystring: RevisionQuery }>(
    '/api/v1/surveys/:id/interpretation.json',
    // The handler sends the file as indented text, which Fastify never re-serialises.
    revisionRead('The interpretation as a file to download.', {
      description: 'The interpretation, indented, as an attachment.',
      content: { 'application/json': { schema: InterpretationSchema } },
    }),
    async (request, reply) => {
      const { stored } = fetchRevision(request.params.id, request.query.revision);
      download(reply, 'application/json; charset=utf-8', downloadName(stored.name, `r${stored.revision}-interpretation.json`));
      return JSON.stringify(stored.interpretation, null, 2);
    },
  );

  /**
   * Refuses (409 layout_changed) a revision whose geophones are not those of the line's
   * latest revision, unless the request confirmed the change. Synchronous, so no other
   * revision can land between this check and the store call that follows it.
   */
  const requireSameLayout = (id: string, survey: Survey, confirmed: boolean): void => {
    if (confirmed) return;
    const latest = fetchRevision(id).stored;
    const change = layoutChange({ revision: latest.revision, name: latest.name, geophones: latest.survey.geophones }, survey.geophones);
    if (change !== null) throw new AppError('layout_changed', { message: layoutChangeMessage(change), path: '/geophones', layoutChange: change });
  };

  app.post<{ Params: IdParams; Querystring: RevisionWriteQuery }>(
    '/api/v1/surveys/:id/revisions',
    {
      onRequest: guard,
      ...surveyInput({
        summary: 'Store a new revision of the same line (same geophone layout, or ?layoutChange=confirm).',
        tags,
        querystring: revisionWriteQuerySchema,
        response: { 201: RevisionCreatedSchema, ...errorResponses(400, 401, 404, 409, 413) },
      }),
    },
    async (request, reply) => {
    const { id } = request.params;
    const summary = requireSurvey(store, id);
    const survey = surveyFromRequest(request);
    const confirmed = request.query.layoutChange === LAYOUT_CHANGE_CONFIRM;
    // Checked before the computation (answer at once) and again just before storing.
    requireSameLayout(id, survey, confirmed);
    const interpretation = await app.compute.run('interpret', { survey }, clientGone(reply));
    requireSameLayout(id, survey, confirmed);
    const stored = store.addRevision(id, survey, interpretation, { author: request.query.author ?? null });
    if (stored === null) throw new AppError('survey_not_found');
    reply.status(201).header('Location', `/api/v1/surveys/${id}?revision=${stored.revision}`);
    return {
      id,
      name: stored.name,
      createdAt: summary.createdAt,
      revision: stored.revision,
      revisionCreatedAt: stored.createdAt,
      author: stored.author,
      shareUrl: shareUrlFor(summary.shareToken),
      url: `/api/v1/surveys/${id}?revision=${stored.revision}`,
      links: links(id, stored.revision, stored.revision),
      interpretation,
    };
  });

  app.post<{ Params: IdParams }>(
    '/api/v1/surveys/:id/share',
    { onRequest: guard, schema: { summary: 'Issue a new share link (the old one stops working).', tags, response: { 201: ShareIssuedSchema, ...errorResponses(401, 404) } } },
    async (request, reply) => {
    const { id } = request.params;
    requireSurvey(store, id);
    const token = store.reissueShareToken(id);
    if (token === null) throw new AppError('survey_not_found');
    reply.status(201);
    return { id, shareUrl: shareUrlFor(token) };
  });

  app.delete<{ Params: IdParams }>(
    '/api/v1/surveys/:id/share',
    { onRequest: guard, schema: { summary: 'Revoke the share link.', tags, response: { 204: { type: 'null', description: 'Revoked.' }, ...errorResponses(401, 404) } } },
    async (request, reply) => {
    const { id } = request.params;
    requireSurvey(store, id);
    store.revokeShareToken(id);
    reply.status(204);
    return reply.send();
  });
}
