import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { Type, type Static, type TSchema } from '@sinclair/typebox';
import { Value } from '@sinclair/typebox/value';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import { SurveySchema } from '../../engine/schemas/survey.js';
import type { Assert, Same } from '../../engine/schemas/same-type.js';
import { NUMERIC_OPTIONS, KNOWN_METHODS } from '../../engine/survey/options.js';
import { SURVEY_LIMITS } from '../../engine/survey/survey.js';
import { interpret } from '../../engine/pipeline/interpret.js';

const goldenDir = fileURLToPath(new URL('../golden/lines/', import.meta.url));
const goldenFiles = readdirSync(goldenDir).filter((f) => f.endsWith('.json')).sort();
const sampleDir = fileURLToPath(new URL('../../samples/', import.meta.url));

function firstErrors(schema: TSchema, value: unknown): string[] {
  return [...Value.Errors(schema, value)].slice(0, 5).map((e) => `${e.path}: ${e.message}`);
}

/** JSON pointers of every object node of a schema that does not forbid unknown properties. */
function openObjects(schema: unknown, path = ''): string[] {
  if (schema === null || typeof schema !== 'object') return [];
  const node = schema as Record<string, unknown>;
  const here = node.type === 'object' && node.additionalProperties !== false ? [path || '/'] : [];
  return [...here, ...Object.entries(node).flatMap(([k, v]) => (typeof v === 'object' ? openObjects(v, `${path}/${k}`) : []))];
}

describe('the interpretation schema', () => {
  it('is closed at every level: an undeclared field is refused anywhere', () => {
    expect(openObjects(InterpretationSchema)).toEqual([]);
  });

  for (const file of goldenFiles) {
    it(`accepts the golden interpretation ${file.replace(/\.json$/, '')}`, () => {
      const golden = JSON.parse(readFileSync(goldenDir + file, 'utf8')) as { interpretation: unknown };
      expect(firstErrors(InterpretationSchema, golden.interpretation)).toEqual([]);
    });
  }

  it('accepts an interpretation made without the residual check', () => {
    const golden = JSON.parse(readFileSync(goldenDir + goldenFiles[0], 'utf8')) as { survey: import('../../engine/index.js').Survey };
    const plain = JSON.parse(JSON.stringify(interpret({ ...golden.survey, options: { ...golden.survey.options, residuals: false } })));
    expect(plain.qc.residuals).toBeUndefined();
    expect(firstErrors(InterpretationSchema, plain)).toEqual([]);
  });

  it('refuses a field that is not declared, at depth', () => {
    const golden = JSON.parse(readFileSync(goldenDir + goldenFiles[0], 'utf8')) as { interpretation: Record<string, any> };
    const changed = structuredClone(golden.interpretation);
    changed.stations[0].futureField = 1;
    expect(firstErrors(InterpretationSchema, changed)[0]).toMatch(/^\/stations\/0\/futureField/);
  });
});

describe('the survey schema', () => {
  it('accepts every sample line', () => {
    for (const file of readdirSync(sampleDir).filter((f) => f.endsWith('.json'))) {
      expect(firstErrors(SurveySchema, JSON.parse(readFileSync(sampleDir + file, 'utf8'))), file).toEqual([]);
    }
  });

  it('reads its limits and method names from the options record and SURVEY_LIMITS', () => {
    const options = SurveySchema.properties.options;
    expect(options.properties.pickUncertaintyMs.maximum).toBe(NUMERIC_OPTIONS.pickUncertaintyMs.maximum);
    expect(options.properties.pickUncertaintyMs.exclusiveMinimum).toBe(NUMERIC_OPTIONS.pickUncertaintyMs.exclusiveMinimum);
    expect(options.properties.reciprocalToleranceMs.maximum).toBe(NUMERIC_OPTIONS.reciprocalToleranceMs.maximum);
    expect(options.properties.reciprocalToleranceMs.description).toContain(`Default ${NUMERIC_OPTIONS.reciprocalToleranceMs.default}.`);
    expect(options.properties.method.anyOf.map((s: { const: string }) => s.const)).toEqual([...KNOWN_METHODS]);
    expect(SurveySchema.properties.geophones.maxItems).toBe(SURVEY_LIMITS.maxGeophones);
    expect(SurveySchema.properties.shots.maxItems).toBe(SURVEY_LIMITS.maxShots);
  });
});

describe('Same, the compile-time check between a schema and a type', () => {
  it('tells apart a type with one more optional field, a nullable field and a tuple', () => {
    const point = Type.Object({ x: Type.Number(), pair: Type.Tuple([Type.String(), Type.String()]) });
    type Point = Static<typeof point>;
    const ok: Assert<Same<Point, { x: number; pair: [string, string] }>> = true;
    // @ts-expect-error an optional field on one side only is drift
    const extra: Assert<Same<Point, { x: number; pair: [string, string]; y?: number }>> = true;
    // @ts-expect-error null is not a number
    const nullable: Assert<Same<Point, { x: number | null; pair: [string, string] }>> = true;
    // @ts-expect-error a list is not a pair
    const list: Assert<Same<Point, { x: number; pair: string[] }>> = true;
    expect([ok, extra, nullable, list]).toEqual([true, true, true, true]);
  });
});
