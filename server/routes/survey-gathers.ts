/**
 * Shot gathers into stored lines (issue 12, item 4), one SEG-2 file per request (the raw
 * bytes, application/octet-stream):
 *  - POST /api/v1/surveys/gathers           a new line of this one shot (revision 1);
 *  - POST /api/v1/surveys/:id/gathers       the stored line with this shot added, or the
 *                                            shot of the same id replaced: a new revision;
 *  - GET  /api/v1/surveys/:id/gathers/:shotId/traces   the stored gather decimated for display.
 * Geometry from the file's strings, or the query parameters of POST /api/v1/gathers/picks;
 * picks from the automatic picker. Writes carry the write guard; the layout rule of the
 * revisions route applies (409 `layout_changed` unless `?layoutChange=confirm`, then the
 * layouts are merged: server/gather-survey.ts). Reading, picking, interpreting and
 * decimating run in the compute pool. A file that cannot be read answers 400 `invalid_seg2`
 * naming the byte offset; nothing is stored by a refused request (the revision and its
 * gather are written in one transaction, after every check). The steps before the store
 * (pick, make the line, check, interpret) are server/gather-upload.ts, which the demo seed
 * (server/seed.ts) runs too.
 */
import type { FastifyInstance } from 'fastify';
import { Type } from '@sinclair/typebox';
import type { SurveyStore } from '../store.js';
import type { RequestHook } from '../write-limit.js';
import { AppError } from '../errors.js';
import { clientGone } from '../compute/client-gone.js';
import { errorResponses, authorQuerySchema, LinksSchema } from '../route-schemas.js';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { GATHER_BODY_LIMIT_BYTES, GatherPicksSchema, gatherOverrideProperties } from './gathers.js';
import { requireRevision, requireSurvey, shareUrlFor } from '../lookup.js';
import { links } from './surveys.js';
import { LAYOUT_CHANGE_CONFIRM } from '../revision-layout.js';
import { lineWithGather, newLineFromGather, pickGather } from '../gather-upload.js';
import { SURVEY_LIMITS } from '../../engine/survey/survey.js';
import type { GatherOverrides } from '../../engine/seg2/gather.js';
import { DEFAULT_COLUMNS, MAX_COLUMNS, MAX_DECIMATED_VALUES } from '../../engine/seg2/decimate.js';

export interface SurveyGatherRouteOptions {
  store: SurveyStore;
  guard: RequestHook;
}

const tags = ['surveys', 'gathers'];

const shotIdQuery = Type.Optional(
  Type.String({ minLength: 1, maxLength: SURVEY_LIMITS.maxShotIdLength, description: 'The shot id in the line; default "x=<shot x>". A shot of the same id is replaced.' }),
);
const createQuerySchema = Type.Object(
  {
    ...gatherOverrideProperties,
    shotId: shotIdQuery,
    name: Type.Optional(Type.String({ minLength: 1, maxLength: SURVEY_LIMITS.maxNameLength, description: 'Name of the new line.' })),
    author: authorQuerySchema,
  },
  { additionalProperties: false },
);
const extendQuerySchema = Type.Object(
  {
    ...gatherOverrideProperties,
    shotId: shotIdQuery,
    author: authorQuerySchema,
    layoutChange: Type.Optional(Type.Literal(LAYOUT_CHANGE_CONFIRM, { description: "Add the shot although its geophones are not the line's: the layouts are merged." })),
  },
  { additionalProperties: false },
);
const tracesQuerySchema = Type.Object(
  {
    columns: Type.Optional(
      Type.Integer({ minimum: 1, maximum: MAX_COLUMNS, description: `Time columns per trace (default ${DEFAULT_COLUMNS}); fewer when traces × columns would pass ${MAX_DECIMATED_VALUES}.` }),
    ),
    fromMs: Type.Optional(Type.Number({ description: 'Start of the window, ms after the shot (default: the first sample).' })),
    toMs: Type.Optional(Type.Number({ description: 'End of the window, ms after the shot (default: the last sample).' })),
    revision: Type.Optional(Type.Integer({ minimum: 1, description: 'The gather as it stood at this revision (default: the latest).' })),
  },
  { additionalProperties: false },
);

