// Previews of a line that is not stored: POST /api/v1/previews/section.svg and
// /api/v1/previews/traveltimes.svg take the same bodies as POST /api/v1/interpretations,
// answer the renderer's SVG, reject bad lines with the contract's error body, store nothing
// and need no write token.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');
const demoCsvText = readFileSync(new URL('../../samples/demo-line.csv', import.meta.url), 'utf8');
const flatJsonText = readFileSync(new URL('../../samples/flat-line.json', import.meta.url), 'utf8');

const FIGURES = ['section', 'traveltimes'] as const;

let app: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

type BodyParser = Parameters<request.Test['parse']>[0];
type StreamParser = Extract<BodyParser, (res: never, callback: never) => void>;

/** supertest leaves image bodies unread; collect the SVG as text. */
const asText: StreamParser = (res, done) => {
  let text = '';
  res.on('data', (chunk: Buffer) => (text += chunk.toString('utf8')));
  res.on('end', () => done(null, text));
};

function postPreview(target: FastifyInstance, figure: string, contentType: string, body: string | object) {
  return request(target.server)
    .post(`/api/v1/previews/${figure}.svg`)
    .set('Content-Type', contentType)
    .send(body)
    .buffer(true)
    .parse(asText);
}

/** The root element of an SVG document, after an optional XML declaration. */
function rootElementName(svg: string): string | undefined {
  return /^\s*(?:<\?xml[^>]*\?>\s*)?<([A-Za-z][\w:-]*)/.exec(svg)?.[1];
}

async function listedIds(): Promise<string[]> {
  const res = await request(app.server).get('/api/v1/surveys');
  expect(res.status).toBe(200);
  return (res.body as { id: string }[]).map((s) => s.id);
}

describe('POST /api/v1/previews/*.svg with a JSON survey', () => {
  it('answers an SVG document with the line name escaped, under the script-free SVG policy', async () => {
    const survey = JSON.parse(flatJsonText);
    survey.name = 'Line <script>alert(1)</script> & "north"';
    for (const figure of FIGURES) {
      const res = await postPreview(app, figure, 'application/json', survey);
      expect(res.status, figure).toBe(200);
      expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
      const svg = res.body as string;
      expect(rootElementName(svg), figure).toBe('svg');
      expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
      // The name is in the drawing, as text: escaped, never as markup.
      expect(svg).toContain('Line &lt;script&gt;alert(1)&lt;/script&gt; &amp;');
      expect(svg).not.toContain('<script');
      expect(res.headers['content-security-policy']).toContain("default-src 'none'");
      expect(res.headers['content-security-policy']).not.toContain('script-src');
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['cache-control']).toBe('no-store');
    }
  });

  it('draws the same figures the stored line gets (same renderer, same interpretation)', async () => {
    const previews = await Promise.all(FIGURES.map((figure) => postPreview(app, figure, 'application/json', demoJsonText)));
    const stored = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(demoJsonText);
    expect(stored.status).toBe(201);
    for (const [i, figure] of FIGURES.entries()) {
      const fromStore = await request(app.server).get(`/api/v1/surveys/${stored.body.id}/${figure}.svg`).buffer(true).parse(asText);
      expect(fromStore.status).toBe(200);
      expect(previews[i].status).toBe(200);
      expect(previews[i].body, figure).toBe(fromStore.body);
    }
    // The two routes draw different figures, not one figure twice.
    expect(previews[0].body).not.toBe(previews[1].body);
  });

  it('stores nothing: the list and every table are unchanged', async () => {
    const idsBefore = await listedIds();
    const rowsBefore = app.store.countRows();
    for (const figure of FIGURES) {
      expect((await postPreview(app, figure, 'application/json', flatJsonText)).status).toBe(200);
      expect((await postPreview(app, figure, 'text/csv', demoCsvText)).status).toBe(200);
    }
    expect(await listedIds()).toEqual(idsBefore);
    expect(app.store.countRows()).toEqual(rowsBefore);
  });
});

describe('POST /api/v1/previews/*.svg with a pick table (text/csv)', () => {
  it('draws the pick table as it draws the same line sent as JSON', async () => {
    const survey = JSON.parse(demoJsonText);
    for (const figure of FIGURES) {
      const fromCsv = await postPreview(app, figure, 'text/csv; charset=utf-8', demoCsvText);
      const fromJson = await postPreview(app, figure, 'application/json', survey);
      expect(fromCsv.status, figure).toBe(200);
      expect(fromCsv.headers['content-type']).toMatch(/^image\/svg\+xml/);
      expect(rootElementName(fromCsv.body as string)).toBe('svg');
      // The table's "# name:" line names the drawing (escaped as any name: "&" is not in it).
      expect(fromCsv.body as string).toContain(survey.name);
      expect(fromCsv.body).toBe(fromJson.body);
    }
  });
});

