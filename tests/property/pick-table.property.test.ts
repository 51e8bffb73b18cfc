/**
 * Property: the pick-table reader (engine/survey/csv-import.ts) gives the same survey back
 * from the table the exporter writes of any valid real-shaped line, and gives a survey or
 * coded problems with line numbers for any damage to a table (rows cut, cells replaced,
 * bytes inserted, random text); it never throws.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { importPickTable, surveyToPickTable } from '../../engine/survey/csv-import.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import { runs, surveyArb } from './line-arbitraries.js';

function expectWellFormed(result: ReturnType<typeof importPickTable>): void {
  if (result.survey !== null) return;
  expect(result.problems.length).toBeGreaterThan(0);
  for (const p of result.problems) {
    expect(p.code).toMatch(/^[a-z0-9-]+$/);
    expect(p.path === '' || p.path.startsWith('/')).toBe(true);
    if (p.line !== undefined) expect(p.line).toBeGreaterThanOrEqual(1);
  }
}

const cell = fc.oneof(fc.constantFrom('', ' ', '-', 'NaN', '1e309', '0x10', '12,5', '"', '""', '=1+1', '1e-400', '٣'), fc.string({ maxLength: 8 }));

const damage = fc.oneof(
  fc.record({ kind: fc.constant('drop-row' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('cell' as const), at: fc.nat(), column: fc.nat(5), text: cell }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.string({ maxLength: 20 }) }),
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
);
type Damage = typeof damage extends fc.Arbitrary<infer D> ? D : never;

function damaged(table: string, d: Damage): string {
  const rows = table.split('\n');
  if (d.kind === 'truncate') return table.slice(0, d.at % (table.length + 1));
  if (d.kind === 'insert') {
    const at = d.at % (table.length + 1);
    return table.slice(0, at) + d.text + table.slice(at);
  }
  const r = d.at % rows.length;
  if (d.kind === 'drop-row') rows.splice(r, 1);
  else {
    const cells = rows[r].split(',');
    cells[d.column % cells.length] = d.text;
    rows[r] = cells.join(',');
  }
  return rows.join('\n');
}

describe('pick-table reader (property)', () => {
  it('gives the same survey back from the table the exporter writes', () => {
    let checked = 0;
    fc.assert(
      fc.property(surveyArb, (survey) => {
        const valid = validateSurvey(survey).survey;
        if (valid === null) return;
        checked++;
        const back = importPickTable(surveyToPickTable(valid));
        expect(back.problems).toEqual([]);
        expect(back.survey!.geophones.map((g) => g.x)).toEqual(valid.geophones.map((g) => g.x));
        expect(back.survey!.shots.map((s) => [s.id, s.x, s.times])).toEqual(valid.shots.map((s) => [s.id, s.x, s.times]));
      }),
      runs(150, 8_000),
    );
    expect(checked).toBeGreaterThan(0);
  });

  it('gives a survey or coded problems for any damage to a valid table', () => {
    fc.assert(
      fc.property(surveyArb, damage, (survey, d) => {
        const valid = validateSurvey(survey).survey;
        if (valid === null) return;
        expectWellFormed(importPickTable(damaged(surveyToPickTable(valid), d)));
      }),
      runs(300, 12_000),
    );
  });

  it('gives coded problems for random text', () => {
    fc.assert(fc.property(fc.string({ maxLength: 400 }), (text) => expectWellFormed(importPickTable(text))), runs(400, 10_000));
  });
});
