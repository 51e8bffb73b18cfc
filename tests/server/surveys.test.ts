// Stored surveys: interpret-only route, store, list, read, revisions, drawings, tables,
// 404s, and "a rejected request changes nothing" (api-v1.md).
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');
const demoCsvText = readFileSync(new URL('../../samples/demo-line.csv', import.meta.url), 'utf8');
const flatJsonText = readFileSync(new URL('../../samples/flat-line.json', import.meta.url), 'utf8');

let app: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

async function storeDemo(): Promise<{ id: string; shareUrl: string }> {
  const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(demoJsonText);
  expect(res.status).toBe(201);
  return res.body;
}

describe('POST /api/v1/interpretations', () => {
  it('interprets the JSON demo line and the same line as a pick table alike, storing nothing', async () => {
    const before = app.store.countRows();
    const fromJson = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'application/json').send(demoJsonText);
    const fromCsv = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv; charset=utf-8').send(demoCsvText);
    expect(fromJson.status).toBe(200);
    expect(fromCsv.status).toBe(200);
    const survey = JSON.parse(demoJsonText);
    expect(fromJson.body.stations).toHaveLength(survey.geophones.length);
    expect(fromJson.body.stations.map((s: { x: number }) => s.x)).toEqual(survey.geophones.map((g: { x: number }) => g.x));
    expect(fromJson.body.layers.length).toBeGreaterThanOrEqual(2);
    expect(fromCsv.body).toEqual(fromJson.body);
    expect(app.store.countRows()).toEqual(before);
  });
});

describe('stored surveys', () => {
  it('stores a survey: 201 with id, shareUrl, revision 1 and the interpretation', async () => {
    const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(demoJsonText);
    expect(res.status).toBe(201);
    expect(res.body.id).toMatch(/^[A-Za-z0-9_-]+$/);
    expect(res.body.revision).toBe(1);
    expect(res.body.shareUrl).toMatch(/^\/share\/[A-Za-z0-9_-]{43}$/);
    expect(res.body.name).toBe(JSON.parse(demoJsonText).name);
    expect(res.headers.location).toBe(`/api/v1/surveys/${res.body.id}`);
    expect(res.body.interpretation.stations).toHaveLength(JSON.parse(demoJsonText).geophones.length);
  });

  it('stores a pick table (text/csv) as well', async () => {
    const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'text/csv').send(demoCsvText);
    expect(res.status).toBe(201);
    const got = await request(app.server).get(`/api/v1/surveys/${res.body.id}`);
    expect(got.body.survey.geophones).toHaveLength(JSON.parse(demoJsonText).geophones.length);
  });

  it('lists stored surveys with id, name and createdAt, newest first', async () => {
    const a = await storeDemo();
    const b = await request(app.server).post('/api/v1/surveys').send(JSON.parse(flatJsonText));
    expect(b.status).toBe(201);
    const res = await request(app.server).get('/api/v1/surveys');
    expect(res.status).toBe(200);
    expect(Array.isArray(res.body)).toBe(true);
    const ids = res.body.map((s: { id: string }) => s.id);
    expect(ids).toContain(a.id);
    expect(ids.indexOf(b.body.id)).toBeLessThan(ids.indexOf(a.id));
    for (const item of res.body) {
      expect(typeof item.name).toBe('string');
      expect(Number.isNaN(Date.parse(item.createdAt))).toBe(false);
      expect(item.latestRevision).toBeGreaterThanOrEqual(1);
    }
  });

  it('keeps every revision: a correction adds revision 2 and revision 1 stays readable', async () => {
    const { id } = await storeDemo();
    const corrected = JSON.parse(demoJsonText);
    corrected.name = 'Demo A, corrected picks';
    corrected.shots[0].times[5] = null;
    const post = await request(app.server).post(`/api/v1/surveys/${id}/revisions`).send(corrected);
    expect(post.status).toBe(201);
    expect(post.body.revision).toBe(2);
    expect(post.body.id).toBe(id);

    const latest = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(latest.status).toBe(200);
    expect(latest.body.revision).toBe(2);
    expect(latest.body.latestRevision).toBe(2);
    expect(latest.body.name).toBe('Demo A, corrected picks');
    expect(latest.body.survey.shots[0].times[5]).toBeNull();
    expect(latest.body.revisions.map((r: { revision: number }) => r.revision)).toEqual([1, 2]);
    expect(latest.body.interpretation.stations).toHaveLength(corrected.geophones.length);

    const first = await request(app.server).get(`/api/v1/surveys/${id}?revision=1`);
    expect(first.status).toBe(200);
    expect(first.body.revision).toBe(1);
    expect(first.body.survey.shots[0].times[5]).toBe(JSON.parse(demoJsonText).shots[0].times[5]);
    expect(first.body.name).toBe(JSON.parse(demoJsonText).name);

    const list = await request(app.server).get('/api/v1/surveys');
    const item = list.body.find((s: { id: string }) => s.id === id);
    expect(item.latestRevision).toBe(2);
    expect(item.name).toBe('Demo A, corrected picks');
  });

  it('serves the section and the time–distance plot as SVG, for any revision', async () => {
    const { id } = await storeDemo();
    for (const path of [`/api/v1/surveys/${id}/section.svg`, `/api/v1/surveys/${id}/traveltimes.svg`, `/api/v1/surveys/${id}/section.svg?revision=1`]) {
      const res = await request(app.server).get(path).buffer(true).parse((r, cb) => {
        let text = '';
        r.on('data', (c: Buffer) => (text += c.toString('utf8')));
        r.on('end', () => cb(null, text));
      });
      expect(res.status, path).toBe(200);
      expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
      expect(res.body as string).toMatch(/<svg[\s>]/);
      expect(res.headers['content-security-policy']).toContain("default-src 'none'");
    }
  });

  it('serves stations.csv: a header with units and one row per geophone', async () => {
    const { id } = await storeDemo();
    const res = await request(app.server).get(`/api/v1/surveys/${id}/stations.csv`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="[A-Za-z0-9._-]+\.csv"$/);
    const rows = res.text.split('\r\n').filter((l) => l !== '');
    const survey = JSON.parse(demoJsonText);
    expect(rows).toHaveLength(survey.geophones.length + 1);
    const header = rows[0].split(',');
    expect(header.slice(0, 4)).toEqual(['x_m', 'elevation_m', 'delay_time_ms', 'depth_m']);
    expect(header).toContain('refractor_velocity_m_per_s');
    expect(rows[0].startsWith('#')).toBe(false);
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    const depthColumn = header.indexOf('depth_m');
    rows.slice(1).forEach((row, i) => {
      const cells = row.split(',');
      expect(cells).toHaveLength(header.length);
      expect(Number(cells[0])).toBeCloseTo(survey.geophones[i].x, 3);
      const depth = detail.body.interpretation.stations[i].depth;
      if (depth === null) expect(cells[depthColumn]).toBe('');
      // The page's shown precision (engine/output/display-precision.js): 0.1 m, so within half of it.
      else expect(Math.abs(Number(cells[depthColumn]) - depth)).toBeLessThanOrEqual(0.05 + 1e-9);
    });
  });

  it('serves interpretation.json as a download equal to the stored interpretation', async () => {
    const { id } = await storeDemo();
    const res = await request(app.server).get(`/api/v1/surveys/${id}/interpretation.json`);
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename=".+\.json"$/);
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(JSON.parse(res.text)).toEqual(detail.body.interpretation);
  });
});

