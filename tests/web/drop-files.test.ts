// The seismograph-file drop's pure helpers (web/drop-files.js): which files are taken, the
// shot id and line name each drop gets, the upload routes (server/routes/survey-gathers.ts,
// README "Shot gathers into stored lines"), the words of a stored file, and of a drop's progress
// and cancel (what is stored stays stored; a cancelled upload the service had finished counts). The expected
// values follow from the rules stated in the module, worked by hand here.
import { describe, expect, it } from 'vitest';
import {
  DEMO_GATHER_FILES, MAX_SHOT_ID_LENGTH, cancelledText, isSeg2Name, landedInLine, landedNewLine, missingPositions, lineNameFor, percentSent, progressText, sharedPrefix,
  shotIdsFor, storedFileText, uploadPath,
} from '../../web/drop-files.js';
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

describe('progress and cancel', () => {
  it('says how many files are done of how many, and which file is going', () => {
    expect(progressText(2, 5, 'demo-line-mid.sg2')).toBe('2 of 5 files done. Now: demo-line-mid.sg2.');
    expect(progressText(0, 1, '')).toBe('0 of 1 file done.');
  });

  it('finds the line a cancelled new-line upload made all the same: listed now, not before, of that name', () => {
    const before = ['a', 'b'];
    expect(landedNewLine(before, [{ id: 'a', name: 'line3' }, { id: 'b', name: 'x' }], 'line3')).toBeNull();
    expect(landedNewLine(before, [{ id: 'c', name: 'line3' }, { id: 'a', name: 'line3' }, { id: 'b' }], 'line3')).toBe('c');
    // A colleague's new line of another name is not ours.
    expect(landedNewLine(before, [{ id: 'd', name: 'other' }, { id: 'a' }, { id: 'b' }], 'line3')).toBeNull();
  });

  it('finds a cancelled upload into a line stored all the same: a later revision brought a file of that shot id', () => {
    expect(landedInLine(2, { latestRevision: 2, gathers: [{ shotId: 'mid', revision: 2 }] }, 'mid')).toBe(false);
    expect(landedInLine(2, { latestRevision: 3, gathers: [{ shotId: 'mid', revision: 3 }] }, 'mid')).toBe(true);
    // A revision by someone else (corrected picks, another shot) is not this file.
    expect(landedInLine(2, { latestRevision: 3, gathers: [{ shotId: 'mid', revision: 1 }, { shotId: 'E-end', revision: 3 }] }, 'mid')).toBe(false);
    expect(landedInLine(2, {}, 'mid')).toBe(false);
  });

  it('says what is stored (and stays stored), what became of the file going, and what was not sent', () => {
    expect(cancelledText({ stored: 2, lineName: 'demo-line', current: 'demo-line-mid.sg2', currentStored: false, notSent: 2 })).toBe(
      'Cancelled. demo-line-mid.sg2 was not stored. 2 files are stored and stay stored in the line “demo-line”. 2 files were not sent.',
    );
    expect(cancelledText({ stored: 0, lineName: 'demo-line', current: 'demo-line-W-off.sg2', currentStored: false, notSent: 4 })).toBe(
      'Cancelled. demo-line-W-off.sg2 was not stored. Nothing was stored. 4 files were not sent.',
    );
    expect(cancelledText({ stored: 1, lineName: '', current: 'b.sg2', currentStored: true, notSent: 1 })).toBe(
      'Cancelled. b.sg2 had already been stored when the cancel reached the service. 2 files are stored and stay stored in the line. 1 file was not sent.',
    );
    expect(cancelledText({ stored: 1, lineName: 'L', current: 'b.sg2', currentStored: null, notSent: 0 })).toMatch(/^Cancelled\. Whether b\.sg2 was stored could not be checked .* 1 file is stored and stays stored/);
  });
});
