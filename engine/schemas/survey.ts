/**
 * The JSON Schema of the survey document (api-v1.md, "The survey document"), built with
 * TypeBox from the one options record (`engine/survey/options.ts`) and `SURVEY_LIMITS`, so
 * the schema, the validator and the engine share every limit and method name. The schema
 * says what a document looks like (types, ranges, lengths, names); the rules it cannot say
 * (increasing x, times per geophone, coverage, implied velocities, overrides against pick
 * counts, unique ids) stay in `engine/survey/validate.ts`, which runs both.
 *
 * No `default` keywords: Fastify's response serialiser would write them into a stored
 * survey that never had them; defaults are stated in the descriptions (and applied by
 * `resolveOptions`).
 *
 * Unknown fields are allowed everywhere (the contract lets clients add fields); the
 * validator's normalised survey keeps only the known ones (and unknown option keys).
 *
 * The type check at the bottom fails to compile when the schema and `Survey` drift apart.
 */
import { Type, type Static } from '@sinclair/typebox';
import { KNOWN_METHODS, NUMERIC_OPTIONS, type NumericOption } from '../survey/options.js';
import { SURVEY_LIMITS } from '../survey/survey.js';
import type { Geophone, Shot, Survey } from '../survey/survey.js';
import type { Assert, Same } from './same-type.js';

const coordinate = (description: string) =>
  Type.Number({ minimum: -SURVEY_LIMITS.maxCoordinateM, maximum: SURVEY_LIMITS.maxCoordinateM, description });

/** An elevation may be absent or null (both mean "not given"). */
const elevation = (description: string) => Type.Optional(Type.Union([coordinate(description), Type.Null()]));

const numericOption = (option: NumericOption, description: string) =>
  Type.Optional(
    Type.Number({
      exclusiveMinimum: option.exclusiveMinimum,
      maximum: option.maximum,
      description: `${description} Default ${option.default}.`,
    }),
  );

/** A first-break time, ms after the shot, or null for no pick. */
export const TimeSchema = Type.Union([
  Type.Number({ minimum: 0, maximum: SURVEY_LIMITS.maxTimeMs, description: 'First-break time, ms after the shot.' }),
  Type.Null({ description: 'No pick (dead or noisy trace).' }),
]);

export const GeophoneSchema = Type.Object(
  {
    x: coordinate('Distance along the line, m; strictly increasing across the spread.'),
    elevation: elevation('Ground elevation at the geophone, m. Absent (or null) on every geophone: flat datum 0.'),
  },
  { title: 'Geophone' },
);

export const ShotSchema = Type.Object(
  {
    id: Type.String({ minLength: 1, maxLength: SURVEY_LIMITS.maxShotIdLength, pattern: '\\S', description: 'Unique name of the shot within the line.' }),
    x: coordinate('Shot position along the line, m; off either end, at an end or inside the spread.'),
    elevation: elevation('Ground elevation at the shot, m. Absent: interpolated from the geophones.'),
    times: Type.Array(TimeSchema, {
      maxItems: SURVEY_LIMITS.maxGeophones,
      description: 'One first-break time (ms) or null per geophone, in geophone order.',
    }),
  },
  { title: 'Shot' },
);

const pickCount = (description: string) => Type.Integer({ minimum: 0, description });

export const BranchOverrideSchema = Type.Object(
  {
    shot: Type.String({ description: 'Id of the shot.' }),
    side: Type.Union([Type.Literal('left'), Type.Literal('right')]),
    directPicks: pickCount('Picks, counted outward from the shot, that belong to the direct wave; 0: every pick on this side is refracted.'),
    firstRefractorPicks: Type.Optional(pickCount('Three-layer lines: picks counted outward from the shot that precede the second refractor’s branch.')),
  },
  { title: 'BranchOverride' },
);

export const SurveyOptionsSchema = Type.Object(
  {
    layers: Type.Optional(Type.Union([Type.Literal(2), Type.Literal(3)], { description: 'Force the number of layers; absent: found from the data.' })),
    reciprocalToleranceMs: numericOption(NUMERIC_OPTIONS.reciprocalToleranceMs, 'Reciprocal times of opposing shots must agree within this many ms.'),
    method: Type.Optional(Type.Union(KNOWN_METHODS.map((m) => Type.Literal(m)), { description: 'Interpretation method.' })),
    residuals: Type.Optional(Type.Boolean({ description: 'Check the interpretation against the picks with a forward model. Default true.' })),
    branchOverrides: Type.Optional(
      Type.Array(BranchOverrideSchema, { maxItems: 2 * SURVEY_LIMITS.maxShots, description: 'Manual branch assignment per shot side.' }),
    ),
    pickUncertaintyMs: numericOption(NUMERIC_OPTIONS.pickUncertaintyMs, 'Pick uncertainty assumed for every first break, ms.'),
  },
  // Unknown option keys are kept with the survey (the contract lets fields be added), so
  // the response serialiser must send them too.
  { title: 'SurveyOptions', additionalProperties: true },
);

export const SurveySchema = Type.Object(
  {
    name: Type.Optional(Type.String({ maxLength: SURVEY_LIMITS.maxNameLength, description: 'Name of the line.' })),
    date: Type.Optional(Type.String({ maxLength: SURVEY_LIMITS.maxDateLength, description: 'Free text: site, date of shooting, crew.' })),
    geophones: Type.Array(GeophoneSchema, { minItems: 2, maxItems: SURVEY_LIMITS.maxGeophones }),
    shots: Type.Array(ShotSchema, { minItems: 1, maxItems: SURVEY_LIMITS.maxShots }),
    options: Type.Optional(SurveyOptionsSchema),
  },
  { title: 'Survey', description: 'One refraction line as it comes from the field (api-v1.md). Units: m, ms, m/s.' },
);

type NullableElevation<T extends { elevation?: number }> = Omit<T, 'elevation'> & { elevation?: number | null };

/** The survey document as a client may send it: a Survey whose elevations may also be null. */
export type SurveyDocument = Omit<Survey, 'geophones' | 'shots'> & {
  geophones: NullableElevation<Geophone>[];
  shots: NullableElevation<Shot>[];
};

/** Compile-time: the schema describes exactly the SurveyDocument type. */
export type SurveySchemaMatchesType = Assert<Same<Static<typeof SurveySchema>, SurveyDocument>>;
