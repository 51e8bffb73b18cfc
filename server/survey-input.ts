/**
 * Turns a request body into a valid survey, or throws the coded 400 that lists every
 * problem. JSON bodies go through validateSurvey; text/csv bodies (a pick table) through
 * importPickTable and then validateSurvey as well, so both doors check the same rules.
 */
import type { FastifyRequest } from 'fastify';
import { validateSurvey } from '../engine/survey/validate.js';
import { importPickTable } from '../engine/survey/csv-import.js';
import type { Survey } from '../engine/survey/survey.js';
import { AppError, problemsError } from './errors.js';

/** The media type of the request without parameters, lower case ('' when absent). */
export function mediaTypeOf(request: FastifyRequest): string {
  const header = request.headers['content-type'];
  return typeof header === 'string' ? header.split(';')[0].trim().toLowerCase() : '';
}

const SURVEY_MEDIA_TYPES = new Set(['application/json', 'text/csv']);

export function surveyFromRequest(request: FastifyRequest): Survey {
  const body: unknown = request.body;
  const mediaType = mediaTypeOf(request);
  if (mediaType !== '' && !SURVEY_MEDIA_TYPES.has(mediaType)) throw new AppError('unsupported_content_type');
  if (body === undefined || body === null || (typeof body === 'string' && body.trim() === '')) {
    // A JSON body "null" is a present but wrong body; an absent one is an empty request.
    if (body === null && mediaType === 'application/json') {
      return validated(body);
    }
    throw new AppError('empty_body');
  }
  if (mediaType === 'text/csv') {
    const imported = importPickTable(body as string);
    if (imported.survey === null) throw problemsError('invalid_pick_table', imported.problems);
    return validated(imported.survey);
  }
  return validated(body);
}

function validated(input: unknown): Survey {
  const result = validateSurvey(input);
  if (result.survey === null) throw problemsError('invalid_survey', result.problems);
  return result.survey;
}
