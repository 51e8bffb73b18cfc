// The station table's CSV form: units in the header, one row per geophone, empty cells
// for nulls, RFC 4180 quoting, and no spreadsheet formulas smuggled in through text.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { csvCell, downloadName, stationsCsv } from '../../server/stations-csv.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import type { Interpretation, Station } from '../../engine/output/interpretation.js';
import { DISPLAY_PRECISION } from '../../engine/output/display-precision.js';

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
    // Each cell within half the shown step of the interpretation's value: 0.1 m, 0.1 ms, 10 m/s.
    const halfStep = (decimals: number) => 0.5 * 10 ** -decimals + 1e-9;
    const fields: [string, keyof Station, number][] = [
      ['x_m', 'x', halfStep(DISPLAY_PRECISION.metreDecimals)],
      ['elevation_m', 'elevation', halfStep(DISPLAY_PRECISION.metreDecimals)],
      ['delay_time_ms', 'delayTime', halfStep(DISPLAY_PRECISION.millisecondDecimals)],
      ['depth_m', 'depth', halfStep(DISPLAY_PRECISION.metreDecimals)],
      ['refractor_elevation_m', 'refractorElevation', halfStep(DISPLAY_PRECISION.metreDecimals)],
      ['v1_m_per_s', 'v1', DISPLAY_PRECISION.velocityStepMPerS / 2],
      ['refractor_velocity_m_per_s', 'refractorVelocity', DISPLAY_PRECISION.velocityStepMPerS / 2],
    ];
    interpretation.stations.forEach((station, i) => {
      for (const [column, key, tolerance] of fields) {
        const cell = rows[i + 1][header.indexOf(column)];
        const value = station[key] as number | null;
        if (value === null) expect(cell).toBe('');
        else expect(Math.abs(Number(cell) - value), `${column} of station ${i}`).toBeLessThanOrEqual(tolerance);
      }
      for (const column of ['v1_m_per_s', 'refractor_velocity_m_per_s']) {
        const cell = rows[i + 1][header.indexOf(column)];
        if (cell !== '') expect(Number(cell) % DISPLAY_PRECISION.velocityStepMPerS, column).toBe(0);
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
    // The shown precision (0.1 ms, 0.1 m, 10 m/s), as on the page, the share page and the drawings.
    expect(second.delay_time_ms).toBe('4.1');
    expect(second.depth_to_refractor_2_m).toBe('9.1');
    expect(second.x_m).toBe('2.5');
    expect(second.refractor_velocity_m_per_s).toBe('2400');
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

  // OWASP, "CSV Injection": a cell beginning with =, +, -, @, tab (0x09) or carriage return
  // (0x0D) is read as a formula by spreadsheets; prefix it with a single quote.
  it('prefixes every formula lead character of text with a single quote (OWASP CSV injection)', () => {
    for (const lead of ['=', '+', '-', '@', '\t', '\r']) {
      const text = `${lead}1+1`;
      const cell = csvCell(text);
      const unquoted = cell.startsWith('"') ? cell.slice(1, -1).replace(/""/g, '"') : cell;
      expect(unquoted, JSON.stringify(text)).toBe(`'${text}`);
    }
    // Text that only looks like a negative number is text: neutralised too.
    expect(csvCell('-1.5')).toBe("'-1.5");
    // Ordinary text is left alone.
    expect(csvCell('Line 3')).toBe('Line 3');
  });

  it('neutralises text columns of a whole table but keeps negative numbers as numbers', () => {
    const { survey } = validateSurvey(JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')));
    const interpretation = interpret(survey!);
    // A station below the datum (negative elevation and refractor elevation), and a text field
    // a later engine might add (a shot id, a note) starting with each lead character.
    const leads = ['=cmd|/C calc!A0', '+SUM(1)', '-2+3', '@A1', '\tTAB', '\rCR'];
    const stations = interpretation.stations.map((station, i) => ({
      ...station,
      elevation: -1.5 - i,
      note: leads[i % leads.length],
    })) as unknown as Station[];
    const csv = stationsCsv({ ...interpretation, stations });
    const lines = csv.slice(0, -2).split('\r\n');
    const header = lines[0].split(',');
    const noteAt = header.indexOf('note');
    const elevationAt = header.indexOf('elevation_m');
    expect(noteAt).toBeGreaterThan(0);
    // Row by row; a quoted cell may hold a CR, so rows are read by splitting on CRLF only.
    lines.slice(1).forEach((line, i) => {
      const cells = line.split(',');
      expect(Number(cells[elevationAt]), `row ${i}`).toBe(-1.5 - i);
      const note = cells[noteAt].replace(/^"|"$/g, '');
      expect(note.startsWith("'"), `row ${i}: ${JSON.stringify(note)}`).toBe(true);
      expect(note.slice(1)).toBe(leads[i % leads.length]);
    });
  });
});

describe('downloadName', () => {
  it('keeps only characters safe in a Content-Disposition header', () => {
    expect(downloadName('Line 3, "pump" terrace', 'stations.csv')).toBe('Line-3-pump-terrace-stations.csv');
    expect(downloadName('<>', 'stations.csv')).toBe('line-stations.csv');
  });
});