describe('POST /api/v1/previews/*.svg with bad input', () => {
  it('answers 400 invalid_survey with every problem and its JSON path, and stores nothing', async () => {
    const bad = JSON.parse(flatJsonText);
    bad.shots[1].times[5] = -4;
    const rowsBefore = app.store.countRows();
    for (const figure of FIGURES) {
      const res = await request(app.server).post(`/api/v1/previews/${figure}.svg`).send(bad);
      expect(res.status, figure).toBe(400);
      expect(res.headers['content-type']).toMatch(/^application\/json/);
      expect(res.body.error.code).toBe('invalid_survey');
      expect(res.body.error.message.length).toBeGreaterThan(10);
      const paths = (res.body.problems as { path: string }[]).map((p) => p.path);
      expect(paths).toContain('/shots/1/times/5');
      expect(res.body.error.path).toBe(res.body.problems[0].path);
    }
    expect(app.store.countRows()).toEqual(rowsBefore);
  });

  it('answers 400 invalid_pick_table naming the line of a bad pick table', async () => {
    const lines = demoCsvText.split('\n');
    const firstDataLine = lines.findIndex((line) => /^W-off,/.test(line));
    lines[firstDataLine] = lines[firstDataLine].replace(/,[^,]*$/, ',soon');
    for (const figure of FIGURES) {
      const res = await request(app.server).post(`/api/v1/previews/${figure}.svg`).set('Content-Type', 'text/csv').send(lines.join('\n'));
      expect(res.status, figure).toBe(400);
      expect(res.body.error.code).toBe('invalid_pick_table');
      expect(res.body.error.path).toBe(`/csv/line/${firstDataLine + 1}/time_ms`);
    }
  });

  it('answers 400 for an empty body, broken JSON and a form-encoded body', async () => {
    for (const figure of FIGURES) {
      const empty = await request(app.server).post(`/api/v1/previews/${figure}.svg`).set('Content-Type', 'application/json').send('');
      expect(empty.status).toBe(400);
      expect(empty.body.error.code).toBe('empty_body');
      const broken = await request(app.server).post(`/api/v1/previews/${figure}.svg`).set('Content-Type', 'application/json').send('{"name": ');
      expect(broken.status).toBe(400);
      expect(broken.body.error.code).toBe('invalid_json');
      const form = await request(app.server).post(`/api/v1/previews/${figure}.svg`).set('Content-Type', 'application/x-www-form-urlencoded').send('a=1');
      expect(form.status).toBe(400);
      expect(form.body.error.code).toBe('unsupported_content_type');
    }
  });

  it('answers 413 body_too_large for a body over the limit', async () => {
    const small = await buildApp({ dataDir: ':memory:', bodyLimitBytes: 16 * 1024 });
    try {
      await small.ready();
      const padding = `# ${'y'.repeat(16 * 1024)}\n`;
      for (const figure of FIGURES) {
        const res = await request(small.server).post(`/api/v1/previews/${figure}.svg`).set('Content-Type', 'text/csv').send(padding + demoCsvText);
        expect(res.status, figure).toBe(413);
        expect(res.body.error.code).toBe('body_too_large');
      }
    } finally {
      await small.close();
    }
  });
});

describe('previews and the write token', () => {
  it('need no token where storing does', async () => {
    const guarded = await buildApp({ dataDir: ':memory:', writeToken: 'preview-test-token-5b7d02e9c4a1f863' });
    try {
      await guarded.ready();
      const store = await request(guarded.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(flatJsonText);
      expect(store.status).toBe(401);
      for (const figure of FIGURES) {
        const res = await postPreview(guarded, figure, 'application/json', flatJsonText);
        expect(res.status, figure).toBe(200);
        expect(rootElementName(res.body as string)).toBe('svg');
      }
      expect(guarded.store.countRows().surveys).toBe(0);
    } finally {
      await guarded.close();
    }
  });
});

describe('the page policy', () => {
  it('lets the page show preview images from blob: URLs and still runs no inline script', async () => {
    const res = await request(app.server).get('/');
    expect(res.status).toBe(200);
    const policy = String(res.headers['content-security-policy']);
    const directive = (name: string): string => policy.split(';').map((d) => d.trim()).find((d) => d.startsWith(name + ' ')) ?? '';
    expect(directive('img-src').split(/\s+/)).toContain('blob:');
    expect(directive('script-src')).toBe("script-src 'self'");
  });
});
