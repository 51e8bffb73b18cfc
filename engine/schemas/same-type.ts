/**
 * A compile-time check that a JSON Schema (built with TypeBox) and a hand-written TypeScript
 * type describe the same JSON: `Same<Static<typeof Schema>, Type>` is `true` only when both
 * have the same properties, each with the same optionality and the same value type, at
 * every depth. Mutual assignability alone would let an optional field exist on one side
 * only; this check does not.
 *
 * @example
 * export type SurveySchemaMatches = Assert<Same<Static<typeof SurveySchema>, SurveyDocument>>;
 */

/** The type with intersections flattened at every depth, so that equal shapes compare equal. */
export type Normalised<T> = T extends (infer U)[]
  ? number extends T['length']
    ? Normalised<U>[]
    : { [K in keyof T]: Normalised<T[K]> }
  : T extends object
    ? { [K in keyof T]: Normalised<T[K]> }
    : T;

/** true when A and B describe exactly the same JSON values and optional properties, else false. */
export type Same<A, B> =
  (<X>() => X extends Normalised<A> ? 1 : 2) extends <X>() => X extends Normalised<B> ? 1 : 2 ? true : false;

/** Fails to compile unless T is true. */
export type Assert<T extends true> = T;
