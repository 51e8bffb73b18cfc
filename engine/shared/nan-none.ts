/**
 * Per-pair arrays (one value per geophone for every opposing shot pair: head-wave times,
 * T+, T− and their variances) are arrays of doubles (shared/zeros.ts) with NaN meaning "none" where the rest
 * of the engine uses `null`. A 1,024-geophone, 64-shot line holds about 2,000 pairs × 1,024
 * geophones × several arrays: as `(number | null)[]` every value was a boxed heap number
 * that the young-generation collector copied scavenge after scavenge; arrays of doubles hold
 * them unboxed (long ones outside the scanned heap). Only these arrays use NaN: what leaves the
 * engine (the JSON result) says null, converted by `toNullable`.
 */
import { zeros, type Doubles } from './zeros.js';

/** A per-pair array: one value per geophone, NaN where there is none. */
export type NanNone = Doubles;

/** True where the array holds a value (not NaN). */
export function isSome(value: number): boolean {
  return value === value;
}

/** From the engine's nullable form: null (or undefined) → NaN. O(n). */
export function fromNullable(values: readonly (number | null | undefined)[]): NanNone {
  const out = zeros(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    out[i] = v === null || v === undefined ? Number.NaN : v;
  }
  return out;
}

/** Back to the nullable form the output and the rest of the engine use: NaN → null. O(n). */
export function toNullable(values: ArrayLike<number>): (number | null)[] {
  const out: (number | null)[] = new Array<number | null>(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    out[i] = v === v ? v : null;
  }
  return out;
}
