/**
 * The one door of every route that takes a line. As the body validator of those routes
 * (`surveyInput()` below), it turns the body into a valid survey before the handler runs, or
 * answers the coded 400 that lists every problem: JSON bodies go through validateSurvey
 * (limits, the survey's JSON Schema, the rules it cannot say); text/csv bodies (a pick table)
 * through importPickTable and then validateSurvey as well, so both doors check the same rules.
 * The handler then calls surveyFromRequest, which returns the validated survey, or answers
 * an empty or missing body.
 */
import type { FastifyRequest, FastifySchema, FastifySchemaCompiler } from 'fastify';
import { validateSurvey } from '../engine/survey/validate.js';
import { importPickTable } from '../engine/survey/csv-import.js';
import type { Survey } from '../engine/survey/survey.js';
import { AppError, problemsError } from './errors.js';
import { surveyBody } from './route-schemas.js';
import { bodyDoorCompiler } from './validators.js';

/** The media type of the request without parameters, lower case ('' when absent). */
export function mediaTypeOf(request: FastifyRequest): string {
  const header = request.headers['content-type'];
  return typeof header === 'string' ? header.split(';')[0].trim().toLowerCase() : '';
}

const SURVEY_MEDIA_TYPES = new Set(['application/json', 'text/csv']);

/** Surveys this module produced from a request body; only these reach a handler unchecked. */
const validatedSurveys = new WeakSet<Survey>();

function validated(input: unknown): Survey {
  const result = validateSurvey(input);
  if (result.survey === null) throw problemsError('invalid_survey', result.problems);
  validatedSurveys.add(result.survey);
  return result.survey;
}

/** The survey in a JSON body or a pick-table body; throws the coded 400. */
function surveyFromBody(body: unknown, mediaType: string): Survey {
  if (mediaType === 'text/csv') {
    const imported = importPickTable(body as string);
    if (imported.survey === null) throw problemsError('invalid_pick_table', imported.problems);
    return validated(imported.survey);
  }
  return validated(body);
}

/**
 * Fastify validator compiler for a survey body (per media type). An absent or blank body
 * passes through to the handler, which answers `empty_body` (or, for a JSON `null`, the
 * survey problem "body-not-object"); Fastify hands the validator null for both.
 */
export const surveyValidatorCompiler: FastifySchemaCompiler<unknown> = bodyDoorCompiler((body, mediaType) => {
  if (body === null || body === undefined || (typeof body === 'string' && body.trim() === '')) return true;
  try {
    return { value: surveyFromBody(body, mediaType) };
  } catch (error) {
    return { error: error as Error };
  }
});

/** Route options of a route whose body is a survey: the declared body and its validator. */
export function surveyInput(schema: Omit<FastifySchema, 'body'> = {}): { schema: FastifySchema; validatorCompiler: FastifySchemaCompiler<unknown> } {
  return { schema: { ...schema, body: surveyBody }, validatorCompiler: surveyValidatorCompiler };
}

export function surveyFromRequest(request: FastifyRequest): Survey {
  const body: unknown = request.body;
  if (typeof body === 'object' && body !== null && validatedSurveys.has(body as Survey)) return body as Survey;
  const mediaType = mediaTypeOf(request);
  if (mediaType !== '' && !SURVEY_MEDIA_TYPES.has(mediaType)) throw new AppError('unsupported_content_type');
  if (body === undefined || body === null || (typeof body === 'string' && body.trim() === '')) {
    // A JSON body "null" is a present but wrong body; an absent one is an empty request.
    if (body === null && mediaType === 'application/json') return validated(body);
    throw new AppError('empty_body');
  }
  return surveyFromBody(body, mediaType);
}
