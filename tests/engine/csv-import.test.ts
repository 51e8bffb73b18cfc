import { describe, expect, it } from 'vitest';
import { importPickTable, surveyToPickTable, MAX_PICK_TABLE_BYTES, MAX_PICK_TABLE_ROWS } from '../../engine/survey/csv-import.js';
import { SURVEY_LIMITS, type Survey } from '../../engine/survey/survey.js';
import type { Problem } from '../../engine/survey/problem.js';
import { demoLine, flatLine } from '../../engine/samples/demo-lines.js';

const HEADER = 'shot_id,shot_x_m,shot_elevation_m,geophone_x_m,geophone_elevation_m,time_ms';

// Invented test data: three geophones at 2 m, one shot off each end.
const GOOD_ROWS = [
  'W-end,-1,10,0,10,1.6',
  'W-end,-1,10,2,10.1,4.8',
  'W-end,-1,10,4,10.2,7.9',
  'E-end,5,10.2,0,10,8.1',
  'E-end,5,10.2,2,10.1,4.9',
  'E-end,5,10.2,4,10.2,1.6',
];

function table(rows: string[], header = HEADER, eol = '\n'): string {
  return [header, ...rows].join(eol) + eol;
}

const GOOD_SURVEY: Survey = {
  geophones: [
    { x: 0, elevation: 10 },
    { x: 2, elevation: 10.1 },
    { x: 4, elevation: 10.2 },
  ],
  shots: [
    { id: 'W-end', x: -1, elevation: 10, times: [1.6, 4.8, 7.9] },
    { id: 'E-end', x: 5, elevation: 10.2, times: [8.1, 4.9, 1.6] },
  ],
};

function expectProblem(csv: string, code: string, path: string): Problem {
  const result = importPickTable(csv);
  expect(result.survey).toBeNull();
  const found = result.problems.find((p) => p.code === code && p.path === path);
  expect(found, `expected ${code} at ${path}, got ${JSON.stringify(result.problems)}`).toBeDefined();
  return found!;
}

describe('importPickTable reads the layout', () => {
  it('converts a plain table to the survey', () => {
    const result = importPickTable(table(GOOD_ROWS));
    expect(result.problems).toEqual([]);
    expect(result.survey).toEqual(GOOD_SURVEY);
  });

  it('reads name and date comments and ignores other comment lines', () => {
    const csv = '# name: Line 3, "north" terrace\n# crew B, wet ground\n#date:  2 May  \n\n' + table(GOOD_ROWS);
    const result = importPickTable(csv);
    expect(result.problems).toEqual([]);
    expect(result.survey!.name).toBe('Line 3, "north" terrace');
    expect(result.survey!.date).toBe('2 May');
  });

  it('accepts a BOM, CRLF line ends, any column order and case, and padded header names', () => {
    const header = ' TIME_MS , Geophone_X_m,shot_id,shot_x_m,geophone_elevation_m,Shot_Elevation_M';
    const rows = GOOD_ROWS.map((r) => {
      const [id, sx, se, gx, ge, t] = r.split(',');
      return [t, gx, id, sx, ge, se].join(',');
    });
    const result = importPickTable('\uFEFF' + table(rows, header, '\r\n'));
    expect(result.problems).toEqual([]);
    expect(result.survey).toEqual(GOOD_SURVEY);
  });

  it('accepts RFC 4180 quoting with "" escapes, commas and line breaks inside quotes', () => {
    const rows = GOOD_ROWS.map((r) => r.replace('W-end', '"W-end, ""A"" side\nnorth"').replace(',4.8', ',"4.8"'));
    const result = importPickTable(table(rows));
    expect(result.problems).toEqual([]);
    expect(result.survey!.shots[0].id).toBe('W-end, "A" side\nnorth');
    expect(result.survey!.shots[0].times[1]).toBe(4.8);
  });

  it('reads a blank time as no pick and blank elevations as absent', () => {
    const rows = GOOD_ROWS.map((r) => r.split(',')).map(([id, sx, , gx, , t]) => [id, sx, '', gx, '', t].join(','));
    rows[1] = 'W-end,-1,,2,,';
    const result = importPickTable(table(rows));
    expect(result.problems).toEqual([]);
    expect(result.survey!.shots[0].times).toEqual([1.6, null, 7.9]);
    expect(result.survey!.geophones).toEqual([{ x: 0 }, { x: 2 }, { x: 4 }]);
    expect('elevation' in result.survey!.shots[0]).toBe(false);
  });

  it('sorts geophones by x, keeps shots in order of first appearance, and fills missing rows with null', () => {
    const rows = ['E-end,5,10.2,4,10.2,1.6', 'W-end,-1,10,2,10.1,4.8', 'E-end,5,10.2,0,10,8.1', 'W-end,-1,10,0,10,1.6', 'E-end,5,10.2,2,10.1,4.9'];
    const result = importPickTable(table(rows));
    expect(result.problems).toEqual([]);
    expect(result.survey!.geophones.map((g) => g.x)).toEqual([0, 2, 4]);
    expect(result.survey!.shots.map((s) => s.id)).toEqual(['E-end', 'W-end']);
    expect(result.survey!.shots[1].times).toEqual([1.6, 4.8, null]);
  });

  it('takes an elevation given on a later row when earlier rows leave it blank', () => {
    const rows = [...GOOD_ROWS];
    rows[0] = 'W-end,-1,,0,,1.6';
    const result = importPickTable(table(rows));
    expect(result.problems).toEqual([]);
    expect(result.survey).toEqual(GOOD_SURVEY);
  });
});

