// Pure helpers that turn values into the words and numbers the page shows.
// No DOM here, so each can be reasoned about on its own.

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
 * A number with a fixed count of decimals, or a dash when the value is missing.
 * @param {unknown} value
 * @param {number} decimals
 * @returns {string}
 */
export function fixed(value, decimals) {
  if (typeof value !== 'number' || !Number.isFinite(value)) return DASH;
  const text = value.toFixed(decimals);
  // "-0.0" reads as a sign error on a section; show it as zero.
  return Number(text) === 0 ? (0).toFixed(decimals) : text;
}

/**
 * Distance along the line, m: whole metres stay whole, fractions keep up to two decimals.
 * @param {unknown} value
 * @returns {string}
 */
export function metres(value) {
  if (typeof value !== 'number' || !Number.isFinite(value)) return DASH;
  return String(Number(value.toFixed(2)));
}

/**
 * Velocities are shown to the metre per second: more digits would claim false precision.
 * @param {unknown} value
 * @returns {string}
 */
export function velocity(value) {
  return fixed(value, 0);
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
