/** Finding a stored survey and one of its revisions, or throwing the coded 404. */
import { AppError } from './errors.js';
import { SURVEY_ID_PATTERN, SHARE_TOKEN_PATTERN, type StoredRevision, type SurveyStore, type SurveySummary } from './store.js';

export function requireSurvey(store: SurveyStore, id: string): SurveySummary {
  const summary = SURVEY_ID_PATTERN.test(id) ? store.getSummary(id) : null;
  if (summary === null) throw new AppError('survey_not_found', { message: `No stored survey has the id "${id}".` });
  return summary;
}

export function requireRevision(store: SurveyStore, id: string, revision?: number): { summary: SurveySummary; stored: StoredRevision } {
  const summary = requireSurvey(store, id);
  const stored = store.getRevision(id, revision);
  if (stored === null) {
    throw new AppError('revision_not_found', {
      message: `Survey "${id}" has revisions 1 to ${summary.latestRevision}; there is no revision ${revision}.`,
      path: '/revision',
    });
  }
  return { summary, stored };
}

/** The latest revision behind a live share token; revoked or unknown tokens are 404. */
export function requireShared(store: SurveyStore, token: string): { summary: SurveySummary; stored: StoredRevision } {
  const id = SHARE_TOKEN_PATTERN.test(token) ? store.surveyIdForToken(token) : null;
  if (id === null) throw new AppError('share_not_found');
  return requireRevision(store, id);
}

export function shareUrlFor(token: string | null): string | null {
  return token === null ? null : `/share/${token}`;
}