describe('404s and bad queries', () => {
  it('answers 404 survey_not_found for unknown and malformed ids on every survey route', async () => {
    for (const id of ['AAAAAAAAAAAAAAAA', 'no%20such', '..%2F..%2Fetc', 'x'.repeat(100)]) {
      for (const suffix of ['', '/section.svg', '/traveltimes.svg', '/stations.csv', '/interpretation.json']) {
        const res = await request(app.server).get(`/api/v1/surveys/${id}${suffix}`);
        expect(res.status, `${id}${suffix}`).toBe(404);
        expect(res.body.error.code).toBe('survey_not_found');
      }
    }
    const revision = await request(app.server).post('/api/v1/surveys/AAAAAAAAAAAAAAAA/revisions').send(JSON.parse(demoJsonText));
    expect(revision.status).toBe(404);
    expect(revision.body.error.code).toBe('survey_not_found');
  });

  it('answers 404 revision_not_found for a revision that does not exist', async () => {
    const { id } = await storeDemo();
    for (const path of [`/api/v1/surveys/${id}?revision=2`, `/api/v1/surveys/${id}/section.svg?revision=9`, `/api/v1/surveys/${id}/stations.csv?revision=3`]) {
      const res = await request(app.server).get(path);
      expect(res.status, path).toBe(404);
      expect(res.body.error.code).toBe('revision_not_found');
    }
  });

  it('answers 400 with path /revision for a revision that is not a whole number ≥ 1', async () => {
    const { id } = await storeDemo();
    for (const value of ['abc', '0', '-1', '1.5']) {
      const res = await request(app.server).get(`/api/v1/surveys/${id}?revision=${value}`);
      expect(res.status, value).toBe(400);
      expect(res.body.error.code).toBe('invalid_request');
      expect(res.body.error.path).toBe('/revision');
    }
  });
});

describe('a rejected request changes nothing', () => {
  it('leaves the row counts unchanged after bad JSON, a bad survey, a bad pick table and a bad revision', async () => {
    const { id } = await storeDemo();
    const before = app.store.countRows();
    const badSurvey = JSON.parse(demoJsonText);
    badSurvey.shots[1].times.pop();

    const attempts = [
      request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send('{"geophones": [}'),
      request(app.server).post('/api/v1/surveys').send(badSurvey),
      request(app.server).post('/api/v1/surveys').set('Content-Type', 'text/csv').send('shot_id,shot_x_m\nW,0\n'),
      request(app.server).post(`/api/v1/surveys/${id}/revisions`).send(badSurvey),
      request(app.server).post(`/api/v1/surveys/${id}/revisions`).set('Content-Type', 'text/plain').send('picks'),
    ];
    for (const attempt of attempts) {
      const res = await attempt;
      expect(res.status).toBe(400);
    }
    expect(app.store.countRows()).toEqual(before);
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(detail.body.latestRevision).toBe(1);
  });
});
