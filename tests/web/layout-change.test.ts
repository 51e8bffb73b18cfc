// The question the page asks before storing another geophone layout as a revision shows the
// service's own words for the change (server/revision-layout.ts, layoutChange().description):
// one text from one place, so the page never says something other than the 409 it got.
// The confirmation it sends afterwards is the one api-v1.md lets the service name.
import { describe, expect, it } from 'vitest';
import { failureFromBody, LAYOUT_CHANGE_CONFIRMATION, LAYOUT_CHANGED_STATUS, revisionsPath } from '../../web/api.js';
import { AppError } from '../../server/errors.js';
import { LAYOUT_CHANGE_CONFIRM, LAYOUT_CHANGE_PARAMETER, layoutChange, layoutChangeMessage } from '../../server/revision-layout.js';

const spread = (count: number, spacingM: number) => Array.from({ length: count }, (_, i) => ({ x: i * spacingM }));

/** The 409 body exactly as the service writes it for this change (errors.ts, AppError.toBody). */
function conflictBody(stored: { x: number }[], sent: { x: number }[]) {
  const change = layoutChange({ revision: 1, name: 'Demo A', geophones: stored }, sent)!;
  return { change, body: JSON.parse(JSON.stringify(new AppError('layout_changed', { message: layoutChangeMessage(change), path: '/geophones', layoutChange: change }).toBody())) };
}

describe('what the page reads from a 409 layout_changed', () => {
  it('is the service\'s description of the change, word for word', () => {
    const { change, body } = conflictBody(spread(24, 3), spread(24, 2));
    const failure = failureFromBody(LAYOUT_CHANGED_STATUS, body);
    expect(failure.code).toBe('layout_changed');
    expect(failure.layoutChange).toBe(change.description);
    expect(failure.layoutChange).toContain('every 2 m');
    // The service's message starts with the same sentence; the page shows only the sentence,
    // not the instructions for scripts (POST …, ?layoutChange=confirm).
    expect(failure.message.startsWith(change.description)).toBe(true);
    expect(failure.layoutChange).not.toContain('POST');
  });

  it('is absent for other failures, so the page falls back to the message', () => {
    expect(failureFromBody(400, { error: { code: 'invalid_survey', message: 'Bad.', path: '' } }).layoutChange).toBeUndefined();
    expect(failureFromBody(409, { error: { code: 'layout_changed', message: 'Another layout.', path: '/geophones' } }).layoutChange).toBeUndefined();
  });
});

describe('the confirmation sent to the service', () => {
  it('is added to the revisions path only when the user agreed, and is the service\'s own parameter', () => {
    expect(revisionsPath('A b')).toBe('api/v1/surveys/A%20b/revisions');
    expect(revisionsPath('A b', true)).toBe(`api/v1/surveys/A%20b/revisions?${LAYOUT_CHANGE_CONFIRMATION}`);
    expect(LAYOUT_CHANGE_CONFIRMATION).toBe(`${LAYOUT_CHANGE_PARAMETER}=${LAYOUT_CHANGE_CONFIRM}`);
    // api-v1.md: a revision with another geophone layout is refused with 409.
    expect(LAYOUT_CHANGED_STATUS).toBe(409);
  });
});