describe('importPickTable round trip with surveyToPickTable', () => {
  it.each([
    ['the demo line', demoLine()],
    ['the flat line', flatLine()],
    ['the small test line', GOOD_SURVEY],
  ])('survey → CSV → survey is unchanged for %s', (_label, survey) => {
    const result = importPickTable(surveyToPickTable(survey));
    expect(result.problems).toEqual([]);
    expect(result.survey).toEqual(survey);
  });

  it('survives awkward shot names, no elevations, a dead geophone and a multi-line name', () => {
    const survey: Survey = {
      name: 'Line 7\nsecond try',
      geophones: [{ x: 0 }, { x: 1.25 }, { x: 2.5 }, { x: 3.75 }],
      shots: [
        { id: '# first, "west"', x: -0.5, times: [0.9, 2.6, 4.4, null] },
        { id: ' east ', x: 4.25, times: [5.9, 4.2, 2.4, null] },
      ],
    };
    const result = importPickTable(surveyToPickTable(survey));
    expect(result.problems).toEqual([]);
    expect(result.survey).toEqual({ ...survey, name: 'Line 7 second try' });
  });

  it('writes the header and one row per shot and geophone', () => {
    const lines = surveyToPickTable(GOOD_SURVEY).trimEnd().split('\n');
    expect(lines[0]).toBe(HEADER);
    expect(lines).toHaveLength(1 + 2 * 3);
    expect(lines[6]).toBe('E-end,5,10.2,4,10.2,1.6');
  });
});

