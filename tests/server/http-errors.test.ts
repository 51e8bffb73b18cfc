// The HTTP layer's promises: health, security headers, and coded errors for every kind of
// bad input (api-v1.md: 400 with the JSON path of the offending value, 413 for too big).
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { AppError, toAppError } from '../../server/errors.js';

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');
const demoCsvText = readFileSync(new URL('../../samples/demo-line.csv', import.meta.url), 'utf8');

let app: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:', bodyLimitBytes: 64 * 1024 });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

function expectCodedError(body: unknown, code: string): { code: string; message: string; path: string } {
  const error = (body as { error?: { code: string; message: string; path: string } }).error;
  expect(error, 'body has an "error" object').toBeDefined();
  expect(error!.code).toBe(code);
  expect(typeof error!.message).toBe('string');
  expect(error!.message.length).toBeGreaterThan(10);
  expect(typeof error!.path).toBe('string');
  return error!;
}

describe('GET /healthz', () => {
  it('answers 200 {"status":"ok"}', async () => {
    const res = await request(app.server).get('/healthz');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok' });
  });

  it('carries the security headers', async () => {
    const res = await request(app.server).get('/healthz');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    const csp = res.headers['content-security-policy'];
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
  });
});

describe('bad bodies on POST /api/v1/interpretations', () => {
  it('answers 400 invalid_json for a body that is not JSON', async () => {
    const res = await request(app.server)
      .post('/api/v1/interpretations')
      .set('Content-Type', 'application/json')
      .send('{"name": "Line 3", "geophones": [');
    expect(res.status).toBe(400);
    expectCodedError(res.body, 'invalid_json');
  });

  it('answers 400 with the path of a value of the wrong type', async () => {
    const survey = JSON.parse(demoJsonText);
    survey.geophones[2].x = 'six';
    const res = await request(app.server).post('/api/v1/interpretations').send(survey);
    expect(res.status).toBe(400);
    const error = expectCodedError(res.body, 'invalid_survey');
    expect(error.path).toBe('/geophones/2/x');
    expect(res.body.problems.some((p: { path: string }) => p.path === '/geophones/2/x')).toBe(true);
  });

  it('answers 400 at /shots/1/times when a shot has one time too few', async () => {
    const survey = JSON.parse(demoJsonText);
    survey.shots[1].times.pop();
    const res = await request(app.server).post('/api/v1/interpretations').send(survey);
    expect(res.status).toBe(400);
    const error = expectCodedError(res.body, 'invalid_survey');
    expect(error.path).toBe('/shots/1/times');
    expect(error.message).toBe('The survey has 1 problem.');
    expect(res.body.problems[0].message).toMatch(/geophones/);
  });

  it('lists every problem, not only the first', async () => {
    const survey = JSON.parse(demoJsonText);
    survey.shots[0].times[3] = -5;
    survey.shots[2].times[4] = 'late';
    const res = await request(app.server).post('/api/v1/interpretations').send(survey);
    expect(res.status).toBe(400);
    const paths = (res.body.error.problems as { path: string }[]).map((p) => p.path);
    expect(paths).toContain('/shots/0/times/3');
    expect(paths).toContain('/shots/2/times/4');
    expect(res.body.problems).toEqual(res.body.error.problems);
  });

  it('answers 400 for a JSON body that is not a survey at all', async () => {
    for (const body of ['[1, 2, 3]', '"Line 3"', '42', 'null']) {
      const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'application/json').send(body);
      expect(res.status, body).toBe(400);
      expectCodedError(res.body, 'invalid_survey');
    }
  });

  it('answers 400 naming the line of a broken pick table', async () => {
    const lines = demoCsvText.split(/\r?\n/);
    const headerIndex = lines.findIndex((l) => l.startsWith('shot_id'));
    const brokenIndex = headerIndex + 3;
    lines[brokenIndex] = lines[brokenIndex].replace(/,[^,]*$/, ',soon');
    const res = await request(app.server)
      .post('/api/v1/interpretations')
      .set('Content-Type', 'text/csv')
      .send(lines.join('\n'));
    expect(res.status).toBe(400);
    const error = expectCodedError(res.body, 'invalid_pick_table');
    expect(error.message).toContain(`line ${brokenIndex + 1}`);
    expect(error.path).toContain(`/csv/line/${brokenIndex + 1}`);
  });

  it('answers 400 empty_body for an empty JSON or CSV body', async () => {
    for (const type of ['application/json', 'text/csv']) {
      const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', type).send('');
      expect(res.status, type).toBe(400);
      expectCodedError(res.body, 'empty_body');
    }
  });

  it('answers 400 unsupported_content_type for a body that is neither JSON nor CSV', async () => {
    const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/plain').send('hello');
    expect(res.status).toBe(400);
    expectCodedError(res.body, 'unsupported_content_type');
  });

  it('answers 400 (not 500) to a __proto__ key', async () => {
    const res = await request(app.server)
      .post('/api/v1/interpretations')
      .set('Content-Type', 'application/json')
      .send('{"__proto__": {"polluted": true}, "geophones": [], "shots": []}');
    expect(res.status).toBe(400);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

describe('oversized bodies', () => {
  const limit = 64 * 1024;

  it('answers 413 body_too_large for JSON over the limit', async () => {
    const survey = JSON.parse(demoJsonText);
    survey.name = 'x'.repeat(limit + 10);
    const res = await request(app.server).post('/api/v1/interpretations').send(survey);
    expect(res.status).toBe(413);
    expectCodedError(res.body, 'body_too_large');
  });

  it('answers 413 for a pick table over the limit, also on the storing route', async () => {
    const padding = `# ${'y'.repeat(limit)}\n`;
    const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'text/csv').send(padding + demoCsvText);
    expect(res.status).toBe(413);
    expectCodedError(res.body, 'body_too_large');
    expect(app.store.countRows().surveys).toBe(0);
  });

  it('keeps the default limit at about 5 MB', async () => {
    const big = await buildApp({ dataDir: ':memory:' });
    try {
      await big.ready();
      const res = await request(big.server)
        .post('/api/v1/interpretations')
        .set('Content-Type', 'text/csv')
        .send(`# ${'z'.repeat(5 * 1024 * 1024 + 1)}\n`);
      expect(res.status).toBe(413);
    } finally {
      await big.close();
    }
  });
});

describe('unknown paths', () => {
  it('answer 404 with the coded body', async () => {
    for (const path of ['/api/v1/nothing', '/api/v2/surveys', '/no-such-file.js']) {
      const res = await request(app.server).get(path);
      expect(res.status, path).toBe(404);
      expectCodedError(res.body, 'not_found');
    }
  });

  it('answer 404 to methods no route has', async () => {
    const res = await request(app.server).put('/api/v1/surveys').send({});
    expect(res.status).toBe(404);
    expectCodedError(res.body, 'not_found');
  });
});

describe('the static page at /', () => {
  it('serves web/index.html with the strict Content-Security-Policy', async () => {
    const res = await request(app.server).get('/');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/html');
    expect(res.text).toMatch(/<html/i);
    const csp = res.headers['content-security-policy'];
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });
});

describe('the display rules served to the page', () => {
  it('serves engine/output/display-precision.js, the one copy, where the page\'s relative import resolves', async () => {
    // web/describe.js imports '../engine/output/display-precision.js': from /describe.js a
    // browser resolves that to /engine/output/display-precision.js (WHATWG URL: ".." stops at the root).
    const imported = /from '(\.\.\/engine\/output\/display-precision\.js)'/.exec(readFileSync(new URL('../../web/describe.js', import.meta.url), 'utf8'));
    expect(imported).not.toBeNull();
    const path = new URL(imported![1], 'http://service/describe.js').pathname;
    expect(path).toBe('/engine/output/display-precision.js');
    const res = await request(app.server).get(path);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/javascript/);
    expect(res.text).toBe(readFileSync(new URL('../../engine/output/display-precision.js', import.meta.url), 'utf8'));
    // Nothing else of the engine is served.
    expect((await request(app.server).get('/engine/output/interpretation.ts')).status).toBe(404);
  });
});

describe('errors Fastify meets before or around the route', () => {
  it('answers a badly percent-encoded URL with a coded 400 and the security headers', async () => {
    for (const path of ['/api/v1/surveys/%E0%A4%A', '/share/%zz']) {
      const res = await request(app.server).get(path);
      expect(res.status, path).toBe(400);
      expectCodedError(res.body, 'invalid_request');
      expect(res.headers['content-security-policy']).toBeDefined();
    }
  });

  it('answers a body shorter than its Content-Length with a coded 400', async () => {
    const res = await app.inject({
      method: 'POST',
      url: '/api/v1/interpretations',
      headers: { 'content-type': 'application/json', 'content-length': '5' },
      payload: '{"geophones": []}',
    });
    expect(res.statusCode).toBe(400);
    expectCodedError(res.json(), 'invalid_request');
  });
});

describe('toAppError', () => {
  it('turns an unexpected failure into a 500 whose message gives nothing away', () => {
    const { appError, unexpected } = toAppError(new TypeError('secret detail at /srv/arcline/data'));
    expect(unexpected).toBe(true);
    expect(appError.statusCode).toBe(500);
    expect(appError.code).toBe('internal_error');
    expect(appError.message).not.toContain('secret');
  });

  it('passes a coded error through with its catalogue status', () => {
    const { appError, unexpected } = toAppError(new AppError('revision_not_found', { path: '/revision' }));
    expect(unexpected).toBe(false);
    expect(appError.statusCode).toBe(404);
    expect(appError.toBody()).toEqual({ error: { code: 'revision_not_found', message: appError.message, path: '/revision' } });
  });
});
