/**
 * POST /api/v1/synthetic — a synthetic refraction line through a layered earth model
 * (engine/forward/synthetic-request.ts describes the body). Stores nothing, needs no
 * write token (a bounded pure computation, like /api/v1/interpretations).
 *
 * Answers 200 with the survey document (api-v1.md), plus two added fields:
 *   "refractors": [{"layer": 1, "firstArrivals": 212, "traces": 240, "seen": true}, …]
 *   "notes":      [{"code": "refractor-not-seen", "message": "…", "layer": 2}]
 * so a layout that cannot see a refractor (a hidden layer, a velocity inversion, a
 * refractor whose head waves never arrive first within the spread) says so. With
 * `?interpret=true` it answers {survey, interpretation, refractors, notes}.
 * Bad input: 400 `invalid_request` with the first problem's message and JSON path, and
 * every problem in `problems` (the contract's error body).
 *
 * Which refractor gives first arrivals is decided in engine/forward/refractor-visibility.ts;
 * the work runs in the compute pool (server/compute/pool.ts) like every computation.
 */
import type { FastifyInstance } from 'fastify';
import { Type } from '@sinclair/typebox';
import { SurveySchema } from '../../engine/schemas/survey.js';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { SyntheticRequestSchema } from '../../engine/schemas/synthetic.js';
import { errorResponses } from '../route-schemas.js';
import { bodyDoorCompiler } from '../validators.js';
import { AppError, problemsHeadline } from '../errors.js';
import type { Problem } from '../../engine/survey/problem.js';
import type { Survey } from '../../engine/survey/survey.js';
import { validateSyntheticRequest, type SyntheticRequest } from '../../engine/forward/synthetic-request.js';
import type { RefractorVisibility, SyntheticNote } from '../../engine/forward/refractor-visibility.js';
import { clientGone } from '../compute/client-gone.js';

const RefractorVisibilitySchema = Type.Object(
  { layer: Type.Integer(), firstArrivals: Type.Integer(), traces: Type.Integer(), seen: Type.Boolean() },
  { additionalProperties: false, title: 'RefractorVisibility' },
);
const SyntheticNoteSchema = Type.Object(
  { code: Type.String(), message: Type.String(), layer: Type.Optional(Type.Integer()) },
  { additionalProperties: false, title: 'SyntheticNote' },
);

const querySchema = Type.Object(
  { interpret: Type.Optional(Type.Boolean({ description: 'Also interpret the synthetic line.' })) },
  { additionalProperties: false },
);

const SyntheticSurveySchema = Type.Object(
  { ...SurveySchema.properties, refractors: Type.Array(RefractorVisibilitySchema), notes: Type.Array(SyntheticNoteSchema) },
  { additionalProperties: false, title: 'SyntheticLine' },
);
const SyntheticInterpretedSchema = Type.Object(
  { survey: SurveySchema, interpretation: InterpretationSchema, refractors: Type.Array(RefractorVisibilitySchema), notes: Type.Array(SyntheticNoteSchema) },
  { additionalProperties: false, title: 'SyntheticLineInterpreted' },
);

/** The body's door: validateSyntheticRequest, whose problems keep their codes and sentences. */
const syntheticValidatorCompiler = bodyDoorCompiler((body) => {
  if (body === null) return true;
  const problems = validateSyntheticRequest(body);
  return problems.length > 0 ? { error: requestProblems(problems) } : { value: body };
});

export async function syntheticRoutes(app: FastifyInstance): Promise<void> {
  const schema = {
    summary: 'A synthetic line through a layered earth model; stores nothing.',
    description: 'Answers the survey document plus refractors and notes; with ?interpret=true, {survey, interpretation, refractors, notes}.',
    tags: ['synthetic'],
    querystring: querySchema,
    body: SyntheticRequestSchema,
    // Two shapes by ?interpret: the handler serialises with JSON.stringify (see below).
    response: { 200: Type.Union([SyntheticSurveySchema, SyntheticInterpretedSchema]), ...errorResponses(400, 413, 422, 503) },
  };
  app.post<{ Querystring: { interpret?: boolean } }>('/api/v1/synthetic', { schema, validatorCompiler: syntheticValidatorCompiler }, async (request, reply) => {
    const body: unknown = request.body;
    if (body === undefined || body === null) {
      if (body === null) throw requestProblems(validateSyntheticRequest(body));
      throw new AppError('empty_body', { message: 'The request has no body: send the synthetic-line request as application/json.' });
    }
    const withInterpretation = request.query.interpret === true;
    const { survey, interpretation, refractors, notes } = await app.compute.run(
      'synthetic',
      { request: body as SyntheticRequest, interpret: withInterpretation },
      clientGone(reply),
    );
    // A union of two closed shapes would make the schema serialiser guess; send plain JSON.
    reply.type('application/json; charset=utf-8').serializer(JSON.stringify);
    if (withInterpretation) return { survey, interpretation, refractors, notes };
    return { ...survey, refractors, notes } satisfies Survey & { refractors: RefractorVisibility[]; notes: SyntheticNote[] };
  });
}

/** The contract's 400 for a list of problems: a headline, the first problem's path, every problem in `problems`. */
function requestProblems(problems: Problem[]): AppError {
  return new AppError('invalid_request', { message: problemsHeadline('The synthetic-line request', problems), path: problems[0].path, problems });
}
