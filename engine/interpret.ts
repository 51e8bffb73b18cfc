import type { Survey } from './survey.js';
import type { Interpretation } from './interpretation.js';

/**
 * Interprets one refraction line: branches, velocities, reciprocal check, plus-minus delay
 * times and depths under every geophone. The survey must already be valid (validateSurvey).
 * STUB — being written; replaced by the real pipeline.
 */
export function interpret(_survey: Survey): Interpretation {
  throw new Error('interpret: not yet implemented');
}
