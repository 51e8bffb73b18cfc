import type { Survey } from './survey.js';
import type { Problem } from './problem.js';

export type SurveyValidation = { survey: Survey; problems: [] } | { survey: null; problems: Problem[] };

/** STUB — being written: checks a survey document and returns every problem found. */
export function validateSurvey(_input: unknown): SurveyValidation {
  throw new Error('validateSurvey: not yet implemented');
}
