/**
 * Property: the survey validator takes any JSON value (random documents, and real-shaped
 * lines with one field replaced by anything) and returns either the survey or a list of
 * problems, each with a JSON-pointer path into the document, a code and a sentence
 * (api-v1.md's error body); it never throws. A valid real-shaped line passes unchanged.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { validateSurvey } from '../../engine/survey/validate.js';
import { LONG_RUN, runs, surveyArb } from './line-arbitraries.js';

function expectWellFormed(checked: ReturnType<typeof validateSurvey>): void {
  if (checked.survey !== null) return;
  expect(checked.problems.length).toBeGreaterThan(0);
  for (const p of checked.problems) {
    expect(p.path === '' || p.path.startsWith('/')).toBe(true);
    expect(p.code).toMatch(/^[a-z0-9-]+$/);
    expect(typeof p.message).toBe('string');
    expect(p.message.length).toBeGreaterThan(5);
  }
}

/** A real-shaped line with one value somewhere replaced by anything JSON can hold. */
const brokenLine = fc
  .tuple(surveyArb, fc.jsonValue(), fc.nat(), fc.constantFrom('geophone', 'shot', 'time', 'top', 'options', 'delete'))
  .map(([survey, value, n, where]) => {
    const doc = JSON.parse(JSON.stringify(survey)) as Record<string, unknown> & { geophones: unknown[]; shots: { times: unknown[] }[] };
    if (where === 'geophone') doc.geophones[n % doc.geophones.length] = value;
    else if (where === 'shot') doc.shots[n % doc.shots.length] = value as never;
    else if (where === 'time') {
      const shot = doc.shots[n % doc.shots.length];
      shot.times[n % shot.times.length] = value;
    } else if (where === 'top') doc[['name', 'date', 'geophones', 'shots'][n % 4]] = value;
    else if (where === 'options') doc.options = value;
    else delete doc[['geophones', 'shots', 'name'][n % 3]];
    return doc;
  });

describe('survey validator (property)', () => {
  it('never throws on any JSON value, and names problems with a path, a code and a sentence', () => {
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 4 }), (doc) => expectWellFormed(validateSurvey(doc))),
      runs(500, 20_000),
    );
  });

  it('never throws on a real-shaped line with one value replaced by anything', () => {
    fc.assert(
      fc.property(brokenLine, (doc) => expectWellFormed(validateSurvey(doc))),
      runs(300, 15_000),
    );
  });

  it('passes a valid real-shaped line through with its geophones and picks unchanged', () => {
    let valid = 0;
    fc.assert(
      fc.property(surveyArb, (survey) => {
        const checked = validateSurvey(survey);
        expectWellFormed(checked);
        if (checked.survey === null) return;
        valid++;
        expect(checked.survey.geophones.map((g) => g.x)).toEqual(survey.geophones.map((g) => g.x));
        expect(checked.survey.shots.map((s) => s.times)).toEqual(survey.shots.map((s) => s.times));
      }),
      runs(200, 5_000),
    );
    expect(valid).toBeGreaterThan(0);
    if (LONG_RUN) console.log(`validator property: ${valid} valid generated lines`);
  });
});