const GatherStoredSchema = Type.Object(
  {
    id: Type.String(),
    name: Type.String(),
    revision: Type.Integer(),
    revisionCreatedAt: Type.String(),
    author: Type.Union([Type.String(), Type.Null()]),
    shotId: Type.String(),
    replaced: Type.Boolean({ description: 'True when a shot of this id was already in the line and is replaced.' }),
    droppedPicks: Type.Array(Type.Object({ geophoneX: Type.Number(), timeMs: Type.Number() }, { additionalProperties: false }), {
      description: 'Automatic picks before the shot (negative times), stored as no pick.',
    }),
    shareUrl: Type.Union([Type.String(), Type.Null()]),
    url: Type.String(),
    traces: Type.String({ description: 'Path of the decimated traces of this gather.' }),
    links: LinksSchema,
    picks: GatherPicksSchema,
    interpretation: InterpretationSchema,
  },
  { additionalProperties: false, title: 'GatherStored' },
);

const Envelope = Type.Array(Type.Number({ minimum: -1, maximum: 1 }));
const DecimatedGatherSchema = Type.Object(
  {
    shotId: Type.String(),
    revision: Type.Integer({ description: 'The revision whose upload stored this gather.' }),
    shot: Type.Object({ x: Type.Number(), elevation: Type.Number() }, { additionalProperties: false }),
    sampleIntervalMs: Type.Number(),
    delayMs: Type.Number(),
    fromMs: Type.Number(),
    toMs: Type.Number(),
    columns: Type.Integer(),
    columnMs: Type.Number(),
    scheme: Type.Literal('min-max', { description: 'Each column is the smallest and largest sample in it, as a fraction of the trace peak.' }),
    traces: Type.Array(
      Type.Object({ channel: Type.Number(), x: Type.Number(), peak: Type.Number(), min: Envelope, max: Envelope }, { additionalProperties: false }),
    ),
    automatic: Type.Object(
      {
        times: Type.Array(Type.Union([Type.Number(), Type.Null()]), { description: 'The picker\'s first break per trace, ms after the shot (before any review).' }),
        confidence: Type.Array(Type.Number({ minimum: 0, maximum: 1 }), { description: 'The picker\'s confidence per trace, 0 (none) to 1.' }),
        status: Type.Array(Type.Union([Type.Literal('picked'), Type.Literal('repicked'), Type.Literal('dead'), Type.Literal('outlier')])),
      },
      { additionalProperties: false, description: 'The automatic picker\'s answer for this file, in the order of `traces` (the same as POST /api/v1/gathers/picks).' },
    ),
  },
  { additionalProperties: false, title: 'DecimatedGather' },
);

type CreateQuery = GatherOverrides & { shotId?: string; name?: string; author?: string };
type ExtendQuery = GatherOverrides & { shotId?: string; author?: string; layoutChange?: typeof LAYOUT_CHANGE_CONFIRM };

/** The geometry parameters of a query (what is stored with the gather to read it again alike). */
function overridesOf(query: object): GatherOverrides & Record<string, number> {
  const out: Record<string, number> = {};
  for (const key of Object.keys(gatherOverrideProperties)) {
    const value: unknown = (query as Record<string, unknown>)[key];
    if (typeof value === 'number') out[key] = value;
  }
  return out;
}

/** The body as bytes, or the coded 400. */
function fileBytes(body: unknown): Uint8Array {
  if (!Buffer.isBuffer(body)) {
    if (body === undefined || body === null) throw new AppError('empty_body', { message: 'The request has no body: send the SEG-2 file itself as application/octet-stream.' });
    throw new AppError('unsupported_content_type', { message: 'Send the SEG-2 file itself (its raw bytes) with Content-Type: application/octet-stream.' });
  }
  if (body.length === 0) throw new AppError('empty_body', { message: 'The request has no body: send the SEG-2 file itself as application/octet-stream.' });
  return new Uint8Array(body.buffer, body.byteOffset, body.byteLength);
}

