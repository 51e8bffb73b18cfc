// The station table's CSV form: units in the header, one row per geophone, empty cells
// for nulls, RFC 4180 quoting, and no spreadsheet formulas smuggled in through text.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { csvCell, downloadName, stationsCsv } from '../../server/stations-csv.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import type { Interpretation, Station } from '../../engine/output/interpretation.js';

function parseRows(csv: string): string[][] {
  expect(csv.endsWith('\r\n')).toBe(true);
  return csv.slice(0, -2).split('\r\n').map((row) => row.split(','));
}

describe('stationsCsv', () => {
  it('writes one row per station of the demo line, every value matching the interpretation', () => {
    const { survey } = validateSurvey(JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')));
    expect(survey).not.toBeNull();
    const interpretation = interpret(survey!);
    const rows = parseRows(stationsCsv(interpretation));
    const header = rows[0];
    expect(rows).toHaveLength(interpretation.stations.length + 1);
    const fields: [string, keyof Station][] = [
      ['x_m', 'x'],
      ['elevation_m', 'elevation'],
      ['delay_time_ms', 'delayTime'],
      ['depth_m', 'depth'],
      ['refractor_elevation_m', 'refractorElevation'],
      ['v1_m_per_s', 'v1'],
      ['refractor_velocity_m_per_s', 'refractorVelocity'],
    ];
    interpretation.stations.forEach((station, i) => {
      for (const [column, key] of fields) {
        const cell = rows[i + 1][header.indexOf(column)];
        const value = station[key] as number | null;
        if (value === null) expect(cell).toBe('');
        else expect(Number(cell)).toBeCloseTo(value, 3);
      }
      // The first refractor's depth is the depth_m column; the file has no copy of it.
      expect(station.depths[0] ?? null).toBe(station.depth);
    });
    expect(header).not.toContain('depth_to_refractor_1_m');
  });

  it('leaves null cells empty, gives deeper refractors their own columns and keeps fields the engine adds later', () => {
    const stations = [
      { x: 0, elevation: 10, delayTime: null, depth: null, refractorElevation: null, depths: [null, null], v1: 500, refractorVelocity: null, coverage: 'none' },
      { x: 2.5, elevation: 10.25, delayTime: 4.1234, depth: 3.6, refractorElevation: 6.65, depths: [3.6, 9.1], v1: 500, refractorVelocity: 2400, coverage: 'pair', futureScoreRatio: 0.75 },
    ] as unknown as Station[];
    const rows = parseRows(stationsCsv({ stations } as unknown as Interpretation));
    const header = rows[0];
    expect(header).toContain('depth_to_refractor_2_m');
    expect(header).toContain('coverage');
    expect(header[header.length - 1]).toBe('future_score_ratio');
    expect(header).not.toContain('depth_uncertainty_m');
    const first = Object.fromEntries(header.map((h, i) => [h, rows[1][i]]));
    const second = Object.fromEntries(header.map((h, i) => [h, rows[2][i]]));
    expect(first.delay_time_ms).toBe('');
    expect(first.depth_to_refractor_2_m).toBe('');
    expect(first.future_score_ratio).toBe('');
    // The declared decimals of the column (0.01 ms), as on the page and the share page.
    expect(second.delay_time_ms).toBe('4.12');
    expect(second.depth_to_refractor_2_m).toBe('9.10');
    expect(second.x_m).toBe('2.50');
    expect(second.future_score_ratio).toBe('0.75');
  });
});

describe('csvCell', () => {
  it('quotes commas, quotes and line breaks (RFC 4180)', () => {
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('two\nlines')).toBe('"two\nlines"');
  });

  it('defuses text that a spreadsheet would run as a formula, but not negative numbers', () => {
    expect(csvCell('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(csvCell(-3.25)).toBe('-3.25');
    expect(csvCell(Number.NaN)).toBe('');
    expect(csvCell(-0.0001)).toBe('0');
  });
});

describe('downloadName', () => {
  it('keeps only characters safe in a Content-Disposition header', () => {
    expect(downloadName('Line 3, "pump" terrace', 'stations.csv')).toBe('Line-3-pump-terrace-stations.csv');
    expect(downloadName('<>', 'stations.csv')).toBe('line-stations.csv');
  });
});
