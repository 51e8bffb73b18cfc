/**
 * Work arrays of doubles for the engine's per-line arithmetic, sized by what they cost.
 * V8 allocates a typed array of more than 64 bytes outside its heap, several times dearer
 * than a plain array for a few dozen values (measured here: 0.4 µs against 0.1 µs for 24),
 * and a demo line made more than 400 of them per interpretation; but a large plain array
 * sits in the young generation, which copies it at every scavenge (a 1,024-geophone,
 * 64-shot line spent 28 % of its time collecting with plain arrays, 7 % with typed ones).
 * So short arrays are plain and long ones typed. Either keeps its numbers unboxed, as long
 * as only numbers (NaN included) go in.
 */

/** A work array of doubles: index, assign, .length, .fill; nothing else is assumed. */
export type Doubles = number[] | Float64Array;

/** Up to this many values a plain array is cheaper to make; above, a typed array is cheaper to keep. Measured here (see above). */
const PLAIN_UP_TO = 256;

/** n zeros. O(n). */
export function zeros(n: number): Doubles {
  return n <= PLAIN_UP_TO ? new Array<number>(n).fill(0) : new Float64Array(n);
}
