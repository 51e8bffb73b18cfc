/**
 * How warnings write numbers and positions: one style for every stage's messages, and the
 * same rounding as the drawings, the page, the share page and stations.csv (the display
 * rules of engine/output/display-precision.js: 0.1 m, 0.1 ms, velocities to 10 m/s), so a
 * warning never says 2801 m/s where the section and the table say 2,800.
 */
import { metresText, millisecondsText, velocityText } from '../output/display-precision.js';

/** A velocity as shown, with its unit: 2801 → "2,800 m/s". */
export function velocityWords(velocityMPerS: number): string {
  return `${velocityText(velocityMPerS)} m/s`;
}

/** A velocity as shown, without its unit (for "between 700 and 2,800 m/s"). */
export function velocityNumber(velocityMPerS: number): string {
  return velocityText(velocityMPerS);
}

/** A length (depth, thickness, throw, distance) as shown, without its unit: 5.514 → "5.5". */
export function lengthText(valueM: number): string {
  return metresText(valueM);
}

/** A time as shown, without its unit: 1.987 → "2.0". */
export function timeText(valueMs: number): string {
  return millisecondsText(valueMs);
}

/** A position along the line, m, as shown (0.1 m, the station table's decimals). */
export function positionText(xM: number): string {
  return metresText(xM);
}

/** "x = 4.0 m" or "x = 4.0, 6.0, 8.0 m". */
export function positionsText(xsM: number[]): string {
  return xsM.length === 1 ? `x = ${positionText(xsM[0])} m` : `x = ${xsM.map(positionText).join(', ')} m`;
}

/** As positionsText, but a long list (more than six) is told as its first and last position and its count. */
export function positionsTextShort(xsM: number[]): string {
  if (xsM.length > 6) return `x = ${positionText(xsM[0])}–${positionText(xsM[xsM.length - 1])} m (${xsM.length} geophones)`;
  return positionsText(xsM);
}
