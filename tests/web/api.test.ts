// The page's request building and answer reading (web/api.js): everything but fetch itself.
import { describe, expect, it } from 'vitest';
import {
  contentTypeOf, failureFromBody, lineFileUrls, readMethodsAnswer, sectionSheetUrl, withSheetQuery, readPreviewBundle, revisionQuery, statusWords, surveyPost, writerGet,
} from '../../web/api.js';

describe('request building', () => {
  it('sends a survey body with its content type, and the token only when there is one', () => {
    expect(contentTypeOf('json')).toBe('application/json');
    expect(contentTypeOf('csv')).toBe('text/csv; charset=utf-8');
    expect(surveyPost('a,b', 'csv')).toEqual({
      method: 'POST',
      headers: { 'Content-Type': 'text/csv; charset=utf-8', Accept: 'application/json' },
      body: 'a,b',
    });
    expect(surveyPost('{}', 'json', 'secret').headers.Authorization).toBe('Bearer secret');
    expect('Authorization' in surveyPost('{}', 'json', '').headers).toBe(false);
  });

  it('reads a stored line with the write token when one is set (only a writer is shown the share link)', () => {
    expect(writerGet('secret')).toEqual({ method: 'GET', headers: { Accept: 'application/json', Authorization: 'Bearer secret' } });
    expect(writerGet('')).toEqual({ method: 'GET', headers: { Accept: 'application/json' } });
  });

  it('names a revision only when it is a whole number from 1', () => {
    expect(revisionQuery(3)).toBe('?revision=3');
    expect(revisionQuery(undefined)).toBe('');
    expect(revisionQuery(0)).toBe('');
    expect(revisionQuery(1.5)).toBe('');
  });

  it('builds relative file URLs with the id encoded', () => {
    expect(lineFileUrls('a/b c')).toEqual({
      section: 'api/v1/surveys/a%2Fb%20c/section.svg',
      sectionSheets: 'api/v1/surveys/a%2Fb%20c/section-sheets.json',
      travelTimes: 'api/v1/surveys/a%2Fb%20c/traveltimes.svg',
      grm: 'api/v1/surveys/a%2Fb%20c/grm.svg',
      methods: 'api/v1/surveys/a%2Fb%20c/methods.json',
      stations: 'api/v1/surveys/a%2Fb%20c/stations.csv',
      interpretation: 'api/v1/surveys/a%2Fb%20c/interpretation.json',
      sectionPdf: 'api/v1/surveys/a%2Fb%20c/section.pdf',
      sectionPng: 'api/v1/surveys/a%2Fb%20c/section.png',
      travelTimesPdf: 'api/v1/surveys/a%2Fb%20c/traveltimes.pdf',
      travelTimesPng: 'api/v1/surveys/a%2Fb%20c/traveltimes.png',
    });
    expect(lineFileUrls('id', 2).sectionPdf).toBe('api/v1/surveys/id/section.pdf?revision=2');
    expect(lineFileUrls('id', 2).section).toBe('api/v1/surveys/id/section.svg?revision=2');
    expect(lineFileUrls('id', 2).sectionSheets).toBe('api/v1/surveys/id/section-sheets.json?revision=2');
    expect(lineFileUrls('id', 2).methods).toBe('api/v1/surveys/id/methods.json?revision=2');
  });

  it('accepts a method comparison only in the promised shape (GET …/methods.json, POST /api/v1/previews/methods)', () => {
    const good = { methodsSvg: '<svg></svg>', comparison: { runs: [], differences: [] } };
    expect(readMethodsAnswer(good)).toEqual(good);
    expect(readMethodsAnswer({ methodsSvg: '<svg></svg>' })).toBeNull();
    expect(readMethodsAnswer({ ...good, comparison: { runs: [] } })).toBeNull();
    expect(readMethodsAnswer(null)).toBeNull();
  });

  it('names sheet k of a section after any revision, and the first sheet by the section\'s own URL', () => {
    expect(sectionSheetUrl('api/v1/surveys/id/section.svg', 1)).toBe('api/v1/surveys/id/section.svg');
    expect(sectionSheetUrl('api/v1/surveys/id/section.svg', 3)).toBe('api/v1/surveys/id/section.svg?sheet=3');
    expect(sectionSheetUrl('api/v1/surveys/id/section.svg?revision=2', 2)).toBe('api/v1/surveys/id/section.svg?revision=2&sheet=2');
  });
});

describe('reading answers', () => {
  it('turns the contract error body into one failure shape, keeping every problem', () => {
    const failure = failureFromBody(400, {
      error: { code: 'invalid_survey', message: 'The survey has 2 problems.', path: '/shots/1/times/5' },
      problems: [{ path: '/shots/1/times/5', code: 'negative-time', message: 'A time is negative.' }, 'junk', { message: 7 }],
    });
    expect(failure).toEqual({
      status: 400,
      code: 'invalid_survey',
      message: 'The survey has 2 problems.',
      path: '/shots/1/times/5',
      problems: [
        { path: '/shots/1/times/5', code: 'negative-time', message: 'A time is negative.' },
        { path: '', code: '', message: '7' },
      ],
    });
  });

  it('puts words to a bare status', () => {
    expect(failureFromBody(502, null)).toMatchObject({ code: 'http-502', message: statusWords(502), problems: [] });
    expect(statusWords(401)).toMatch(/write token/);
    expect(statusWords(413)).toMatch(/too large/);
    expect(statusWords(404)).toMatch(/not in the store/);
    expect(failureFromBody(400, { error: { message: '' } }).message).toBe(statusWords(400));
  });

  it('accepts a preview answer only with an interpretation and both drawings as text', () => {
    const good = { interpretation: { stations: [] }, sectionSvg: '<svg/>', sectionSheets: ['<svg/>', '<svg id="2"/>'], travelTimesSvg: '<svg/>' };
    expect(readPreviewBundle(good)).toEqual(good);
    // Without the sheets (an older service) the section it sent is the one sheet.
    expect(readPreviewBundle({ ...good, sectionSheets: undefined })?.sectionSheets).toEqual(['<svg/>']);
    expect(readPreviewBundle({ ...good, sectionSvg: undefined })).toBeNull();
    expect(readPreviewBundle({ ...good, interpretation: { stations: 'no' } })).toBeNull();
    expect(readPreviewBundle(null)).toBeNull();
    expect(readPreviewBundle([good])).toBeNull();
  });
});

describe('withSheetQuery: paper and section scale of the exported files', () => {
  it('adds nothing for the defaults, paper=A3 and scale=N when chosen, after a revision query', () => {
    expect(withSheetQuery('a/section.pdf', { paper: 'A4', scale: '' }, true)).toBe('a/section.pdf');
    expect(withSheetQuery('a/section.pdf', { paper: 'A3', scale: '2500' }, true)).toBe('a/section.pdf?paper=A3&scale=2500');
    expect(withSheetQuery('a/section.pdf?revision=2', { paper: 'A4', scale: '500' }, true)).toBe('a/section.pdf?revision=2&scale=500');
    expect(withSheetQuery('a/traveltimes.pdf', { paper: 'A3', scale: '500' }, false)).toBe('a/traveltimes.pdf?paper=A3');
    expect(withSheetQuery('a/section.pdf', { paper: 'A4', scale: '12.5' }, true)).toBe('a/section.pdf');
  });
});