describe('importPickTable rejects bad tables with line and column', () => {
  it('not-a-number names line, column and value', () => {
    const rows = [...GOOD_ROWS];
    rows[3] = 'E-end,5,10.2,0,10,abc';
    const p = expectProblem('# name: x\n' + table(rows), 'not-a-number', '/csv/line/6/time_ms');
    expect(p.message).toBe("line 6, column 6 (time_ms): 'abc' is not a number.");
  });
  it.each(['1,5', '12ms', '0x10', 'NaN', 'Infinity', '1e999'])('not-a-number for %s', (value) => {
    const rows = [...GOOD_ROWS];
    rows[2] = `W-end,-1,10,4,10.2,"${value}"`;
    expectProblem(table(rows), 'not-a-number', '/csv/line/4/time_ms');
  });
  it('missing-value for an empty shot_id, shot_x_m or geophone_x_m', () => {
    const rows = [...GOOD_ROWS];
    rows[0] = ',-1,10,0,10,1.6';
    rows[1] = 'W-end,,10,2,10.1,4.8';
    rows[2] = 'W-end,-1,10,,10.2,7.9';
    expectProblem(table(rows), 'missing-value', '/csv/line/2/shot_id');
    expectProblem(table(rows), 'missing-value', '/csv/line/3/shot_x_m');
    expectProblem(table(rows), 'missing-value', '/csv/line/4/geophone_x_m');
  });
  it('field-count', () => {
    const rows = [...GOOD_ROWS];
    rows[4] = 'E-end,5,10.2,2,4.9';
    const p = expectProblem(table(rows), 'field-count', '/csv/line/6');
    expect(p.message).toContain('5 fields');
  });
  it('geophone-elevation-mismatch names both lines', () => {
    const rows = [...GOOD_ROWS];
    rows[4] = 'E-end,5,10.2,2,10.4,4.9';
    const p = expectProblem(table(rows), 'geophone-elevation-mismatch', '/csv/line/6/geophone_elevation_m');
    expect(p.message).toContain('line 6');
    expect(p.message).toContain('line 3');
    expect(p.message).toContain('10.4 m');
    expect(p.message).toContain('10.1 m');
  });
  it('tolerates elevations that differ by under 1 mm', () => {
    const rows = [...GOOD_ROWS];
    rows[4] = 'E-end,5,10.2,2,10.1005,4.9';
    expect(importPickTable(table(rows)).problems).toEqual([]);
  });
  it('shot-x-mismatch names both lines', () => {
    const rows = [...GOOD_ROWS];
    rows[2] = 'W-end,-1.5,10,4,10.2,7.9';
    const p = expectProblem(table(rows), 'shot-x-mismatch', '/csv/line/4/shot_x_m');
    expect(p.message).toContain('line 2');
    expect(p.message).toContain('x = -1.5 m');
  });
  it('shot-elevation-mismatch names both lines', () => {
    const rows = [...GOOD_ROWS];
    rows[5] = 'E-end,5,11,4,10.2,1.6';
    const p = expectProblem(table(rows), 'shot-elevation-mismatch', '/csv/line/7/shot_elevation_m');
    expect(p.message).toContain('line 5');
  });
  it('duplicate-pick names both lines', () => {
    const rows = [...GOOD_ROWS, 'W-end,-1,10,2,10.1,4.9'];
    const p = expectProblem(table(rows), 'duplicate-pick', '/csv/line/8/geophone_x_m');
    expect(p.message).toContain('line 3');
    expect(p.message).toContain('"W-end"');
  });
  it('unknown-column', () => {
    const p = expectProblem(table(GOOD_ROWS, HEADER.replace('time_ms', 'time')), 'unknown-column', '/csv/line/1');
    expect(p.message).toContain("'time'");
  });
  it('missing-column', () => {
    const header = HEADER.replace(',geophone_elevation_m', '');
    expectProblem(table(GOOD_ROWS.map((r) => r.split(',').filter((_, i) => i !== 4).join(',')), header), 'missing-column', '/csv/line/1/geophone_elevation_m');
  });
  it('duplicate-column', () => {
    expectProblem(table([], `${HEADER},Time_ms`), 'duplicate-column', '/csv/line/1/time_ms');
  });
  it('missing-header for an empty table or comments only', () => {
    expectProblem('', 'missing-header', '/csv');
    expectProblem('# name: nothing yet\n\n', 'missing-header', '/csv');
  });
  it('no-rows for a header alone', () => {
    expectProblem(table([]), 'no-rows', '/csv');
  });
  it('unterminated-quote names the line where the quote opens', () => {
    const rows = [...GOOD_ROWS];
    rows[2] = '"W-end,-1,10,4,10.2,7.9';
    expectProblem(table(rows), 'unterminated-quote', '/csv/line/4');
  });
  it('text-after-quote', () => {
    const rows = [...GOOD_ROWS];
    rows[1] = '"W-end"x,-1,10,2,10.1,4.8';
    expectProblem(table(rows), 'text-after-quote', '/csv/line/3');
  });
  it('stray-quote', () => {
    const rows = [...GOOD_ROWS];
    rows[1] = 'W"end,-1,10,2,10.1,4.8';
    expectProblem(table(rows), 'stray-quote', '/csv/line/3');
  });
  it('csv-not-text', () => {
    expectProblem(42 as unknown as string, 'csv-not-text', '/csv');
  });
  it('csv-too-large for text over 5 MB', () => {
    const big = table(GOOD_ROWS) + '#'.repeat(MAX_PICK_TABLE_BYTES);
    const p = expectProblem(big, 'csv-too-large', '/csv');
    expect(p.message).toContain('5 MB');
  });
  it('csv-too-large counts UTF-8 bytes, not characters', () => {
    // 2 million three-byte characters: under 5 MiB of characters, over 5 MiB of bytes.
    const big = '# ' + '\u20ac'.repeat(2_000_000) + '\n' + table(GOOD_ROWS);
    expect(big.length).toBeLessThan(MAX_PICK_TABLE_BYTES);
    expectProblem(big, 'csv-too-large', '/csv');
  });
  it('too-many-rows past the row limit', () => {
    const rows = new Array(MAX_PICK_TABLE_ROWS + 1).fill('W-end,-1,,0,,1.6');
    const p = expectProblem(table(rows), 'too-many-rows', '/csv');
    expect(p.message).toContain(String(MAX_PICK_TABLE_ROWS));
  });
  it('too-many-geophones', () => {
    const rows = Array.from({ length: SURVEY_LIMITS.maxGeophones + 1 }, (_, i) => `W-end,-1,,${i},,`);
    expectProblem(table(rows), 'too-many-geophones', `/csv/line/${SURVEY_LIMITS.maxGeophones + 2}/geophone_x_m`);
  });
  it('too-many-shots', () => {
    const rows = Array.from({ length: SURVEY_LIMITS.maxShots + 1 }, (_, i) => `S${i},-1,,0,,`);
    expectProblem(table(rows), 'too-many-shots', `/csv/line/${SURVEY_LIMITS.maxShots + 2}/shot_id`);
  });
  it('reports several row problems at once', () => {
    const rows = [...GOOD_ROWS];
    rows[0] = 'W-end,-1,10,0,10,one';
    rows[5] = 'E-end,5,10.2,4,10.2,1..6';
    const codes = importPickTable(table(rows)).problems.map((p) => p.path);
    expect(codes).toEqual(['/csv/line/2/time_ms', '/csv/line/7/time_ms']);
  });
});

