// POST /api/v1/synthetic: synthetic lines through a model, the contract's 400s, the
// optional interpretation, and the blind-zone notes.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import type { SyntheticRequest } from '../../engine/forward/synthetic-request.js';

let app: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:', webRoot: null });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

/** A small, quick line: 24 geophones at 2 m over a flat refractor 5 m down; 0.5 m cells. */
function twoLayerRequest(): SyntheticRequest {
  return {
    model: {
      surface: [{ x: 0, elevation: 50 }],
      layers: [{ velocity: 500 }, { velocity: 2000, top: [{ x: 0, elevation: 45 }] }],
    },
    layout: {
      geophoneCount: 24,
      firstX: 0,
      spacing: 2,
      shots: [{ x: -10, id: 'W-off' }, { x: -1, id: 'W-end' }, { x: 47, id: 'E-end' }, { x: 56, id: 'E-off' }],
      name: 'route test',
    },
    noiseMs: 0.1,
    seed: 3,
    cellM: 0.5,
  };
}

const post = (body: unknown, query = '') =>
  request(app.server).post(`/api/v1/synthetic${query}`).set('Content-Type', 'application/json').send(JSON.stringify(body));

describe('POST /api/v1/synthetic', () => {
  it('answers 200 with the survey document the engine makes for the request', async () => {
    const body = twoLayerRequest();
    const res = await post(body);
    expect(res.status).toBe(200);
    const expected = syntheticSurvey(body.model, body.layout, { noiseMs: body.noiseMs, seed: body.seed, cellM: body.cellM });
    expect(res.body.geophones).toEqual(expected.geophones);
    expect(res.body.shots).toEqual(expected.shots);
    expect(res.body.name).toBe('route test');
    // A valid survey document, ready to post to /api/v1/interpretations.
    expect(validateSurvey(res.body).problems).toEqual([]);
  });

  it('says the layout sees the refractor of a plain two-layer model', async () => {
    const res = await post(twoLayerRequest());
    expect(res.body.refractors).toHaveLength(1);
    expect(res.body.refractors[0].layer).toBe(1);
    expect(res.body.refractors[0].seen).toBe(true);
    // Beyond the crossover distance (2h·√((V2+V1)/(V2−V1)) ≈ 12.9 m, Kearey et al. 2002 ch. 5)
    // the head wave arrives first: most traces of this layout.
    expect(res.body.refractors[0].firstArrivals).toBeGreaterThan(res.body.refractors[0].traces / 2);
    expect(res.body.notes).toEqual([]);
  });

  it('notes a hidden layer: a velocity inversion gives no first arrival', async () => {
    const body = twoLayerRequest();
    body.model.layers = [
      { velocity: 800 },
      { velocity: 500, top: [{ x: 0, elevation: 47 }] },
      { velocity: 2500, top: [{ x: 0, elevation: 44 }] },
    ];
    const res = await post(body);
    expect(res.status).toBe(200);
    const [first, second] = res.body.refractors;
    expect(first).toMatchObject({ layer: 1, seen: false, firstArrivals: 0 });
    expect(second).toMatchObject({ layer: 2, seen: true });
    expect(res.body.notes).toHaveLength(1);
    expect(res.body.notes[0]).toMatchObject({ code: 'refractor-not-seen', layer: 1 });
  });

  it('notes a thin layer whose head waves are overtaken by the deeper refractor everywhere', async () => {
    const body = twoLayerRequest();
    body.model.layers = [
      { velocity: 500 },
      { velocity: 900, top: [{ x: 0, elevation: 46 }] },
      { velocity: 4000, top: [{ x: 0, elevation: 45.6 }] },
    ];
    const res = await post(body);
    expect(res.body.refractors.find((r: { layer: number }) => r.layer === 1).seen).toBe(false);
    expect(res.body.refractors.find((r: { layer: number }) => r.layer === 2).seen).toBe(true);
  });

  it('with ?interpret=true returns the survey and its interpretation, residuals included', async () => {
    const res = await post(twoLayerRequest(), '?interpret=true');
    expect(res.status).toBe(200);
    expect(res.body.survey.geophones).toHaveLength(24);
    expect(res.body.interpretation.stations).toHaveLength(24);
    expect(res.body.interpretation.qc.residuals.perShot).toHaveLength(4);
    // 0.1 ms of pick noise: the residuals stay well inside 0.5 ms.
    expect(res.body.interpretation.qc.residuals.rmsMs).toBeLessThan(0.5);
    expect(res.body.refractors[0].seen).toBe(true);
  });

  it('answers 400 with the first problem\'s path and every problem listed', async () => {
    const body = twoLayerRequest() as unknown as Record<string, any>;
    body.layout.spacing = -2;
    body.noiseMs = 'loud';
    const res = await post(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_request');
    expect(res.body.error.path).toBe('/layout/spacing');
    expect(res.body.error.message).toBe('The synthetic-line request has 2 problems.');
    expect(res.body.problems[0].message).toMatch(/spacing/);
    const paths = res.body.problems.map((p: { path: string }) => p.path);
    expect(paths).toEqual(expect.arrayContaining(['/layout/spacing', '/noiseMs']));
  });

  it('answers 400 for a bad model vertex, naming it', async () => {
    const body = twoLayerRequest() as unknown as Record<string, any>;
    body.model.layers[1].top[0].elevation = 'deep';
    const res = await post(body);
    expect(res.status).toBe(400);
    expect(res.body.error.path).toBe('/model/layers/1/top/0/elevation');
  });

  it('answers 400 for a body that is not an object, an empty body and bad JSON', async () => {
    const arrayBody = await post([1, 2]);
    expect(arrayBody.status).toBe(400);
    expect(arrayBody.body.error.code).toBe('invalid_request');
    const empty = await request(app.server).post('/api/v1/synthetic').set('Content-Type', 'application/json').send('');
    expect(empty.status).toBe(400);
    expect(empty.body.error.code).toBe('empty_body');
    const broken = await request(app.server).post('/api/v1/synthetic').set('Content-Type', 'application/json').send('{"model": ');
    expect(broken.status).toBe(400);
    expect(broken.body.error.code).toBe('invalid_json');
  });

  it('answers 400 for a request too large to compute, before computing it', async () => {
    const body = twoLayerRequest();
    body.cellM = 0.05;
    body.layout.geophoneCount = 1000;
    const res = await post(body);
    expect(res.status).toBe(400);
    expect(['/cellM', '/layout/shots']).toContain(res.body.error.path);
  });

  it('rejects an interpret flag that is not a boolean', async () => {
    const res = await post(twoLayerRequest(), '?interpret=maybe');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_request');
  });
});
