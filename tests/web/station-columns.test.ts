// The station columns are declared once (web/station-columns.js); the page's table, the share
// page and stations.csv must show the same columns, in the same order, with the same decimals.
import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  cellData, cellText, columnHeading, DECLARED_STATION_FIELDS, stationColumns, UNIT_DECIMALS,
} from '../../web/station-columns.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { DISPLAY_PRECISION } from '../../engine/output/display-precision.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import type { Interpretation, Station } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { renderSharePage } from '../../server/share-page.js';
import { stationsCsv } from '../../server/stations-csv.js';

let survey: Survey;
let demo: Interpretation;

beforeAll(() => {
  const checked = validateSurvey(JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')));
  survey = checked.survey!;
  demo = interpret(survey);
});

/** A three-refractor pair of stations, the second without the optional fields. */
const THREE_REFRACTORS = [
  { x: 0, elevation: 10, delayTime: 4.1, depth: 3.6, refractorElevation: 6.4, depths: [3.6, 9.25, 20.5], v1: 500, refractorVelocity: 2400, plusTime: 8.2 },
  { x: 2.5, elevation: 10.25, delayTime: null, depth: null, refractorElevation: null, depths: [null, 9.1], v1: 500, refractorVelocity: null },
] as unknown as Station[];

function sharePageTable(interpretation: Interpretation): { head: string[]; rows: string[][] } {
  const html = renderSharePage({
    survey, interpretation, name: 'Check', revision: 1, storedAt: '2024-01-01', sectionSheets: ['<svg></svg>'],
    travelTimesSvg: '<svg></svg>', cautions: [], stationsCsvUrl: 'stations.csv',
  });
  const table = /<table>([\s\S]*?)<\/table>/.exec(html)![1];
  const cells = (row: string, tag: string) => [...row.matchAll(new RegExp(`<${tag}[^>]*>([\\s\\S]*?)</${tag}>`, 'g'))].map((m) => m[1]);
  const [head, body] = [/<thead>([\s\S]*?)<\/thead>/.exec(table)![1], /<tbody>([\s\S]*?)<\/tbody>/.exec(table)![1]];
  return { head: cells(head, 'th'), rows: [...body.matchAll(/<tr>([\s\S]*?)<\/tr>/g)].map((m) => cells(m[1], 'td')) };
}

function csvTable(interpretation: Interpretation): { head: string[]; rows: string[][] } {
  const [head, ...rows] = stationsCsv(interpretation).trimEnd().split('\r\n').map((line) => line.split(','));
  return { head, rows };
}

describe('the declared columns', () => {
  it('use the shown precision of display-precision.js for every unit, the one the drawings use', () => {
    expect(UNIT_DECIMALS).toEqual({ m: DISPLAY_PRECISION.metreDecimals, ms: DISPLAY_PRECISION.millisecondDecimals, 'm/s': 0 });
    for (const c of stationColumns(THREE_REFRACTORS)) {
      if (c.unit in UNIT_DECIMALS) expect(c.decimals, c.key).toBe(UNIT_DECIMALS[c.unit as keyof typeof UNIT_DECIMALS]);
    }
  });

  it('give deeper refractors their own columns and optional fields a column only when present', () => {
    const keys = stationColumns(THREE_REFRACTORS).map((c) => c.key);
    expect(keys).toEqual(['x', 'elevation', 'delayTime', 'depth', 'refractorElevation', 'depth2', 'depth3', 'v1', 'refractorVelocity', 'plusTime']);
    expect(stationColumns(THREE_REFRACTORS.slice(1)).map((c) => c.key)).toContain('depth2');
    expect(stationColumns(THREE_REFRACTORS.slice(1)).map((c) => c.key)).not.toContain('depth3');
    expect(columnHeading(stationColumns(THREE_REFRACTORS)[5])).toBe('Depth to refractor 2 (m)');
  });

  it('cover every field of the demo line\'s stations', () => {
    for (const station of demo.stations) {
      for (const key of Object.keys(station)) expect(DECLARED_STATION_FIELDS, key).toContain(key);
    }
  });

  it('format a cell the same for people and for files, apart from the empty mark and codes', () => {
    const [first, second] = THREE_REFRACTORS;
    const columns = stationColumns(THREE_REFRACTORS);
    const byKey = Object.fromEntries(columns.map((c) => [c.key, c]));
    expect(cellText(byKey.x, second)).toBe('2.5');
    expect(cellData(byKey.x, second)).toBe('2.5');
    expect(cellText(byKey.depth2, first)).toBe('9.3'); // 9.25 → 9.3 (toFixed: 9.25 is exact in binary, rounds half up)
    expect(cellText(byKey.depth3, first)).toBe('20.5');
    expect(cellText(byKey.depth3, second)).toBe('—');
    expect(cellData(byKey.depth3, second)).toBe('');
    expect(cellText(byKey.v1, first)).toBe('500');
    // Velocities to 10 m/s, thousands grouped for people (as the drawings write them), plain in the file.
    const fast = { ...first, refractorVelocity: 2801 } as Station;
    expect(cellText(byKey.refractorVelocity, fast)).toBe('2,800');
    expect(cellData(byKey.refractorVelocity, fast)).toBe('2800');
    const coverage = stationColumns([{ ...first, coverage: 'phantom' } as Station]).find((c) => c.key === 'coverage')!;
    expect(cellText(coverage, { ...first, coverage: 'phantom' } as Station)).toBe('phantomed');
    expect(cellData(coverage, { ...first, coverage: 'phantom' } as Station)).toBe('phantom');
  });
});

describe('share page and stations.csv', () => {
  for (const [label, make] of [
    ['the demo line', () => demo],
    ['a three-refractor line', () => ({ ...demo, stations: THREE_REFRACTORS })],
  ] as const) {
    it(`show the declared columns and decimals for ${label}`, () => {
      const interpretation = make() as Interpretation;
      const columns = stationColumns(interpretation.stations);
      const share = sharePageTable(interpretation);
      const csv = csvTable(interpretation);
      expect(share.head).toEqual(columns.map(columnHeading));
      expect(csv.head).toEqual(columns.map((c) => c.csvHeader));
      expect(share.rows).toHaveLength(interpretation.stations.length);
      expect(csv.rows).toHaveLength(interpretation.stations.length);
      interpretation.stations.forEach((station, i) => {
        columns.forEach((c, j) => {
          expect(share.rows[i][j], `${c.key} of station ${i}`).toBe(cellText(c, station));
          if (c.decimals !== null) {
            // Same digits in the file as on the share page; an empty cell where the page shows a dash.
            // Velocities drop only the thousands comma, a CSV separator.
            expect(csv.rows[i][j], `${c.key} of station ${i}`).toBe(share.rows[i][j] === '—' ? '' : share.rows[i][j].replace(/,/g, ''));
          }
        });
      });
    });
  }
});
