// Whether a newly interpreted line has the geophone layout of the stored line it would become
// a revision of, and if not, what changes, in words. A revision is meant to be the same line
// with corrected picks; another layout is most often another line loaded by mistake, so the
// page asks before storing it as a revision (the service also refuses it with 409 unless the
// request says the change is meant). Plain ES with JSDoc types, no DOM.

import { metres } from './describe.js';

/**
 * Positions closer than this are the same geophone, m: the service's own tolerance
 * (server/revision-layout.ts, SAME_POSITION_TOLERANCE_M, 1 mm), so the page asks exactly
 * when the service would answer 409.
 */
export const SAME_POSITION_M = 0.001;

/**
 * The layout in words: "24 geophones from 0.0 to 69.0 m, every 3.0 m" (spacing named only
 * when it is regular). O(n).
 * @param {readonly number[]} xs Geophone positions along the line, m, in order.
 * @returns {string}
 */
export function layoutWords(xs) {
  if (xs.length === 0) return 'no geophones';
  if (xs.length === 1) return '1 geophone at ' + metres(xs[0]) + ' m';
  const first = xs[0];
  const last = xs[xs.length - 1];
  const spacing = (last - first) / (xs.length - 1);
  const regular = xs.every((x, i) => Math.abs(x - (first + i * spacing)) < SAME_POSITION_M);
  return xs.length + ' geophones from ' + metres(first) + ' to ' + metres(last) + ' m'
    + (regular ? ', every ' + metres(spacing) + ' m' : ', irregularly spaced');
}

/**
 * A geophone position as surveyed, to 0.01 m without trailing zeros, so a small move shows.
 * @param {number} x
 * @returns {string}
 */
function position(x) {
  return String(Number(x.toFixed(2)));
}

/**
 * What changes from the stored layout to the new one, in words, or null when the layouts are
 * the same (same count, every position within SAME_POSITION_M). O(n).
 * @param {readonly number[]} storedXs
 * @param {readonly number[]} newXs
 * @returns {string | null}
 */
export function layoutChange(storedXs, newXs) {
  if (storedXs.length !== newXs.length) {
    return 'The stored line has ' + layoutWords(storedXs) + '; this file has ' + layoutWords(newXs) + '.';
  }
  /** @type {number[]} */
  const moved = [];
  storedXs.forEach((x, i) => {
    if (!(Math.abs(x - newXs[i]) < SAME_POSITION_M)) moved.push(i);
  });
  if (moved.length === 0) return null;
  const sameExtent = Math.abs(storedXs[0] - newXs[0]) < SAME_POSITION_M
    && Math.abs(storedXs[storedXs.length - 1] - newXs[newXs.length - 1]) < SAME_POSITION_M;
  if (!sameExtent) {
    return 'The stored line has ' + layoutWords(storedXs) + '; this file has ' + layoutWords(newXs) + ': '
      + moved.length + ' of the ' + storedXs.length + ' geophones are at other positions.';
  }
  const shown = moved.slice(0, 3).map((i) => 'geophone ' + (i + 1) + ' from ' + position(storedXs[i]) + ' to ' + position(newXs[i]) + ' m');
  const rest = moved.length - shown.length;
  return 'Both have ' + layoutWords(storedXs).replace(/, (every|irregularly).*$/, '') + ', but '
    + (moved.length === 1 ? 'one geophone has' : moved.length + ' geophones have')
    + ' moved: ' + shown.join(', ') + (rest > 0 ? ' and ' + rest + ' more' : '') + '.';
}
