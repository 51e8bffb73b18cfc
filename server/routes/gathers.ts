/**
 * POST /api/v1/gathers/picks — one SEG-2 shot gather (the raw file, application/
 * octet-stream) in, its automatic first breaks out; stores nothing, needs no write token
 * (a bounded pure computation, like /api/v1/interpretations). The answer is the contract's
 * gather picks (api-v1.md) plus added fields (engine/picking/gather-picks.ts).
 *
 * This plugin registers its own octet-stream parser (encapsulated: every other route still
 * refuses binary bodies by name, server/binary-body.ts) with a body limit of its own, since
 * a gather is far larger than a pick table. Reading and picking run in the compute pool.
 * A file that cannot be read answers 400 `invalid_seg2` with the byte offset in the message
 * and in `error.byteOffset`.
 */
import type { FastifyInstance } from 'fastify';
import { Type } from '@sinclair/typebox';
import { errorResponses } from '../route-schemas.js';
import { AppError } from '../errors.js';
import { clientGone } from '../compute/client-gone.js';
import type { GatherOverrides } from '../../engine/seg2/gather.js';

/**
 * Largest SEG-2 file accepted, bytes: 32 MiB holds 96 channels × 16,000 samples of 32-bit
 * data with room to spare (about 6 MB); our choice.
 */
export const GATHER_BODY_LIMIT_BYTES = 32 * 1024 * 1024;

const metres = (description: string) => Type.Optional(Type.Number({ description }));
/** The query parameters that supply or override a gather's geometry (GatherOverrides). */
export const gatherOverrideProperties = {
    shotX: metres('Shot position along the line, m (instead of or over SOURCE_LOCATION).'),
    shotElevation: metres('Shot elevation, m.'),
    geophoneX0: metres("x of the first trace's geophone, m; with geophoneSpacing places every geophone in trace order (instead of or over RECEIVER_LOCATION)."),
    geophoneSpacing: metres('Geophone spacing, m (with geophoneX0).'),
    geophoneElevation: metres('One elevation for every geophone, m.'),
    sampleIntervalMs: Type.Optional(Type.Number({ exclusiveMinimum: 0, description: 'Sample interval, ms (instead of or over SAMPLE_INTERVAL).' })),
    delayMs: Type.Optional(Type.Number({ description: 'Time of the first sample after the shot, ms; negative for pre-trigger samples (instead of or over DELAY).' })),
};
const querySchema = Type.Object(gatherOverrideProperties, { additionalProperties: false });

/**
 * The `invalid_seg2` error of a file the picker could not read. A file without the positions
 * a request can supply names, as `path`, the query parameter that supplies them ("/shotX",
 * "/geophoneX0"), so a client can ask for that value and send the file again.
 */
export function seg2Error(error: { code: string; message: string; byteOffset: number }): AppError {
  const path = error.code === 'no-source-location' ? '/shotX' : error.code === 'no-receiver-location' ? '/geophoneX0' : undefined;
  return new AppError('invalid_seg2', { message: error.message, byteOffset: error.byteOffset, ...(path === undefined ? {} : { path }) });
}

const Point = Type.Object({ x: Type.Number(), elevation: Type.Number() }, { additionalProperties: false });
export const GatherPicksSchema = Type.Object(
  {
    shot: Point,
    geophones: Type.Array(Point),
    sampleIntervalMs: Type.Number(),
    times: Type.Array(Type.Union([Type.Number(), Type.Null()]), { description: 'First break at each geophone, ms after the shot; null: dead trace or rejected pick.' }),
    confidence: Type.Array(Type.Number({ minimum: 0, maximum: 1 })),
    delayMs: Type.Number(),
    traces: Type.Array(
      Type.Object(
        {
          channel: Type.Number(),
          status: Type.Union([Type.Literal('picked'), Type.Literal('repicked'), Type.Literal('dead'), Type.Literal('outlier')]),
          reversed: Type.Boolean(),
        },
        { additionalProperties: false },
      ),
    ),
    dominantPeriodMs: Type.Union([Type.Number(), Type.Null()]),
    acquisition: Type.Object({ date: Type.Union([Type.String(), Type.Null()]), time: Type.Union([Type.String(), Type.Null()]) }, { additionalProperties: false }),
    warnings: Type.Array(Type.Object({ code: Type.String(), message: Type.String(), byteOffset: Type.Integer() }, { additionalProperties: false })),
  },
  { additionalProperties: false, title: 'GatherPicks' },
);

export async function gatherRoutes(app: FastifyInstance): Promise<void> {
  app.addContentTypeParser('application/octet-stream', { parseAs: 'buffer', bodyLimit: GATHER_BODY_LIMIT_BYTES }, (_request, body, done) => done(null, body));
  const schema = {
    summary: 'One SEG-2 shot gather in (raw bytes), its automatic first breaks out; stores nothing.',
    description: 'Geometry from the file\'s strings (SOURCE_LOCATION, RECEIVER_LOCATION, SAMPLE_INTERVAL, DELAY); query parameters supply what the file lacks and override what it says.',
    tags: ['gathers'],
    querystring: querySchema,
    response: { 200: GatherPicksSchema, ...errorResponses(400, 413, 422, 503) },
  };
  app.post<{ Querystring: GatherOverrides }>('/api/v1/gathers/picks', { schema, bodyLimit: GATHER_BODY_LIMIT_BYTES }, async (request, reply) => {
    const body: unknown = request.body;
    if (!Buffer.isBuffer(body)) {
      if (body === undefined || body === null) throw new AppError('empty_body', { message: 'The request has no body: send the SEG-2 file itself as application/octet-stream.' });
      throw new AppError('unsupported_content_type', { message: 'Send the SEG-2 file itself (its raw bytes) with Content-Type: application/octet-stream.' });
    }
    if (body.length === 0) throw new AppError('empty_body', { message: 'The request has no body: send the SEG-2 file itself as application/octet-stream.' });
    const bytes = new Uint8Array(body.buffer, body.byteOffset, body.byteLength);
    const result = await app.compute.run('gatherPicks', { bytes, overrides: { ...request.query } }, clientGone(reply));
    if (!result.ok) throw seg2Error(result.error);
    return result.picks;
  });
}
