// Pure helpers that turn values into the words and numbers the page shows.
// No DOM here, so each can be reasoned about on its own.

import { degreesText, fixedDecimals, metresText, millisecondsText, velocityText } from '../engine/output/display-precision.js';

/** @typedef {'json' | 'csv'} BodyFormat */

/**
 * Guesses the format of a pick file: by its name first (.json / .csv), then by its
 * content (a JSON survey starts with "{"). Returns 'json' or 'csv'.
 * @param {string} text
 * @param {string} [fileName]
 * @returns {BodyFormat}
 */
export function detectFormat(text, fileName = '') {
  const lower = fileName.toLowerCase();
  if (lower.endsWith('.json')) return 'json';
  if (lower.endsWith('.csv')) return 'csv';
  return text.trimStart().startsWith('{') ? 'json' : 'csv';
}

/**
 * @param {BodyFormat} format
 * @returns {string}
 */
export function formatLabel(format) {
  return format === 'json' ? 'JSON survey' : 'CSV pick table';
}

const DASH = '—';

/**
 * A number with a fixed count of decimals ("-0.0" shown as zero), or a dash when the value
 * is missing.
 * @param {unknown} value
 * @param {number} decimals
 * @returns {string}
 */
export function fixed(value, decimals) {
  if (typeof value !== 'number' || !Number.isFinite(value)) return DASH;
  return fixedDecimals(value, decimals);
}

/**
 * A length, m, to the shown decimals (display-precision.js: 0.1 m), or a dash.
 * @param {unknown} value
 * @returns {string}
 */
export function metres(value) {
  return typeof value === 'number' && Number.isFinite(value) ? metresText(value) : DASH;
}

/**
 * A time, ms, to the shown decimals (0.1 ms), or a dash.
 * @param {unknown} value
 * @returns {string}
 */
export function milliseconds(value) {
  return typeof value === 'number' && Number.isFinite(value) ? millisecondsText(value) : DASH;
}

/**
 * An angle, degrees, to the shown decimals (0.1°), or a dash.
 * @param {unknown} value
 * @returns {string}
 */
export function degrees(value) {
  return typeof value === 'number' && Number.isFinite(value) ? degreesText(value) : DASH;
}

/**
 * A velocity as the drawings write it: rounded to 10 m/s, thousands grouped ("2,800"), or a dash.
 * More digits would claim a precision a fitted slope does not have.
 * @param {unknown} value
 * @returns {string}
 */
export function velocity(value) {
  return typeof value === 'number' && Number.isFinite(value) ? velocityText(value) : DASH;
}

/**
 * The depth range to every refractor over the stations, for a summary: one entry per
 * refractor (two on a three-layer line), e.g. { label: "Depth to refractor 2", text: "8.1–9.4 m" }.
 * Reads station.depth for the first refractor and station.depths[k − 1] for the k-th. O(n·k).
 * @param {readonly { depth?: number | null, depths?: readonly (number | null)[] }[]} stations
 * @returns {{ label: string, text: string }[]}
 */
export function refractorDepthRanges(stations) {
  const count = Math.max(1, ...stations.map((s) => (Array.isArray(s.depths) ? s.depths.length : 0)));
  /** @type {{ label: string, text: string }[]} */
  const ranges = [];
  for (let k = 1; k <= count; k += 1) {
    /** @type {number[]} */
    const depths = [];
    for (const s of stations) {
      const d = k === 1 ? s.depth : Array.isArray(s.depths) ? s.depths[k - 1] : null;
      if (typeof d === 'number' && Number.isFinite(d)) depths.push(d);
    }
    const label = count === 1 ? 'Depth to the refractor' : 'Depth to refractor ' + k;
    if (depths.length === 0) {
      ranges.push({ label, text: 'not reached at any station' });
      continue;
    }
    const lo = metres(Math.min(...depths));
    const hi = metres(Math.max(...depths));
    ranges.push({ label, text: (lo === hi ? lo : lo + '–' + hi) + ' m' });
  }
  return ranges;
}

/** @type {Readonly<Record<string, string>>} */
const COVERAGE_WORDS = {
  pair: 'opposing shots',
  phantom: 'phantomed',
  none: 'none',
};

/**
 * How a station's plus time was found, in words; with more than one opposing pair, how many.
 * @param {string | null | undefined} coverage
 * @param {number | null} [pairCount]
 * @returns {string}
 */
export function coverageWords(coverage, pairCount) {
  if (!coverage) return DASH;
  const words = COVERAGE_WORDS[coverage] ?? String(coverage);
  if (coverage === 'pair' && typeof pairCount === 'number' && pairCount > 1) return words + ' (' + pairCount + ' pairs)';
  return words;
}

/**
 * The rock steps of a three-layer line in words (features.lowerRefractor), or null when the
 * line was not tested for them (two layers, or too few rock depths).
 * "none found" says how strong the largest jump was against the line's own noise (the
 * Monte Carlo p-value), so a geophysicist can tell "no hint" from "nearly".
 * @param {{ steps?: { x: number; throw: number }[]; stepTest?: { pValue: number } } | null | undefined} lowerRefractor
 * @returns {string | null}
 */
export function rockStepWords(lowerRefractor) {
  if (!lowerRefractor || !Array.isArray(lowerRefractor.steps)) return null;
  const steps = lowerRefractor.steps;
  if (steps.length > 0) {
    return steps
      .map((s) => 'at x = ' + metres(s.x) + ' m, the rock ' + metres(Math.abs(s.throw)) + ' m deeper toward ' + (s.throw >= 0 ? '+x' : '−x'))
      .join('; ');
  }
  const p = lowerRefractor.stepTest?.pValue;
  return typeof p === 'number' && Number.isFinite(p) ? 'none found (largest jump p = ' + fixed(p, 2) + ')' : 'none found';
}

