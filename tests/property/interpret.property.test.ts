/**
 * Property: interpret on any valid survey shaped like a real line (line-arbitraries.ts)
 * returns an interpretation (one station per geophone, every number finite, every warning
 * coded), never an escaping exception or a non-finite number (api-v1.md: bad input is a
 * clear 400, never a 500). Lines the validator refuses must come with problems instead.
 * Short run here; `npm run test:properties-long` runs the long one (README figures).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { validateSurvey } from '../../engine/survey/validate.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { firstNonFinite, LONG_RUN, runs, surveyArb } from './line-arbitraries.js';

describe('interpret on generated lines (property)', () => {
  it(
    'gives a finite interpretation of every valid line, or the validator names the problems',
    () => {
      let interpreted = 0;
      let refused = 0;
      fc.assert(
        fc.property(surveyArb, (survey) => {
          const checked = validateSurvey(survey);
          if (checked.survey === null) {
            refused++;
            expect(checked.problems.length).toBeGreaterThan(0);
            for (const p of checked.problems) expect(typeof p.code === 'string' && p.code.length > 0).toBe(true);
            return;
          }
          const result = interpret(checked.survey);
          interpreted++;
          expect(result.stations).toHaveLength(checked.survey.geophones.length);
          expect(result.shots).toHaveLength(checked.survey.shots.length);
          expect(firstNonFinite(result)).toBeNull();
          for (const w of result.qc.warnings) expect(w.code).toMatch(/^[a-z0-9-]+$/);
        }),
        runs(Number(process.env.PROPERTY_RUNS) || 60, 10_000),
      );
      // The generator must mostly make lines the engine takes, or the property proves little.
      expect(interpreted).toBeGreaterThan(refused);
      if (LONG_RUN) console.log(`interpret property: ${interpreted} interpreted, ${refused} refused by the validator`);
    },
    LONG_RUN ? 6 * 3_600_000 : 240_000,
  );
});
