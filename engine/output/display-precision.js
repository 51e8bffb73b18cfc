// How precisely every place that shows a number shows it: the drawings (engine/render/format.ts),
// the warning texts (engine/qc/wording.ts), the page, the share page and stations.csv. Declared
// once here, so the section never says 2,800 m/s where the table or a warning says 2801.
//
// It lives in the engine (the engine must not import web/) as plain ES with JSDoc types, no
// DOM and nothing from node: the service serves this very file to the page at
// /engine/output/display-precision.js (server/display-rules-route.ts), where the page's modules
// import it by the same relative path as on disk ('../engine/output/display-precision.js').
//
// The interpretation JSON keeps the engine's finer output rounding (OUTPUT_DECIMALS: 0.01 m,
// 0.01 ms, 1 m/s) for anyone computing further; what people read, and the station table file,
// carry these:
//   - lengths (positions, elevations, depths, thicknesses, uncertainties): 0.1 m. A refraction
//     depth is uncertain by decimetres at best; the section is drawn at that resolution.
//   - times (delay, plus, minus times, reciprocal differences, misfits): 0.1 ms, the usual
//     reading precision of a first break on an engineering seismograph (common practice).
//   - velocities: to the nearest 10 m/s (the precision a refraction velocity is quoted to,
//     common practice); a fitted slope is not known to 1 m/s.
//   - angles (dips): 0.1°.

export const DISPLAY_PRECISION = Object.freeze({
  /** Decimals of every length shown, m. */
  metreDecimals: 1,
  /** Decimals of every time shown, ms. */
  millisecondDecimals: 1,
  /** Decimals of every angle shown, degrees. */
  degreeDecimals: 1,
  /** Velocities are rounded to a multiple of this, m/s. */
  velocityStepMPerS: 10,
});

/**
 * Fixed decimals without a "-0.0" (it reads as a sign error on a section).
 * @param {number} value
 * @param {number} decimals
 * @returns {string}
 */
export function fixedDecimals(value, decimals) {
  const text = value.toFixed(decimals);
  return Number(text) === 0 ? (0).toFixed(decimals) : text;
}

/**
 * Groups thousands with commas, written by hand (no Intl) so the text does not depend on the
 * machine's locale: 12480 → "12,480". Rounds to an integer first.
 * @param {number} value
 * @returns {string}
 */
export function groupThousands(value) {
  const rounded = Math.round(value);
  const sign = rounded < 0 ? '-' : '';
  return sign + String(Math.abs(rounded)).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/**
 * A velocity rounded to the shown step: 2801 → 2800.
 * @param {number} velocityMPerS
 * @returns {number}
 */
export function roundVelocity(velocityMPerS) {
  const step = DISPLAY_PRECISION.velocityStepMPerS;
  return Math.round(velocityMPerS / step) * step;
}

/**
 * A velocity as people read it, without the unit: 2801 → "2,800".
 * @param {number} velocityMPerS
 * @returns {string}
 */
export function velocityText(velocityMPerS) {
  return groupThousands(roundVelocity(velocityMPerS));
}

/**
 * A length without the unit: 5.014 → "5.0".
 * @param {number} valueM
 * @returns {string}
 */
export function metresText(valueM) {
  return fixedDecimals(valueM, DISPLAY_PRECISION.metreDecimals);
}

/**
 * A time without the unit: 6.95 → "7.0".
 * @param {number} valueMs
 * @returns {string}
 */
export function millisecondsText(valueMs) {
  return fixedDecimals(valueMs, DISPLAY_PRECISION.millisecondDecimals);
}

/**
 * An angle without the unit: 3.46 → "3.5".
 * @param {number} degrees
 * @returns {string}
 */
export function degreesText(degrees) {
  return fixedDecimals(degrees, DISPLAY_PRECISION.degreeDecimals);
}