/**
 * What describePath reads from a survey the page parsed itself (not validated, so every part
 * may be missing).
 * @typedef {{ shots?: ({ id?: unknown } | null | undefined)[] } | null} SurveyNames
 */

/**
 * @param {string} indexText
 * @returns {string}
 */
function ordinalPosition(indexText) {
  return String(Number(indexText) + 1);
}

/**
 * Plain words for a JSON pointer into the survey document, e.g. "/shots/2/times/7" →
 * "shot 3 (“W-end”), pick at geophone 8". The survey, when known, lends shot names.
 * Unknown shapes come back as the pointer itself.
 * @param {unknown} path
 * @param {SurveyNames} [survey]
 * @returns {string}
 */
export function describePath(path, survey) {
  if (typeof path !== 'string' || path === '' || path === '/') return 'the whole file';
  const parts = path.split('/').slice(1).map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'));
  const [head, index, field, sub] = parts;
  if (head === 'geophones' && index !== undefined && /^\d+$/.test(index)) {
    const where = 'geophone ' + ordinalPosition(index);
    return field ? where + ', field “' + field + '”' : where;
  }
  if (head === 'shots' && index !== undefined && /^\d+$/.test(index)) {
    const shotId = survey?.shots?.[Number(index)]?.id;
    let where = 'shot ' + ordinalPosition(index);
    if (typeof shotId === 'string' && shotId) where += ' (“' + shotId + '”)';
    if (field === 'times' && sub !== undefined && /^\d+$/.test(sub)) return where + ', pick at geophone ' + ordinalPosition(sub);
    return field ? where + ', field “' + field + '”' : where;
  }
  if (head === 'csv') {
    if (index === 'line' && field !== undefined && /^\d+$/.test(field)) {
      return 'line ' + field + ' of the pick table' + (sub ? ', column “' + sub + '”' : '');
    }
    return 'the pick table';
  }
  if (head === 'options') return field === undefined && index ? 'option “' + index + '”' : 'options';
  if (parts.length === 1) return 'field “' + head + '”';
  return path;
}

/**
 * What a file is when it is binary rather than a text pick file, in words, or null for text.
 * Looks at the first bytes only (O(1) in file size, at most 4096 bytes read):
 *  - SEG-2 shot record: its file descriptor block starts with the id 0x3A55, stored little-endian
 *    as the bytes 55 3A (from memory: Pullan 1990, SEG-2 format, Geophysics 55(11)), or big-endian 3A 55;
 *  - SEG-Y: a 3200-byte EBCDIC text header that starts with "C" (0xC3) and a space (0x40)
 *    (SEG-Y rev 1, 2002, section 3);
 *  - a ZIP container (.xlsx, .docx, .zip: "PK\x03\x04"), an old Office file (D0 CF 11 E0),
 *    a PDF ("%PDF");
 *  - anything else with a NUL byte or more than 10 % control characters (common practice).
 * @param {Uint8Array} bytes The file's first bytes.
 * @returns {string | null}
 */
export function binaryKind(bytes) {
  const head = bytes.subarray(0, 4096);
  const b = (/** @type {number} */ i) => head[i] ?? -1;
  if ((b(0) === 0x55 && b(1) === 0x3a) || (b(0) === 0x3a && b(1) === 0x55)) return 'a SEG-2 seismograph record';
  if (b(0) === 0xc3 && b(1) === 0x40) return 'a SEG-Y seismic data file';
  if (b(0) === 0x50 && b(1) === 0x4b && b(2) === 0x03 && b(3) === 0x04) return 'a ZIP container (for example an Excel .xlsx workbook)';
  if (b(0) === 0xd0 && b(1) === 0xcf && b(2) === 0x11 && b(3) === 0xe0) return 'an Office document (for example an Excel .xls workbook)';
  if (b(0) === 0x25 && b(1) === 0x50 && b(2) === 0x44 && b(3) === 0x46) return 'a PDF document';
  let control = 0;
  for (const byte of head) {
    if (byte === 0) return 'a binary file';
    // Tab, line feed, carriage return and form feed are text.
    if (byte < 0x20 && byte !== 0x09 && byte !== 0x0a && byte !== 0x0d && byte !== 0x0c) control += 1;
  }
  return head.length > 0 && control / head.length > 0.1 ? 'a binary file' : null;
}

/**
 * The line name a pick table carries in its leading "# name: …" comment, or ''.
 * @param {string} text
 * @returns {string}
 */
export function pickTableName(text) {
  for (const line of String(text).split(/\r?\n/, 20)) {
    const trimmed = line.replace(/^\uFEFF/, '').trim();
    if (!trimmed.startsWith('#')) break;
    const match = /^#\s*name\s*:\s*(.+)$/i.exec(trimmed);
    if (match) return match[1].trim();
  }
  return '';
}

/**
 * A readable local date and time for an ISO timestamp, or the text itself when unreadable.
 * @param {unknown} isoText
 * @returns {string}
 */
export function when(isoText) {
  if (typeof isoText !== 'string') return '';
  const date = new Date(isoText);
  if (Number.isNaN(date.getTime())) return isoText;
  return date.toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
}

/**
 * A file-name-safe stem for downloads, from the line's name.
 * @param {unknown} name
 * @returns {string}
 */
export function fileStem(name) {
  const stem = String(name ?? '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return stem || 'line';
}
