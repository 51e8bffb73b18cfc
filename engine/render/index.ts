import type { Survey } from '../survey.js';
import type { Interpretation } from '../interpretation.js';

/** STUB — being written: SVG depth section of an interpretation. */
export function renderSection(_survey: Survey, _interpretation: Interpretation): string {
  throw new Error('renderSection: not yet implemented');
}

/** STUB — being written: SVG time–distance plot of a survey's picks and fitted branches. */
export function renderTravelTimes(_survey: Survey, _interpretation: Interpretation): string {
  throw new Error('renderTravelTimes: not yet implemented');
}
