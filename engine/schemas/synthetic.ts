/**
 * The JSON Schema of the synthetic-line request (POST /api/v1/synthetic,
 * `engine/forward/synthetic-request.ts`), for the route's declared body and the OpenAPI
 * document. The checks and their sentences stay in `validateSyntheticRequest`, which the
 * route runs as the body's validator; the type check at the bottom keeps this schema and
 * `SyntheticRequest` the same shape.
 */
import { Type, type Static } from '@sinclair/typebox';
import { SYNTHETIC_LIMITS, type SyntheticRequest } from '../forward/synthetic-request.js';
import type { Assert, Same } from './same-type.js';

const point = Type.Object({ x: Type.Number({ description: 'm along the line' }), elevation: Type.Number({ description: 'm' }) }, { additionalProperties: false });

const layer = Type.Object(
  {
    velocity: Type.Union([
      Type.Number({ exclusiveMinimum: 0, description: 'm/s' }),
      Type.Object(
        {
          contactsX: Type.Array(Type.Number(), { description: 'x of each lateral contact, m, strictly increasing.' }),
          velocities: Type.Array(Type.Number({ exclusiveMinimum: 0 }), { description: 'One velocity (m/s) more than there are contacts.' }),
        },
        { additionalProperties: false },
      ),
    ]),
    top: Type.Optional(Type.Array(point, { description: 'The interface above the layer; absent for the first layer.' })),
  },
  { additionalProperties: false },
);

export const SyntheticRequestSchema = Type.Object(
  {
    model: Type.Object({ surface: Type.Array(point, { minItems: 1 }), layers: Type.Array(layer, { minItems: 1 }) }, { additionalProperties: false }),
    layout: Type.Object(
      {
        geophoneCount: Type.Integer({ minimum: 1, maximum: SYNTHETIC_LIMITS.maxGeophones }),
        firstX: Type.Number(),
        spacing: Type.Number({ exclusiveMinimum: 0, maximum: SYNTHETIC_LIMITS.maxSpacingM }),
        shots: Type.Array(Type.Object({ x: Type.Number(), id: Type.Optional(Type.String()) }, { additionalProperties: false }), {
          minItems: 1,
          maxItems: SYNTHETIC_LIMITS.maxShots,
        }),
        deadTraces: Type.Optional(Type.Array(Type.Integer({ minimum: 0 }))),
        deadTraceFraction: Type.Optional(Type.Number({ minimum: 0, maximum: 1 })),
        name: Type.Optional(Type.String()),
      },
      { additionalProperties: false },
    ),
    noiseMs: Type.Optional(Type.Number({ minimum: 0, maximum: SYNTHETIC_LIMITS.maxNoiseMs, description: 'Standard deviation of the pick noise, ms.' })),
    seed: Type.Optional(Type.Number({ description: 'Seed of the noise and dead-trace draws.' })),
    cellM: Type.Optional(Type.Number({ minimum: SYNTHETIC_LIMITS.minCellM, maximum: SYNTHETIC_LIMITS.maxCellM, description: 'Grid cell size, m.' })),
  },
  { additionalProperties: false, title: 'SyntheticRequest' },
);

/** Compile-time: the schema describes exactly the SyntheticRequest type. */
export type SyntheticRequestSchemaMatchesType = Assert<Same<Static<typeof SyntheticRequestSchema>, SyntheticRequest>>;
