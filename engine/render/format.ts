/**
 * Number formatting for labels. Written out by hand (no Intl) so the output does not
 * depend on the machine's locale: every render of the same interpretation is identical.
 * How many digits a velocity, a length or a time shows is declared once, in
 * engine/output/display-precision.js, which the warnings, the page, the share page and
 * stations.csv read too: the drawings, the tables and the texts show the same numbers.
 */
import { fixedDecimals, groupThousands, metresText, millisecondsText, velocityText } from '../output/display-precision.js';

export { groupThousands };

/** A velocity label, rounded to the shown step (10 m/s): 2483.2 → "2,480 m/s". */
export function formatVelocity(velocityMPerS: number): string {
  return `${velocityText(velocityMPerS)} m/s`;
}

/** Fixed decimals without "-0.0". */
export function fixed(value: number, decimals: number): string {
  return fixedDecimals(value, decimals);
}

/** A length to the shown decimals (0.1 m): "2.8 m". */
export function formatMetres(valueM: number): string {
  return `${metresText(valueM)} m`;
}

/** A time to the shown decimals (0.1 ms): "0.4 ms". */
export function formatMs(valueMs: number): string {
  return `${millisecondsText(valueMs)} ms`;
}

/** A tick label: as many decimals as the tick step needs, no more. */
export function formatTick(value: number, step: number): string {
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return fixed(value, decimals);
}

/** Rounds plot coordinates to 1/1000 mm: keeps the SVG small and the output stable. */
export function round3(value: number): number {
  return Math.round(value * 1000) / 1000;
}
