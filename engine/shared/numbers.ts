/**
 * The engine's two number helpers, declared once: a finite-number guard and decimal
 * rounding. Median and other statistics come from simple-statistics.
 */

/** True for a number that is neither NaN nor ±Infinity (a type guard for nullable values). */
export function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

/**
 * `value` rounded to `decimals` places as Math.round rounds (halves toward +∞);
 * never −0, so a rounded output prints as "0".
 *
 * @example
 * roundTo(1.2345, 2) // 1.23
 * roundTo(-0.001, 2) // 0
 */
export function roundTo(value: number, decimals: number): number {
  const f = 10 ** decimals;
  const r = Math.round(value * f) / f;
  return r === 0 ? 0 : r;
}