describe('importPickTable places survey problems on the line and column they came from', () => {
  // The header is line 1, so GOOD_ROWS[k] is on line k + 2 (columns in HEADER order).
  it('a negative time: the line of that pick, column 6 (time_ms), never a JSON pointer', () => {
    const rows = [...GOOD_ROWS];
    rows[1] = 'W-end,-1,10,2,10.1,-4.8';
    const p = expectProblem(table(rows), 'negative-time', '/csv/line/3/time_ms');
    expect(p.line).toBe(3);
    expect(p.column).toBe(6);
    expect(p.message.startsWith('line 3, column 6 (time_ms): ')).toBe(true);
    expect(p.message).not.toMatch(/\/shots\//);
  });
  it('in the file\'s own column order', () => {
    const header = 'time_ms,shot_id,shot_x_m,shot_elevation_m,geophone_x_m,geophone_elevation_m';
    const rows = GOOD_ROWS.map((r) => {
      const f = r.split(',');
      return [f[5], ...f.slice(0, 5)].join(',');
    });
    rows[4] = '-4.9,E-end,5,10.2,2,10.1';
    const p = expectProblem(table(rows, header), 'negative-time', '/csv/line/6/time_ms');
    expect(p.column).toBe(1);
  });
  it('a shot whose times are all blank: its first row', () => {
    const rows = [...GOOD_ROWS, 'mid,2.5,,0,,', 'mid,2.5,,2,,'];
    const p = expectProblem(table(rows), 'shot-without-picks', '/csv/line/8/time_ms');
    expect(p.message).toContain('line 8, column 6 (time_ms)');
  });
  it('a too-long name: the # name line', () => {
    const p = expectProblem(`# name: ${'N'.repeat(400)}\n${table(GOOD_ROWS)}`, 'name-too-long', '/csv/line/1');
    expect(p.message.startsWith('line 1 (# name:): ')).toBe(true);
  });
  it('a one-geophone table: the whole table', () => {
    expectProblem(table(['W-end,-1,,0,,1.6', 'E-end,1,,0,,1.6']), 'too-few-geophones', '/csv');
  });
});
