// The hidden-layer caution in calm words with the numbers that matter. The engine gives it on
// nearly every line (a thin layer can always hide in the blind zone above a refractor), so the
// page and the share page show it as information beside the figures, not as an alarm among
// the warnings. Plain ES with JSDoc types and no DOM: the server's share page imports it too.

import { metres } from './describe.js';

/**
 * @typedef {import('../engine/output/interpretation.js').Interpretation} Interpretation
 * @typedef {import('../engine/output/interpretation.js').Warning} Warning
 */

/** The engine's code of the caution (engine/structure/hidden-layer.ts). */
export const HIDDEN_LAYER_CODE = 'hidden-layer';

/**
 * @typedef {object} HiddenLayerNote
 * @property {string} short One short sentence for the line above the figures.
 * @property {string} headline One sentence: how much deeper the refractor could be.
 * @property {string} detail Where the numbers are drawn and listed.
 * @property {string} reasoning The engine's own message (thickness, velocities, sources).
 * @property {number | null} mostExtraM The largest extra depth over the stations, m (null when no station carries it).
 */

/**
 * The hidden-layer note of an interpretation, or null when the engine gave no such caution.
 * The extra depth per station is hiddenLayerDepth − depth (both from the interpretation), so
 * the range quoted is exactly what the dash-dot line on the section and the table column show.
 * Cost O(n) in stations.
 * @param {Pick<Interpretation, 'stations' | 'qc'>} interpretation
 * @returns {HiddenLayerNote | null}
 */
export function hiddenLayerNote(interpretation) {
  const warnings = Array.isArray(interpretation.qc?.warnings) ? interpretation.qc.warnings : [];
  const warning = warnings.find((w) => w && w.code === HIDDEN_LAYER_CODE);
  if (!warning) return null;
  const stations = Array.isArray(interpretation.stations) ? interpretation.stations : [];
  /** @type {number[]} */
  const extras = [];
  for (const s of stations) {
    if (typeof s.hiddenLayerDepth === 'number' && typeof s.depth === 'number') extras.push(Math.max(0, s.hiddenLayerDepth - s.depth));
  }
  const reasoning = String(warning.message ?? '');
  if (extras.length === 0) {
    return {
      short: 'Hidden-layer allowance: a thin layer could hide above the refractor (details below the figures).',
      headline: 'A layer too thin to give first arrivals could lie above the refractor unseen.',
      detail: 'This is a limit of the method on every refraction line, not a fault in these picks.',
      reasoning,
      mostExtraM: null,
    };
  }
  const least = Math.min(...extras);
  const most = Math.max(...extras);
  const along = metres(least) === metres(most) ? '' : ' (' + metres(least) + '–' + metres(most) + ' m along the line)';
  return {
    short: 'Hidden-layer allowance: the refractor could be up to ' + metres(most) + ' m deeper than drawn if a thin layer hides above it.',
    headline: 'If a layer too thin to give first arrivals lies above the refractor, '
      + 'the refractor could be up to ' + metres(most) + ' m deeper than drawn' + along + '.',
    detail: 'A limit of the method on every refraction line, not a fault in these picks. The section draws the '
      + 'deeper limit as a dash-dot line; the station table gives it as “Depth if a hidden layer”.',
    reasoning,
    mostExtraM: most,
  };
}

/**
 * The warnings other than the hidden-layer caution (which hiddenLayerNote shows on its own).
 * @param {readonly Warning[] | undefined} warnings
 * @returns {Warning[]}
 */
export function otherWarnings(warnings) {
  return (Array.isArray(warnings) ? warnings : []).filter((w) => w && w.code !== HIDDEN_LAYER_CODE);
}
