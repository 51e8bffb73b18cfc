/**
 * The JSON Schema of the method comparison the service answers (GET …/methods.json, POST
 * /api/v1/previews/methods), beside its type in engine/compare/method-comparison.ts; the
 * check at the bottom fails to compile when they drift apart.
 */
import { Type, type Static } from '@sinclair/typebox';
import { KNOWN_METHODS } from '../survey/options.js';
import type { MethodComparisonSummary } from '../compare/method-comparison.js';
import type { Assert, Same } from './same-type.js';

const closed = { additionalProperties: false } as const;
const method = Type.Union(KNOWN_METHODS.map((m) => Type.Literal(m)));

export const MethodComparisonSchema = Type.Object(
  {
    runs: Type.Array(
      Type.Object(
        {
          method,
          ran: Type.Boolean({ description: 'False when the engine fell back to plus-minus for this method.' }),
          note: Type.Union([Type.String(), Type.Null()], { description: 'Why the method did not run (its warning), else null.' }),
        },
        closed,
      ),
    ),
    differences: Type.Array(
      Type.Object(
        {
          // An array of two, not a tuple: the response serialiser does not match unions inside tuple items.
          methods: Type.Array(method, { minItems: 2, maxItems: 2, description: 'The two methods compared.' }),
          from: Type.Number({ description: 'First station of the stretch, m.' }),
          to: Type.Number({ description: 'Last station of the stretch, m.' }),
          stations: Type.Integer({ minimum: 0 }),
          largest: Type.Number({ description: 'Largest |Δ depth| in the stretch, m.' }),
          atX: Type.Number({ description: 'Where the largest difference is, m.' }),
          combinedSigma: Type.Number({ description: '√(σ₁² + σ₂²) of the two depths there, m.' }),
          deeperBy: method,
        },
        closed,
      ),
      { description: 'Stretches of consecutive stations where two methods differ by more than their combined 1σ.' },
    ),
  },
  { ...closed, title: 'MethodComparison', description: 'The first refractor by plus-minus, GRM and time terms: where they differ beyond their uncertainty.' },
);

/** Compile-time: the schema describes exactly the summary type. */
export type MethodComparisonSchemaMatchesType = Assert<Same<Static<typeof MethodComparisonSchema>, MethodComparisonSummary>>;
