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
 * Which refractor gives a first arrival (our rule): with T_k the first arrival through the
 * model cut below layer k (layer k continued downward), refractor k arrives first at a
 * trace when T_k < T_(k−1) − ε (it beats everything shallower) and T_k ≤ T_full + ε
 * (nothing deeper beats it), ε = VISIBILITY_EPSILON_MS. All models share one grid; the
 * cut models' solves cost (layers − 1) more solves per shot, on a coarser grid when the
 * request is large.
 */
import type { FastifyInstance } from 'fastify';
import { Type } from '@sinclair/typebox';
import { SurveySchema } from '../../engine/schemas/survey.js';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { SyntheticRequestSchema } from '../../engine/schemas/synthetic.js';
import { errorResponses } from '../route-schemas.js';
import { bodyDoorCompiler } from '../validators.js';
import { AppError } from '../errors.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import type { Problem } from '../../engine/survey/problem.js';
import type { Survey } from '../../engine/survey/survey.js';
import {
  SYNTHETIC_LIMITS,
  syntheticSurveyFromRequest,
  validateSyntheticRequest,
  type SyntheticRequest,
} from '../../engine/forward/synthetic-request.js';
import { DEFAULT_CELL_M, geophoneXs, syntheticGridExtent } from '../../engine/forward/synthetic.js';
import { buildVelocityGrid, type LayeredModel } from '../../engine/forward/model.js';
import { sampleTime, solveFirstArrivals } from '../../engine/forward/eikonal.js';
import { elevationAt } from '../../engine/forward/polyline.js';
import { nodesAlong } from '../../engine/forward/velocity-grid.js';

/** Times closer than this (ms) count as equal when deciding which refractor arrives first. */
export const VISIBILITY_EPSILON_MS = 0.02;

export interface RefractorVisibility {
  /** Layer index of the refractor (1 = the first refractor, the top of layer 1). */
  layer: number;
  /** Shot–geophone traces whose first arrival comes through this refractor. */
  firstArrivals: number;
  traces: number;
  seen: boolean;
}

export interface SyntheticNote {
  code: string;
  message: string;
  layer?: number;
}

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
    response: { 200: Type.Union([SyntheticSurveySchema, SyntheticInterpretedSchema]), ...errorResponses(400, 413) },
  };
  app.post<{ Querystring: { interpret?: boolean } }>('/api/v1/synthetic', { schema, validatorCompiler: syntheticValidatorCompiler }, async (request, reply) => {
    const body: unknown = request.body;
    if (body === undefined || body === null) {
      if (body === null) throw requestProblems(validateSyntheticRequest(body));
      throw new AppError('empty_body', { message: 'The request has no body: send the synthetic-line request as application/json.' });
    }
    // A union of two closed shapes would make the schema serialiser guess; send plain JSON.
    reply.type('application/json; charset=utf-8').serializer(JSON.stringify);
    const syntheticRequest = body as SyntheticRequest;
    const survey = syntheticSurveyFromRequest(syntheticRequest);
    const refractors = refractorVisibility(syntheticRequest);
    const notes = visibilityNotes(refractors);
    if (request.query.interpret === true) {
      return { survey, interpretation: interpret(survey), refractors, notes };
    }
    return { ...survey, refractors, notes } satisfies Survey & { refractors: RefractorVisibility[]; notes: SyntheticNote[] };
  });
}

/** The contract's 400 for a list of problems: the first gives message and path, all go in `problems`. */
function requestProblems(problems: Problem[]): AppError {
  const first = problems[0];
  const more = problems.length - 1;
  const message =
    `The synthetic-line request has problems. ${first.message}` +
    (more === 0 ? '' : ` ${more === 1 ? 'One more problem is' : `${more} more problems are`} listed in "problems".`);
  return new AppError('invalid_request', { message, path: first.path, problems });
}

/**
 * How many first arrivals each refractor gives over the layout (noise-free, all traces),
 * by the rule in the file comment.
 */
export function refractorVisibility(request: SyntheticRequest): RefractorVisibility[] {
  const { model, layout } = request;
  const layerCount = model.layers.length;
  if (layerCount < 2) return [];
  let cellM = request.cellM ?? DEFAULT_CELL_M;
  // The cut models cost (layers − 1) extra solves per shot: keep the whole check within
  // the request's own work limit by coarsening its grid when needed.
  for (;;) {
    const e = syntheticGridExtent(model, layout, cellM);
    const nodes = nodesAlong(e.xMax - e.xMin, cellM) * nodesAlong(e.zMax - e.zMin, cellM);
    if (nodes * layout.shots.length * layerCount <= SYNTHETIC_LIMITS.maxNodeSolves) break;
    cellM *= 1.25;
  }
  const extent = syntheticGridExtent(model, layout, cellM);
  const xs = geophoneXs(layout);
  const traces = xs.length * layout.shots.length;
  // times[k][trace]: first arrival through the model cut below layer k.
  const times: Float64Array[] = [];
  for (let k = 0; k < layerCount; k++) {
    const cut: LayeredModel = { surface: model.surface, layers: model.layers.slice(0, k + 1) };
    const grid = buildVelocityGrid(cut, extent);
    const t = new Float64Array(traces);
    layout.shots.forEach((shot, s) => {
      const source = { x: shot.x, z: elevationAt(model.surface, shot.x) };
      const field = solveFirstArrivals(grid, source);
      xs.forEach((x, i) => {
        t[s * xs.length + i] = Math.abs(x - shot.x) < 1e-6 ? 0 : sampleTime(grid, field, x, elevationAt(model.surface, x), source);
      });
    });
    times.push(t);
  }
  const full = times[layerCount - 1];
  const out: RefractorVisibility[] = [];
  for (let k = 1; k < layerCount; k++) {
    let firstArrivals = 0;
    for (let n = 0; n < traces; n++) {
      if (times[k][n] < times[k - 1][n] - VISIBILITY_EPSILON_MS && times[k][n] <= full[n] + VISIBILITY_EPSILON_MS) firstArrivals++;
    }
    out.push({ layer: k, firstArrivals, traces, seen: firstArrivals > 0 });
  }
  return out;
}

function visibilityNotes(refractors: RefractorVisibility[]): SyntheticNote[] {
  return refractors
    .filter((r) => !r.seen)
    .map((r) => ({
      code: 'refractor-not-seen',
      layer: r.layer,
      message:
        `The top of layer ${r.layer} gives no first arrival anywhere on this layout: it is a hidden layer (too thin, ` +
        `or slower than a layer above it), or its head waves arrive first only beyond the spread. ` +
        `An interpretation of these picks cannot find it (ASTM D5777 and EM 1110-1-1802 describe such blind zones).`,
    }));
}
