// The seismograph-file drop's pure helpers (web/drop-files.js): which files are taken, the
// shot id and line name each drop gets, the upload routes (server/routes/survey-gathers.ts,
// README "Shot gathers into stored lines"), and the words of a stored file. The expected
// values follow from the rules stated in the module, worked by hand here.
import { describe, expect, it } from 'vitest';
import { DEMO_GATHER_FILES, MAX_SHOT_ID_LENGTH, isSeg2Name, missingPositions, lineNameFor, percentSent, sharedPrefix, shotIdsFor, storedFileText, uploadPath } from '../../web/drop-files.js';
import { demoGathers } from '../../engine/samples/demo-gathers.js';
import { SURVEY_LIMITS } from '../../engine/survey/survey.js';

describe('which files are taken', () => {
  it('takes .sg2, .seg2 and .dat in any case, nothing else', () => {
    for (const name of ['a.sg2', 'SHOT01.SG2', 'x.seg2', '1001.dat', 'b.Dat']) expect(isSeg2Name(name)).toBe(true);
    for (const name of ['line.csv', 'line.json', 'a.sg2.txt', '.sg2', 'sg2', 'a.segy']) expect(isSeg2Name(name)).toBe(false);
  });
});

describe('shot ids from file names', () => {
  it('drops the start every file shares, cut at a separator', () => {
    expect(shotIdsFor(['line3-shot01.sg2', 'line3-shot02.sg2', 'line3-shot10.sg2'])).toEqual(['shot01', 'shot02', 'shot10']);
    // "shot1" is shared by shot10 and shot11 but is no whole word: only the separator counts.
    expect(sharedPrefix(['shot10', 'shot11'])).toBe('');
    expect(shotIdsFor(['shot10.sg2', 'shot11.sg2'])).toEqual(['shot10', 'shot11']);
    expect(shotIdsFor(DEMO_GATHER_FILES.slice())).toEqual(['W-off', 'W-end', 'mid', 'E-end', 'E-off']);
  });
  it('keeps one file\'s whole name, and a name that is all prefix', () => {
    expect(shotIdsFor(['1001.dat'])).toEqual(['1001']);
    expect(shotIdsFor(['a-.sg2', 'a-x.sg2'])).toEqual(['a-', 'x']);
  });
  it('makes repeated ids distinct and keeps every id within the service\'s limit', () => {
    expect(shotIdsFor(['a.sg2', 'a.dat'])).toEqual(['a', 'a (2)']);
    const long = 'S'.repeat(60);
    const ids = shotIdsFor([long + '.sg2', long + '.dat']);
    expect(MAX_SHOT_ID_LENGTH).toBe(SURVEY_LIMITS.maxShotIdLength);
    ids.forEach((id) => expect(id.length).toBeLessThanOrEqual(SURVEY_LIMITS.maxShotIdLength));
    expect(new Set(ids).size).toBe(2);
  });
});

describe('the line name of a drop', () => {
  it('is the shared start without its separator, one file\'s name, or nothing', () => {
    expect(lineNameFor(['line3-shot01.sg2', 'line3-shot02.sg2'])).toBe('line3');
    expect(lineNameFor(['demo-line-W-end.sg2'])).toBe('demo-line-W-end');
    expect(lineNameFor(['a.sg2', 'b.sg2'])).toBe('');
  });
});

describe('upload routes', () => {
  it('a new line, or the open one, with the shot id (and name, reviewer) encoded', () => {
    expect(uploadPath({ lineId: '', shotId: 'W end', name: 'Line 3 & 4' })).toBe('api/v1/surveys/gathers?shotId=W%20end&name=Line%203%20%26%204');
    expect(uploadPath({ lineId: 'ab/c', shotId: 'mid', name: 'ignored for an existing line', author: 'R. O.' })).toBe('api/v1/surveys/ab%2Fc/gathers?shotId=mid&author=R.%20O.');
    // Positions the file lacks, and the layout change confirmed (only for an existing line).
    expect(uploadPath({ lineId: 'L1', shotId: 's', overrides: { shotX: -20, geophoneX0: 0, geophoneSpacing: 2.5 }, confirmLayout: true })).toBe(
      'api/v1/surveys/L1/gathers?shotId=s&layoutChange=confirm&shotX=-20&geophoneX0=0&geophoneSpacing=2.5',
    );
    expect(uploadPath({ lineId: '', shotId: 's', confirmLayout: true })).toBe('api/v1/surveys/gathers?shotId=s');
  });
  it('asks for the positions the service names as missing', () => {
    expect(missingPositions('/shotX').map((p) => p.key)).toEqual(['shotX']);
    expect(missingPositions('/geophoneX0').map((p) => p.key)).toEqual(['geophoneX0', 'geophoneSpacing']);
    expect(missingPositions('')).toEqual([]);
  });
});

describe('what a stored file says', () => {
  it('counts picks and the low-confidence ones (under 0.5)', () => {
    expect(storedFileText({ times: [1, 2, null, 4], confidence: [0.9, 0.49, 0, 0.5] }, 'W-end')).toBe('Stored as shot W-end: 3 of 4 traces picked, 1 with low confidence to check.');
    expect(storedFileText({ times: [1, 2], confidence: [0.9, 0.8] }, 'mid')).toBe('Stored as shot mid: 2 of 2 traces picked.');
  });
  it('progress in whole percent, 0 when the size is unknown', () => {
    expect(percentSent(0, 200)).toBe(0);
    expect(percentSent(199, 200)).toBe(99);
    expect(percentSent(200, 200)).toBe(100);
    expect(percentSent(5, 0)).toBe(0);
  });
});

describe('the demo files the page fetches', () => {
  it('are the files the demo writer makes (engine/samples/demo-gathers.ts)', () => {
    expect(DEMO_GATHER_FILES.slice().sort()).toEqual(demoGathers().map((g) => g.fileName).sort());
  });
});
