/**
 * Warnings of the time-term method when it cannot give the line's answer and plus-minus
 * gives it instead (the interpretation's `method` then says "plus-minus").
 */
import type { Warning } from '../output/interpretation.js';

/** The picks did not fix the time terms (time-terms.ts says why); the plus-minus delay times stand. */
export function timeTermFailedWarning(reason: string): Warning {
  return {
    code: 'time-term-failed',
    message: `The time-term inversion could not be solved (${reason}), so the delay times and depths are those of the plus-minus method.`,
  };
}

/** Time terms map one refractor; a line with a second refractor is interpreted by plus-minus. */
export function timeTermThreeLayerWarning(): Warning {
  return {
    code: 'time-term-two-layer-only',
    message:
      'The time-term method here maps the first refractor of a two-layer line only; this line has a second refractor, so it was interpreted by the plus-minus method (both refractors by layer stripping). Ask for options.layers 2 to see the time terms of the first refractor.',
  };
}
