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
