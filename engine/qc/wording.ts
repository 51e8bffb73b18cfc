/**
 * How warnings write numbers and positions: one style for every stage's messages.
 */
import { roundTo } from '../shared/numbers.js';

/** A number with a fixed count of decimals, e.g. a time in a sentence. */
export function fixed(value: number, decimals: number): string {
  return value.toFixed(decimals);
}

/** A position along the line, m, to 0.01 m without trailing zeros. */
export function positionText(xM: number): string {
  return String(roundTo(xM, 2));
}

/** "x = 4 m" or "x = 4, 6, 8 m". */
export function positionsText(xsM: number[]): string {
  return xsM.length === 1 ? `x = ${positionText(xsM[0])} m` : `x = ${xsM.map(positionText).join(', ')} m`;
}

/** As positionsText, but a long list (more than six) is told as its first and last position and its count. */
export function positionsTextShort(xsM: number[]): string {
  if (xsM.length > 6) return `x = ${positionText(xsM[0])}–${positionText(xsM[xsM.length - 1])} m (${xsM.length} geophones)`;
  return positionsText(xsM);
}
