// The station table's columns, declared once for the three places that show stations: the
// page's table (view.js), the share page (server/share-page.ts) and stations.csv
// (server/stations-csv.ts). The server imports this file too, so it stays plain ES with
// JSDoc types: no DOM, no browser globals, nothing from node.
//
// Numbers follow the shown precision declared once in engine/output/display-precision.js (0.1 m, 0.1 ms,
// velocities to 10 m/s), the same the drawings use, so a depth or a velocity reads the same on
// the section, on the page, on the share page and in stations.csv.

import { coverageWords, fixed } from './describe.js';
import { DISPLAY_PRECISION, roundVelocity, velocityText } from '../engine/output/display-precision.js';

/** @typedef {import('../engine/output/interpretation.js').Station} Station */

/**
 * @typedef {object} StationColumn
 * @property {string} key Stable name of the column (tests and CSS read it).
 * @property {string} label Heading words on the page and the share page.
 * @property {string} unit Unit shown beside the heading; '' for none.
 * @property {string} csvHeader Column name in stations.csv (units in the name, snake_case).
 * @property {number | null} decimals Fixed decimals of a number column; null for a text column.
 * @property {(station: Station) => number | string | null | undefined} value The cell's value.
 * @property {boolean} optional Shown only when some station has a value (absent, not null).
 */

/**
 * @param {string} key
 * @param {string} label
 * @param {string} unit
 * @param {string} csvHeader
 * @param {number | null} decimals
 * @param {(station: Station) => number | string | null | undefined} value
 * @param {boolean} [optional]
 * @returns {StationColumn}
 */
function column(key, label, unit, csvHeader, decimals, value, optional = false) {
  return { key, label, unit, csvHeader, decimals, value, optional };
}

/** Decimals per unit: the shown precision (velocities are also rounded to 10 m/s). */
export const UNIT_DECIMALS = Object.freeze({
  m: DISPLAY_PRECISION.metreDecimals, ms: DISPLAY_PRECISION.millisecondDecimals, 'm/s': 0,
});

/**
 * Depth to the k-th refractor (k ≥ 2; the first is the Depth column), one column per
 * refractor below the first that any station reaches.
 * @param {number} k
 * @returns {StationColumn}
 */
function deeperRefractorColumn(k) {
  return column(
    'depth' + k, 'Depth to refractor ' + k, 'm', 'depth_to_refractor_' + k + '_m', UNIT_DECIMALS.m,
    (s) => (Array.isArray(s.depths) ? s.depths[k - 1] : undefined),
  );
}

/** Columns before the deeper refractors, in table order. */
const LEADING_COLUMNS = Object.freeze([
  column('x', 'x', 'm', 'x_m', UNIT_DECIMALS.m, (s) => s.x),
  column('elevation', 'Elevation', 'm', 'elevation_m', UNIT_DECIMALS.m, (s) => s.elevation),
  column('delayTime', 'Delay time', 'ms', 'delay_time_ms', UNIT_DECIMALS.ms, (s) => s.delayTime),
  column('depth', 'Depth', 'm', 'depth_m', UNIT_DECIMALS.m, (s) => s.depth),
  column('depthUncertainty', '± depth', 'm', 'depth_uncertainty_m', UNIT_DECIMALS.m, (s) => s.depthUncertainty, true),
  column('refractorElevation', 'Refractor elevation', 'm', 'refractor_elevation_m', UNIT_DECIMALS.m, (s) => s.refractorElevation),
  column('hiddenLayerDepth', 'Depth if a hidden layer', 'm', 'depth_if_hidden_layer_m', UNIT_DECIMALS.m, (s) => s.hiddenLayerDepth, true),
]);

/** Columns after the deeper refractors, in table order. */
const TRAILING_COLUMNS = Object.freeze([
  column('v1', 'V1', 'm/s', 'v1_m_per_s', UNIT_DECIMALS['m/s'], (s) => s.v1),
  column('refractorVelocity', 'Refractor velocity', 'm/s', 'refractor_velocity_m_per_s', UNIT_DECIMALS['m/s'], (s) => s.refractorVelocity),
  column('normalDepth', 'Normal depth', 'm', 'normal_depth_m', UNIT_DECIMALS.m, (s) => s.normalDepth, true),
  column('plusTime', 'Plus time', 'ms', 'plus_time_ms', UNIT_DECIMALS.ms, (s) => s.plusTime, true),
  column('minusTime', 'Minus time', 'ms', 'minus_time_ms', UNIT_DECIMALS.ms, (s) => s.minusTime, true),
  column('coverage', 'Coverage', '', 'coverage', null, (s) => s.coverage, true),
  column('pairCount', 'Pairs', '', 'pair_count', 0, (s) => s.pairCount, true),
]);

/** Station fields that have a declared column (stations.csv appends any other field after them). */
export const DECLARED_STATION_FIELDS = Object.freeze([
  ...LEADING_COLUMNS.map((c) => c.key), 'depths', ...TRAILING_COLUMNS.map((c) => c.key),
]);

/**
 * The columns for these stations, in order: every column that is not optional, the optional
 * ones only when some station has the value, and one column per deeper refractor.
 * @param {readonly Station[]} stations
 * @returns {StationColumn[]}
 */
export function stationColumns(stations) {
  /** @param {StationColumn} c */
  const shown = (c) => !c.optional || stations.some((s) => c.value(s) !== undefined);
  const refractors = Math.max(1, ...stations.map((s) => (Array.isArray(s.depths) ? s.depths.length : 0)));
  const deeper = [];
  for (let k = 2; k <= refractors; k += 1) deeper.push(deeperRefractorColumn(k));
  return [...LEADING_COLUMNS.filter(shown), ...deeper, ...TRAILING_COLUMNS.filter(shown)];
}

/**
 * Heading with its unit in brackets, e.g. "Depth (m)".
 * @param {StationColumn} c
 * @returns {string}
 */
export function columnHeading(c) {
  return c.unit ? c.label + ' (' + c.unit + ')' : c.label;
}

/**
 * A cell as people read it (page and share page): the column's decimals, velocities rounded
 * to 10 m/s with thousands grouped ("2,800", as the drawings write them), words for codes, a
 * dash where there is no value.
 * @param {StationColumn} c
 * @param {Station} station
 * @returns {string}
 */
export function cellText(c, station) {
  const value = c.value(station);
  if (c.unit === 'm/s') return typeof value === 'number' && Number.isFinite(value) ? velocityText(value) : fixed(null, 0);
  if (c.decimals !== null) return fixed(value, c.decimals);
  if (c.key === 'coverage') return coverageWords(typeof value === 'string' ? value : undefined);
  return value === null || value === undefined ? fixed(null, 0) : String(value);
}

/**
 * A cell as a file carries it (stations.csv): the column's decimals, codes as codes, and an
 * empty string where there is no value (spreadsheets read that as an empty cell).
 * @param {StationColumn} c
 * @param {Station} station
 * @returns {string}
 */
export function cellData(c, station) {
  const value = c.value(station);
  if (value === null || value === undefined) return '';
  if (c.decimals === null) return String(value);
  if (typeof value !== 'number' || !Number.isFinite(value)) return '';
  // Velocities as on the page, rounded to 10 m/s, but without the thousands comma (a CSV separator).
  return fixed(c.unit === 'm/s' ? roundVelocity(value) : value, c.decimals);
}