export async function surveyGatherRoutes(app: FastifyInstance, options: SurveyGatherRouteOptions): Promise<void> {
  const { store, guard } = options;
  app.addContentTypeParser('application/octet-stream', { parseAs: 'buffer', bodyLimit: GATHER_BODY_LIMIT_BYTES }, (_request, body, done) => done(null, body));

  app.post<{ Querystring: CreateQuery }>(
    '/api/v1/surveys/gathers',
    {
      onRequest: guard,
      bodyLimit: GATHER_BODY_LIMIT_BYTES,
      schema: {
        summary: 'A new stored line from one SEG-2 shot gather (raw bytes): its automatic picks as the line\'s first shot.',
        tags,
        querystring: createQuerySchema,
        response: { 201: GatherStoredSchema, ...errorResponses(400, 401, 413, 422, 503) },
      },
    },
    async (request, reply) => {
      const bytes = fileBytes(request.body);
      const overrides = overridesOf(request.query);
      const gone = clientGone(reply);
      const picks = await pickGather(app.compute, bytes, overrides, gone);
      const { shotId, dropped, survey, interpretation } = await newLineFromGather(app.compute, picks, { shotId: request.query.shotId, name: request.query.name }, gone);
      const author = request.query.author ?? null;
      const { summary, revision } = store.createSurvey(survey, interpretation, { author, gather: { shotId, seg2: bytes, overrides } });
      reply.status(201).header('Location', `/api/v1/surveys/${summary.id}`);
      return {
        id: summary.id,
        name: summary.name,
        revision: 1,
        revisionCreatedAt: revision.createdAt,
        author,
        shotId,
        replaced: false,
        droppedPicks: dropped,
        shareUrl: shareUrlFor(summary.shareToken),
        url: `/api/v1/surveys/${summary.id}`,
        traces: `/api/v1/surveys/${summary.id}/gathers/${encodeURIComponent(shotId)}/traces`,
        links: links(summary.id, 1, 1),
        picks,
        interpretation,
      };
    },
  );

  app.post<{ Params: { id: string }; Querystring: ExtendQuery }>(
    '/api/v1/surveys/:id/gathers',
    {
      onRequest: guard,
      bodyLimit: GATHER_BODY_LIMIT_BYTES,
      schema: {
        summary: 'Add one SEG-2 shot gather (raw bytes) to a stored line as a new revision (a shot of the same id is replaced).',
        tags,
        querystring: extendQuerySchema,
        response: { 201: GatherStoredSchema, ...errorResponses(400, 401, 404, 409, 413, 422, 503) },
      },
    },
    async (request, reply) => {
      const { id } = request.params;
      requireSurvey(store, id);
      const bytes = fileBytes(request.body);
      const overrides = overridesOf(request.query);
      const gone = clientGone(reply);
      const picks = await pickGather(app.compute, bytes, overrides, gone);
      const { summary, stored } = requireRevision(store, id);
      const extended = await lineWithGather(app.compute, stored, picks, { shotId: request.query.shotId, confirmLayout: request.query.layoutChange === LAYOUT_CHANGE_CONFIRM }, gone);
      const { shotId, dropped, survey, interpretation } = extended;
      const author = request.query.author ?? null;
      // Stored only if no other revision landed meanwhile: this one is built on `stored`.
      const written = store.addRevision(id, survey, interpretation, { author, gather: { shotId, seg2: bytes, overrides } }, stored.revision);
      if (written === null) throw new AppError('survey_changed');
      reply.status(201).header('Location', `/api/v1/surveys/${id}?revision=${written.revision}`);
      return {
        id,
        name: written.name,
        revision: written.revision,
        revisionCreatedAt: written.createdAt,
        author,
        shotId,
        replaced: extended.replaced,
        droppedPicks: dropped,
        shareUrl: shareUrlFor(summary.shareToken),
        url: `/api/v1/surveys/${id}?revision=${written.revision}`,
        traces: `/api/v1/surveys/${id}/gathers/${encodeURIComponent(shotId)}/traces`,
        links: links(id, written.revision, written.revision),
        picks,
        interpretation,
      };
    },
  );

  app.get<{ Params: { id: string; shotId: string }; Querystring: { columns?: number; fromMs?: number; toMs?: number; revision?: number } }>(
    '/api/v1/surveys/:id/gathers/:shotId/traces',
    {
      schema: {
        summary: 'The traces of a stored shot gather, decimated for display: min and max per time column, bounded in size.',
        tags,
        querystring: tracesQuerySchema,
        response: { 200: DecimatedGatherSchema, ...errorResponses(400, 404, 422, 503) },
      },
    },
    async (request, reply) => {
      const { id, shotId } = request.params;
      const { columns, fromMs, toMs, revision } = request.query;
      if (revision !== undefined) requireRevision(store, id, revision);
      else requireSurvey(store, id);
      const gather = store.getGather(id, shotId, revision);
      if (gather === null) throw new AppError('gather_not_found', { message: `No shot gather "${shotId}" was uploaded into survey "${id}"${revision === undefined ? '' : ` up to revision ${revision}`}.`, path: '/shotId' });
      const result = await app.compute.run('gatherTraces', { bytes: gather.seg2, overrides: gather.overrides, columns, fromMs, toMs }, clientGone(reply));
      if (!result.ok) {
        if (result.error.code === 'empty-window') throw new AppError('invalid_request', { message: result.error.message, path: '/fromMs' });
        throw new AppError('invalid_seg2', { message: result.error.message, byteOffset: result.error.byteOffset });
      }
      return { shotId, revision: gather.revision, scheme: 'min-max' as const, ...result.gather };
    },
  );
}
