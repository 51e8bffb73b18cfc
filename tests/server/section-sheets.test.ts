// A long line's section on screen (issue 11 item 3, "a long line's section pages"): a line too
// long for one sheet is paged at match lines (engine/render/section.ts), and every route that
// shows the section to a person reaches every sheet: GET …/section.svg?sheet=k with the sheet
// count in Arcline-Sheet-Count (as the PNG export), the share page with every sheet on it, and
// the preview bundle with every sheet. The sheets are checked against the renderer's own plan
// (renderSectionSheets) for the same line, and each names itself "sheet k of n".
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { renderSectionSheets } from '../../engine/render/index.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import { longLine } from '../helpers/long-lines.js';

type StreamParser = Parameters<request.Test['parse']>[0];

let app: FastifyInstance;
let id: string;
let shareUrl: string;
let sheets: string[];
const survey: Survey = { ...longLine({ geophones: 240, spacingM: 5, shots: 12 }), name: 'Long line, 240 geophones, 12 shots' };

/** Reads an SVG answer as text (supertest buffers only JSON and text/* by itself). */
const asText: StreamParser = (res, done) => {
  let text = '';
  res.on('data', (chunk: Buffer) => (text += chunk.toString('utf8')));
  res.on('end', () => done(null, text));
};

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
  const res = await request(app.server).post('/api/v1/surveys').send(survey);
  expect(res.status).toBe(201);
  ({ id, shareUrl } = res.body as { id: string; shareUrl: string });
  const stored = await request(app.server).get(`/api/v1/surveys/${id}`);
  sheets = renderSectionSheets(stored.body.survey as Survey, stored.body.interpretation as Interpretation);
}, 120_000);
afterAll(async () => {
  await app?.close();
});

describe('a 240-geophone, 12-shot line paged over several sheets', () => {
  it('is more than one sheet at the default paper and scale (so the checks below can fail)', () => {
    expect(sheets.length).toBeGreaterThan(1);
    sheets.forEach((svg, i) => expect(svg).toContain(`sheet ${i + 1} of ${sheets.length}`));
  });

  it('GET …/section.svg answers every sheet by ?sheet=k and says how many there are', async () => {
    for (let k = 1; k <= sheets.length; k++) {
      const res = await request(app.server).get(`/api/v1/surveys/${id}/section.svg${k === 1 ? '' : `?sheet=${k}`}`).buffer(true).parse(asText);
      expect(res.status, `sheet ${k}`).toBe(200);
      expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
      expect(res.headers['arcline-sheet-count']).toBe(String(sheets.length));
      expect(res.body, `sheet ${k}`).toBe(sheets[k - 1]);
    }
  });

  it('GET …/section-sheets.json says how many sheets and where each is, for the page to show them all', async () => {
    const res = await request(app.server).get(`/api/v1/surveys/${id}/section-sheets.json`);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ sheetCount: sheets.length, sheets: sheets.map((_, i) => `/api/v1/surveys/${id}/section.svg?sheet=${i + 1}`) });
    const one = await request(app.server).get(`/api/v1/surveys/${id}/section-sheets.json?revision=1`);
    expect(one.body.sheets[1]).toBe(`/api/v1/surveys/${id}/section.svg?revision=1&sheet=2`);
    // A line that fits one sheet says so.
    const demo = await request(app.server).post('/api/v1/surveys').send(JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')));
    const single = await request(app.server).get(`/api/v1/surveys/${demo.body.id}/section-sheets.json`);
    expect(single.body.sheetCount).toBe(1);
  });

  it('refuses a sheet past the last with a 400 naming sheet and how many there are', async () => {
    const res = await request(app.server).get(`/api/v1/surveys/${id}/section.svg?sheet=${sheets.length + 1}`);
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_request', path: '/sheet' });
    expect(res.body.error.message).toContain(`has ${sheets.length} sheets`);
    expect((await request(app.server).get(`/api/v1/surveys/${id}/section.svg?sheet=0`)).status).toBe(400);
  });

  it('puts every sheet on the share page, each captioned "sheet k of n", with ids made unique per sheet', async () => {
    const page = await request(app.server).get(shareUrl);
    expect(page.status).toBe(200);
    const n = sheets.length;
    const captions = [...page.text.matchAll(/<figcaption>Depth section — sheet (\d+) of (\d+)<\/figcaption>/g)].map((m) => `${m[1]}/${m[2]}`);
    expect(captions).toEqual(sheets.map((_, i) => `${i + 1}/${n}`));
    for (let k = 1; k <= n; k++) expect(page.text).toContain(`href="#section-sheet-${k}"`);
    // One document: every id once, and every url(#…) points at an id of its own sheet.
    const ids = [...page.text.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
    for (let k = 1; k <= n; k++) expect(page.text).toContain(`url(#s${k}-arcline-section-plot-clip)`);
    // The share link's SVG route pages too.
    const path = new URL(shareUrl, 'http://localhost').pathname;
    const last = await request(app.server).get(`${path}/section.svg?sheet=${n}`).buffer(true).parse(asText);
    expect(last.status).toBe(200);
    expect(last.headers['arcline-sheet-count']).toBe(String(n));
    expect(last.body).toBe(sheets[n - 1]);
  });

  it('gives every sheet in the preview bundle of the line not stored', async () => {
    const res = await request(app.server).post('/api/v1/previews').send(survey);
    expect(res.status).toBe(200);
    expect(res.body.sectionSheets).toHaveLength(sheets.length);
    expect(res.body.sectionSheets[0]).toBe(res.body.sectionSvg);
    (res.body.sectionSheets as string[]).forEach((svg, i) => expect(svg).toContain(`sheet ${i + 1} of ${sheets.length}`));
  });
});
