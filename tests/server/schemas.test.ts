// Schemas as the contract on the wire: the interpretation leaves the service exactly as the
// engine made it (the response serialiser drops undeclared fields, so an incomplete schema
// would lose data), bad bodies at any depth answer the contract's 400 with the pointer and a
// sentence, and the OpenAPI document lists every route with its schemas.
import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import type { Survey } from '../../engine/survey/survey.js';
import { validateSurvey } from '../../engine/survey/validate.js';

const goldenDir = fileURLToPath(new URL('../golden/lines/', import.meta.url));
const goldenFiles = readdirSync(goldenDir).filter((f) => f.endsWith('.json')).sort();
const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as Survey;

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:', webRoot: null });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

const postJson = (url: string, body: unknown) =>
  app.inject({ method: 'POST', url, headers: { 'content-type': 'application/json' }, payload: typeof body === 'string' ? body : JSON.stringify(body) });

describe('POST /api/v1/interpretations sends exactly what interpret() returns', () => {
  for (const file of goldenFiles) {
    it(file.replace(/\.json$/, ''), async () => {
      const { survey } = JSON.parse(readFileSync(goldenDir + file, 'utf8')) as { survey: Survey };
      const res = await postJson('/api/v1/interpretations', survey);
      const checked = validateSurvey(survey);
      if (checked.survey === null) {
        // Some engine tests interpret lines the service refuses (one-sided shooting, a
        // method not available yet): the service answers the validator's problems instead.
        expect(res.statusCode).toBe(400);
        expect(res.json().problems).toEqual(checked.problems);
        return;
      }
      expect(res.statusCode).toBe(200);
      expect(res.json()).toEqual(JSON.parse(JSON.stringify(interpret(survey))));
    });
  }

  it('also when stored and read back (POST and GET /api/v1/surveys)', async () => {
    const created = await postJson('/api/v1/surveys', { ...demo, options: { residuals: false, futureOption: 'kept' } });
    expect(created.statusCode).toBe(201);
    const expected = JSON.parse(JSON.stringify(interpret({ ...demo, options: { residuals: false } })));
    expect(created.json().interpretation).toEqual(expected);
    const read = await app.inject({ method: 'GET', url: `/api/v1/surveys/${created.json().id}` });
    expect(read.json().interpretation).toEqual(expected);
    // Unknown option keys are kept with the survey, and sent back.
    expect(read.json().survey.options).toEqual({ residuals: false, futureOption: 'kept' });
    expect(read.json().survey.geophones).toEqual(demo.geophones);
  });
});

describe('bad bodies answer the contract’s 400, never a 500', () => {
  it('names a wrong type deep in the document by its pointer, in words', async () => {
    const bad = structuredClone(demo) as unknown as { shots: { times: unknown[] }[] };
    bad.shots[2].times[7] = 'abc';
    const res = await postJson('/api/v1/interpretations', bad);
    expect(res.statusCode).toBe(400);
    const { error } = res.json();
    expect(error.code).toBe('invalid_survey');
    expect(error.path).toBe('/shots/2/times/7');
    expect(error.problems[0].message).toMatch(/is "abc"; it must be a number of milliseconds, or null for no pick\./);
    expect(error.problems).toEqual([expect.objectContaining({ code: 'time-not-number', path: '/shots/2/times/7' })]);
  });

  it.each([
    ['an option of the wrong type', { options: { layers: '2' } }, '/options/layers', 'layers-invalid'],
    ['a branch override missing a field', { options: { branchOverrides: [{ shot: 'W-end', side: 'left' }] } }, '/options/branchOverrides/0/directPicks', 'override-direct-picks-invalid'],
    ['a geophone that is a list', { geophones: [[0, 1], ...demo.geophones.slice(1)] }, '/geophones/0', 'geophone-not-object'],
    ['a name that is an object', { name: { first: 'Line' } }, '/name', 'name-not-string'],
  ])('%s', async (_what, change, path, code) => {
    const res = await postJson('/api/v1/interpretations', { ...demo, ...change });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.path).toBe(path);
    expect(res.json().error.problems.map((p: { code: string }) => p.code)).toContain(code);
  });

  it('answers malformed JSON with invalid_json', async () => {
    const res = await postJson('/api/v1/interpretations', '{"geophones": [ {"x": 0}, ');
    expect(res.statusCode).toBe(400);
    expect(res.json().error.code).toBe('invalid_json');
  });

  it('answers a huge times list by its length, without walking it', async () => {
    const huge = { ...demo, shots: [{ ...demo.shots[0], times: new Array(1_000_000).fill(0) }, ...demo.shots.slice(1)] };
    const res = await postJson('/api/v1/interpretations', huge);
    expect(res.statusCode).toBe(400);
    expect(res.json().error.problems).toEqual([expect.objectContaining({ code: 'times-length', path: '/shots/0/times' })]);
  });

  it('refuses the same body on every survey route alike, and stores nothing', async () => {
    const before = (await app.inject({ method: 'GET', url: '/api/v1/surveys' })).json().length;
    const bad = { ...demo, options: { pickUncertaintyMs: 0 } };
    for (const url of ['/api/v1/interpretations', '/api/v1/surveys', '/api/v1/previews/section.svg', '/api/v1/previews/traveltimes.svg']) {
      const res = await postJson(url, bad);
      expect(res.statusCode, url).toBe(400);
      expect(res.json().error, url).toMatchObject({ code: 'invalid_survey', path: '/options/pickUncertaintyMs' });
    }
    expect((await app.inject({ method: 'GET', url: '/api/v1/surveys' })).json()).toHaveLength(before);
  });

  it('answers a wrong query parameter with invalid_request and its pointer', async () => {
    const line = {
      model: { surface: [{ x: -5, elevation: 0 }, { x: 15, elevation: 0 }], layers: [{ velocity: 500 }] },
      layout: { geophoneCount: 4, firstX: 0, spacing: 2, shots: [{ x: -1 }] },
    };
    const res = await app.inject({ method: 'POST', url: '/api/v1/synthetic?interpret=maybe', headers: { 'content-type': 'application/json' }, payload: JSON.stringify(line) });
    expect(res.statusCode).toBe(400);
    expect(res.json().error).toMatchObject({ code: 'invalid_request', path: '/interpret' });
  });
});

