/**
 * Geometry of the gather display (pure, no DOM; the unit tests call it): traces side by side
 * across the canvas in geophone order, time downward (the way refraction gathers are
 * commonly drawn), and the inverse mappings a click needs.
 */

/** Margins of the plot inside the canvas, px: room for the time labels on the left and the channel numbers above (our choice). */
export const PLOT_MARGIN = Object.freeze({ left: 48, right: 12, top: 22, bottom: 10 });

/**
 * @typedef {object} PlotLayout
 * @property {number} left
 * @property {number} top
 * @property {number} width   plot width, px
 * @property {number} height  plot height, px
 * @property {number} spacing px between neighbouring traces
 * @property {(index: number) => number} traceX centre of trace `index`
 * @property {(ms: number) => number} timeY
 * @property {(px: number) => number} traceAt  nearest trace to a canvas x (clamped)
 * @property {(py: number) => number} timeAt   time at a canvas y, ms (clamped to the window)
 */

/**
 * @param {number} canvasWidth
 * @param {number} canvasHeight
 * @param {number} traceCount
 * @param {number} fromMs
 * @param {number} toMs
 * @returns {PlotLayout}
 */
export function plotLayout(canvasWidth, canvasHeight, traceCount, fromMs, toMs) {
  const left = PLOT_MARGIN.left;
  const top = PLOT_MARGIN.top;
  const width = Math.max(1, canvasWidth - PLOT_MARGIN.left - PLOT_MARGIN.right);
  const height = Math.max(1, canvasHeight - PLOT_MARGIN.top - PLOT_MARGIN.bottom);
  const spacing = width / Math.max(1, traceCount);
  const span = toMs - fromMs;
  return {
    left,
    top,
    width,
    height,
    spacing,
    traceX: (index) => left + (index + 0.5) * spacing,
    timeY: (ms) => top + ((ms - fromMs) / span) * height,
    traceAt: (px) => Math.min(traceCount - 1, Math.max(0, Math.floor((px - left) / spacing))),
    timeAt: (py) => Math.min(toMs, Math.max(fromMs, fromMs + ((py - top) / height) * span)),
  };
}

/**
 * The time window to show for a shot: from the first sample to a little past the latest
 * pick (1.5 × the latest pick + 10 ms, our choice: room to see the arrivals after it),
 * never past the record.
 * @param {(number|null)[]} times
 * @param {number} recordFromMs
 * @param {number} recordToMs
 * @returns {{ fromMs: number, toMs: number }}
 */
export function reviewWindow(times, recordFromMs, recordToMs) {
  const picked = /** @type {number[]} */ (times.filter((t) => typeof t === 'number'));
  if (picked.length === 0) return { fromMs: recordFromMs, toMs: recordToMs };
  const latest = Math.max(...picked);
  return { fromMs: recordFromMs, toMs: Math.min(recordToMs, Math.max(recordFromMs + 1, 1.5 * latest + 10)) };
}

/**
 * A copy of the times with one pick moved (to `ms`, kept to 0.01 ms, the service's
 * precision) or cleared (`null`).
 * @param {(number|null)[]} times
 * @param {number} index
 * @param {number|null} ms
 * @returns {(number|null)[]}
 */
export function withPick(times, index, ms) {
  const out = times.slice();
  out[index] = ms === null ? null : Math.round(ms * 100) / 100;
  return out;
}

/**
 * Confidence under which an automatic pick is drawn hollow and listed to be checked first.
 * Our choice: confidence 1 − 1/s² (engine/picking/pick-gather.ts) is 0.5 where the signal
 * after the pick is √2 times the noise before it.
 */
export const LOW_PICK_CONFIDENCE = 0.5;

/** Thinnest and thickest pick bar, px: thickness grows with the picker's confidence (our choice). */
export const PICK_BAR_PX = Object.freeze({ thin: 2, thick: 6 });

/**
 * @typedef {object} PickMark
 * @property {'none'|'automatic'|'low'|'reviewed'|'edited'} kind
 *   automatic: the picker's pick, stored as it picked it; low: the same with low confidence
 *   (drawn hollow); reviewed: a stored pick that is not the picker's (a person set it);
 *   edited: changed here, not stored yet; none: no pick.
 * @property {number|null} confidence the picker's confidence where the pick is still its own
 * @property {number} thickness bar thickness, px
 */

/**
 * How each trace's pick is drawn. A pick is the picker's own when it is within 0.005 ms of
 * the picker's time (the service keeps times to 0.01 ms). O(traces).
 * @param {(number|null)[]} shown    the times on show (edited or stored)
 * @param {(number|null)[]} stored   the stored times
 * @param {{ times: (number|null)[], confidence: number[] } | undefined} automatic the picker's answer, when the service sent it
 * @returns {PickMark[]}
 */
export function pickMarks(shown, stored, automatic) {
  return shown.map((t, i) => {
    if (t === null || t === undefined) return { kind: 'none', confidence: null, thickness: 0 };
    if (t !== stored[i]) return { kind: 'edited', confidence: null, thickness: 3 };
    const auto = automatic?.times[i];
    const c = automatic?.confidence[i];
    if (typeof auto !== 'number' || typeof c !== 'number' || Math.abs(auto - t) > 0.005) return { kind: 'reviewed', confidence: null, thickness: 3 };
    const thickness = PICK_BAR_PX.thin + (PICK_BAR_PX.thick - PICK_BAR_PX.thin) * Math.max(0, Math.min(1, c));
    return { kind: c < LOW_PICK_CONFIDENCE ? 'low' : 'automatic', confidence: c, thickness };
  });
}

/**
 * The traces whose pick to check first: the picker's own picks with low confidence, least
 * confident first. O(traces log traces).
 * @param {PickMark[]} marks
 * @returns {number[]} trace indices
 */
export function checkFirst(marks) {
  return marks
    .map((m, i) => ({ m, i }))
    .filter(({ m }) => m.kind === 'low')
    .sort((a, b) => /** @type {number} */ (a.m.confidence) - /** @type {number} */ (b.m.confidence) || a.i - b.i)
    .map(({ i }) => i);
}
