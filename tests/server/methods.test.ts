// The method comparison through the service: GET /api/v1/surveys/:id/methods.svg and
// methods.json for a stored line, POST /api/v1/previews/methods for one that is not; the
// same survey door (a bad line answers the contract's 400).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { memoryApp } from '../helpers/memory-app.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { ModelPoint } from '../../engine/forward/model.js';
import { CELL_M, LAYOUT, SEVEN_SHOTS, level } from '../reference/structure-lines.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8'));
const server = memoryApp({ webRoot: undefined });
const asText = (r: request.Response, cb: (err: Error | null, body: unknown) => void) => {
  let text = '';
  r.on('data', (c: Buffer) => (text += c.toString('utf8')));
  r.on('end', () => cb(null, text));
};

describe('method comparison routes', () => {
  it('draws a stored line by every method: three refractors in three line styles, the legend and the cautions', async () => {
    const stored = await request(server.app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(JSON.stringify(demo));
    expect(stored.status).toBe(201);
    const res = await request(server.app.server).get(`/api/v1/surveys/${stored.body.id}/methods.svg`).buffer(true).parse(asText);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
    const svg = res.body as string;
    for (const m of ['plus-minus', 'grm', 'time-term']) expect(svg).toContain(`data-role="method-refractor" data-method="${m}"`);
    expect(svg).toContain('stroke-dasharray="2.2 1.1"');
    expect(svg).toContain('(dashed)');
    expect(svg).toContain('(dotted)');
    // Every caution, word for word, as on every section (DESIGN.md).
    const words = svg.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    for (const c of CAUTIONS) expect(words).toContain(c);

    const json = await request(server.app.server).get(`/api/v1/surveys/${stored.body.id}/methods.json`);
    expect(json.status).toBe(200);
    expect(json.body.comparison.runs.map((r: { method: string; ran: boolean }) => [r.method, r.ran])).toEqual([
      ['plus-minus', true],
      ['grm', true],
      ['time-term', true],
    ]);
    expect(Array.isArray(json.body.comparison.differences)).toBe(true);
    expect(json.body.methodsSvg).toMatch(/<svg[\s>]/);
  });

  it('lists methods.svg among a stored revision\'s links, and the link answers that revision\'s comparison', async () => {
    const stored = await request(server.app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(JSON.stringify(demo));
    expect(stored.body.links.methods).toBe(`/api/v1/surveys/${stored.body.id}/methods.svg`);
    const revised = await request(server.app.server).post(`/api/v1/surveys/${stored.body.id}/revisions`).set('Content-Type', 'application/json').send(JSON.stringify(demo));
    expect(revised.status).toBe(201);
    // An older revision's links name it; the latest's do not need to.
    const first = await request(server.app.server).get(`/api/v1/surveys/${stored.body.id}?revision=1`);
    expect(first.body.links.methods).toBe(`/api/v1/surveys/${stored.body.id}/methods.svg?revision=1`);
    const svg = await request(server.app.server).get(first.body.links.methods).buffer(true).parse(asText);
    expect(svg.status).toBe(200);
    expect(svg.body as string).toContain('data-role="method-refractor"');
    const latest = await request(server.app.server).get(`/api/v1/surveys/${stored.body.id}`);
    expect(latest.body.links.methods).toBe(`/api/v1/surveys/${stored.body.id}/methods.svg`);
  });

  it('compares a line that is not stored (POST /api/v1/previews/methods), and refuses a bad one with the contract 400', async () => {
    const res = await request(server.app.server).post('/api/v1/previews/methods').set('Content-Type', 'application/json').send(JSON.stringify(demo));
    expect(res.status).toBe(200);
    expect(res.body.comparison.runs).toHaveLength(3);
    const bad = await request(server.app.server).post('/api/v1/previews/methods').set('Content-Type', 'application/json').send(JSON.stringify({ ...demo, options: { method: 'best' } }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.path).toBe('/options/method');
  });

  it('sends the stretches where methods differ (an undulating eikonal line, ±1.5 m over 40 m, 0.2 ms of seeded noise), each beyond its combined σ', async () => {
    const top: ModelPoint[] = [{ x: -1000, elevation: 92 }];
    for (let x = -40; x <= 140; x++) top.push({ x, elevation: 92 + 1.5 * Math.sin((2 * Math.PI * x) / 40) });
    top.push({ x: 1000, elevation: 92 });
    const line = syntheticSurvey({ surface: level(100), layers: [{ velocity: 600 }, { velocity: 2400, top }] }, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M, noiseMs: 0.2, seed: 3 });
    const res = await request(server.app.server).post('/api/v1/previews/methods').set('Content-Type', 'application/json').send(JSON.stringify(line));
    expect(res.status).toBe(200);
    const differences = res.body.comparison.differences as { methods: string[]; largest: number; combinedSigma: number }[];
    expect(differences.length).toBeGreaterThan(0);
    for (const d of differences) {
      expect(d.methods).toHaveLength(2);
      expect(d.largest).toBeGreaterThan(d.combinedSigma);
    }
  });

  it('answers 404 for a line that does not exist', async () => {
    const res = await request(server.app.server).get('/api/v1/surveys/no-such-line/methods.svg');
    expect(res.status).toBe(404);
  });
});
