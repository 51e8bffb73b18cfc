// The page's pure word and number helpers (web/describe.js), run in node: no DOM needed.
import { describe, expect, it } from 'vitest';
import {
  binaryKind, coverageWords, describePath, detectFormat, fileStem, fixed, formatLabel, metres, pickTableName, rockStepWords, velocity, when,
} from '../../web/describe.js';

describe('detectFormat', () => {
  it('trusts the file name first, then the content', () => {
    expect(detectFormat('{"a":1}', 'line.CSV')).toBe('csv');
    expect(detectFormat('x,t', 'line.json')).toBe('json');
    expect(detectFormat('  \n{"name":"x"}')).toBe('json');
    expect(detectFormat('# name: x\nshot_id,x')).toBe('csv');
    expect(formatLabel('json')).toBe('JSON survey');
    expect(formatLabel('csv')).toBe('CSV pick table');
  });
});

describe('number formats', () => {
  it('fixes decimals, shows a dash for missing values and never a negative zero', () => {
    expect(fixed(3.14159, 2)).toBe('3.14');
    expect(fixed(2, 2)).toBe('2.00');
    expect(fixed(-0.004, 2)).toBe('0.00');
    expect(fixed(null, 2)).toBe('—');
    expect(fixed(Number.NaN, 1)).toBe('—');
    expect(fixed('3', 1)).toBe('—');
  });

  it('shows lengths to 0.1 m and velocities to 10 m/s with thousands grouped, as the drawings do', () => {
    expect(metres(12)).toBe('12.0');
    expect(metres(2.5)).toBe('2.5');
    expect(metres(1.234)).toBe('1.2');
    expect(metres(-0.04)).toBe('0.0');
    expect(metres(undefined)).toBe('—');
    expect(velocity(2449.6)).toBe('2,450');
    expect(velocity(698)).toBe('700');
    expect(velocity(2801)).toBe('2,800');
    expect(velocity(null)).toBe('—');
  });
});

describe('coverageWords', () => {
  it('names how the plus time was found, with the pair count when more than one', () => {
    expect(coverageWords('pair')).toBe('opposing shots');
    expect(coverageWords('pair', 3)).toBe('opposing shots (3 pairs)');
    expect(coverageWords('pair', 1)).toBe('opposing shots');
    expect(coverageWords('phantom')).toBe('phantomed');
    expect(coverageWords('none')).toBe('none');
    expect(coverageWords('later-kind')).toBe('later-kind');
    expect(coverageWords(undefined)).toBe('—');
  });
});

describe('describePath', () => {
  const survey = { shots: [{ id: 'W-off' }, { id: 'W-end' }] };

  it('names picks, geophones, pick-table lines and options in plain words', () => {
    expect(describePath('/shots/1/times/5', survey)).toBe('shot 2 (“W-end”), pick at geophone 6');
    expect(describePath('/shots/7/times/0', survey)).toBe('shot 8, pick at geophone 1');
    expect(describePath('/shots/0/x', survey)).toBe('shot 1 (“W-off”), field “x”');
    expect(describePath('/geophones/3/x')).toBe('geophone 4, field “x”');
    expect(describePath('/geophones/3')).toBe('geophone 4');
    expect(describePath('/csv/line/12/time_ms')).toBe('line 12 of the pick table, column “time_ms”');
    expect(describePath('/csv')).toBe('the pick table');
    expect(describePath('/options/layers')).toBe('option “layers”');
    expect(describePath('/name')).toBe('field “name”');
  });

  it('falls back to the whole file or the pointer itself', () => {
    expect(describePath('')).toBe('the whole file');
    expect(describePath(undefined)).toBe('the whole file');
    expect(describePath('/shots/x/times')).toBe('/shots/x/times');
    // A pointer's escapes are undone before reading it.
    expect(describePath('/a~1b')).toBe('field “a/b”');
  });
});

describe('pickTableName, fileStem, when', () => {
  it('reads the name from the leading comments only', () => {
    expect(pickTableName('\uFEFF# date: 2024\n# Name:  Line 7 \nshot_id,x')).toBe('Line 7');
    expect(pickTableName('shot_id,x\n# name: too late')).toBe('');
  });

  it('makes a safe file stem and a readable date', () => {
    expect(fileStem('Line 3, pump-station terrace!')).toBe('line-3-pump-station-terrace');
    expect(fileStem('***')).toBe('line');
    expect(fileStem(null)).toBe('line');
    expect(when('not a date')).toBe('not a date');
    expect(when(42)).toBe('');
    expect(when('2024-05-01T10:00:00Z')).toMatch(/2024/);
  });
});

describe('binaryKind', () => {
  const bytes = (...values: number[]) => new Uint8Array(values);
  const text = (t: string) => new TextEncoder().encode(t);
  it('names a seismograph record and common containers by their first bytes', () => {
    // SEG-2 file descriptor block id 0x3A55, little-endian (from memory: Pullan 1990).
    expect(binaryKind(bytes(0x55, 0x3a, 0x01, 0x00, 0x20, 0x00))).toBe('a SEG-2 seismograph record');
    // SEG-Y EBCDIC header: "C" (0xC3) then a space (0x40) (SEG-Y rev 1).
    expect(binaryKind(bytes(0xc3, 0x40, 0xf1, 0x40))).toBe('a SEG-Y seismic data file');
    expect(binaryKind(text('PK\u0003\u0004rest'))).toMatch(/ZIP container/);
    expect(binaryKind(text('%PDF-1.7\n'))).toBe('a PDF document');
    expect(binaryKind(bytes(0x10, 0x00, 0x41))).toBe('a binary file');
  });
  it('lets text pick files through, with tabs, CRLF and a byte-order mark', () => {
    expect(binaryKind(text('\uFEFF# name: Line 1\r\nshot_x,x,time_ms\r\n0,2,1.5\t\r\n'))).toBeNull();
    expect(binaryKind(text('{"name": "Läufer-Hang", "geophones": []}'))).toBeNull();
    expect(binaryKind(bytes())).toBeNull();
  });
});

describe('rockStepWords', () => {
  it('names each rock step with its place, size and the side the rock deepens to, as the section labels it', () => {
    expect(rockStepWords({ steps: [{ x: 73.69, throw: 4.61 }], stepTest: { pValue: 0.005 } })).toBe('at x = 73.7 m, the rock 4.6 m deeper toward +x');
    expect(rockStepWords({ steps: [{ x: 20, throw: -3 }, { x: 50.04, throw: 2.26 }] })).toBe('at x = 20.0 m, the rock 3.0 m deeper toward −x; at x = 50.0 m, the rock 2.3 m deeper toward +x');
  });

  it('says none were found, with the test’s p-value when there is one, and nothing for lines not tested', () => {
    expect(rockStepWords({ steps: [], stepTest: { pValue: 0.333 } })).toBe('none found (largest jump p = 0.33)');
    expect(rockStepWords({ steps: [] })).toBe('none found');
    expect(rockStepWords({})).toBeNull();
    expect(rockStepWords(undefined)).toBeNull();
  });
});