describe('GET /api/v1/openapi.json', () => {
  // The rows of api-v1.md's endpoint table that exist today, and the routes the service adds.
  const contract: [string, string][] = [
    ['post', '/api/v1/interpretations'],
    ['post', '/api/v1/surveys'],
    ['get', '/api/v1/surveys'],
    ['get', '/api/v1/surveys/{id}'],
    ['get', '/api/v1/surveys/{id}/section.svg'],
    ['get', '/api/v1/surveys/{id}/traveltimes.svg'],
    ['get', '/api/v1/surveys/{id}/stations.csv'],
    ['get', '/share/{token}'],
    ['post', '/api/v1/surveys/{id}/revisions'],
    ['get', '/api/v1/openapi.json'],
    ['get', '/api/v1/surveys/{id}/section.pdf'],
    ['get', '/api/v1/surveys/{id}/traveltimes.pdf'],
    ['get', '/api/v1/surveys/{id}/section.png'],
    ['get', '/api/v1/surveys/{id}/traveltimes.png'],
    ['post', '/api/v1/gathers/picks'],
  ];
  const added: [string, string][] = [
    ['get', '/healthz'],
    ['get', '/api/v1/surveys/{id}/interpretation.json'],
    ['get', '/api/v1/surveys/{id}/section-sheets.json'],
    ['get', '/api/v1/surveys/{id}/grm.svg'],
    ['get', '/api/v1/surveys/{id}/methods.svg'],
    ['get', '/api/v1/surveys/{id}/methods.json'],
    ['post', '/api/v1/previews/methods'],
    ['post', '/api/v1/surveys/{id}/share'],
    ['delete', '/api/v1/surveys/{id}/share'],
    ['post', '/api/v1/previews'],
    ['post', '/api/v1/previews/section.svg'],
    ['post', '/api/v1/previews/traveltimes.svg'],
    ['post', '/api/v1/synthetic'],
    ['get', '/share/{token}/section.svg'],
    ['get', '/share/{token}/traveltimes.svg'],
    ['get', '/share/{token}/stations.csv'],
    ['get', '/share/{token}/section.pdf'],
    ['get', '/share/{token}/section.png'],
    ['get', '/share/{token}/traveltimes.pdf'],
    ['get', '/share/{token}/traveltimes.png'],
    ['get', '/share/{token}/methods.svg'],
    ['get', '/share/{token}/methods.pdf'],
    ['get', '/share/{token}/methods.png'],
    ['get', '/api/v1/surveys/{id}/methods.pdf'],
    ['get', '/api/v1/surveys/{id}/methods.png'],
    ['post', '/api/v1/surveys/gathers'],
    ['post', '/api/v1/surveys/{id}/gathers'],
    ['get', '/api/v1/surveys/{id}/gathers/{shotId}/traces'],
  ];
  let doc: { openapi: string; paths: Record<string, Record<string, any>> };
  beforeAll(async () => {
    const res = await app.inject({ method: 'GET', url: '/api/v1/openapi.json' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    doc = res.json();
  });

  it('is OpenAPI 3 and lists every route, and no other', () => {
    expect(doc.openapi).toMatch(/^3\./);
    const listed = Object.entries(doc.paths).flatMap(([path, item]) => Object.keys(item).filter((k) => k !== 'parameters').map((m) => `${m} ${path}`));
    expect(listed.sort()).toEqual([...contract, ...added].map(([m, p]) => `${m} ${p}`).sort());
  });

  it('gives every route a response schema for its success', () => {
    for (const [method, path] of [...contract, ...added]) {
      const responses = doc.paths[path][method].responses as Record<string, any>;
      const ok = Object.entries(responses).find(([status]) => status.startsWith('2'));
      expect(ok, `${method} ${path}`).toBeDefined();
      if (ok![0] !== '204') expect(Object.values(ok![1].content ?? {}).length, `${method} ${path}`).toBeGreaterThan(0);
    }
  });

  it('gives the survey routes both request bodies and the interpretation’s full schema', () => {
    for (const path of ['/api/v1/interpretations', '/api/v1/surveys', '/api/v1/surveys/{id}/revisions', '/api/v1/previews', '/api/v1/previews/section.svg']) {
      const body = doc.paths[path].post.requestBody.content;
      expect(Object.keys(body).sort(), path).toEqual(['application/json', 'text/csv']);
      expect(Object.keys(body['application/json'].schema.properties), path).toEqual(['name', 'date', 'geophones', 'shots', 'options']);
      expect(doc.paths[path].post.responses['400'].content['application/json'].schema.properties.error.required).toEqual(['code', 'message', 'path']);
    }
    const interpretation = doc.paths['/api/v1/interpretations'].post.responses['200'].content['application/json'].schema;
    expect(interpretation.additionalProperties).toBe(false);
    expect(Object.keys(interpretation.properties.stations.items.properties)).toContain('delaySources');
    expect(doc.paths['/api/v1/surveys/{id}'].get.parameters.map((p: { name: string; in: string }) => `${p.in} ${p.name}`).sort()).toEqual(['path id', 'query revision']);
    expect(doc.paths['/api/v1/synthetic'].post.requestBody.content['application/json'].schema.properties).toHaveProperty('model');
  });
});
