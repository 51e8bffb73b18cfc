// The method comparison through the service: GET /api/v1/surveys/:id/methods.svg and
// methods.json for a stored line, POST /api/v1/previews/methods for one that is not; the
// same survey door (a bad line answers the contract's 400).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { memoryApp } from '../helpers/memory-app.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';

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

  it('compares a line that is not stored (POST /api/v1/previews/methods), and refuses a bad one with the contract 400', async () => {
    const res = await request(server.app.server).post('/api/v1/previews/methods').set('Content-Type', 'application/json').send(JSON.stringify(demo));
    expect(res.status).toBe(200);
    expect(res.body.comparison.runs).toHaveLength(3);
    const bad = await request(server.app.server).post('/api/v1/previews/methods').set('Content-Type', 'application/json').send(JSON.stringify({ ...demo, options: { method: 'best' } }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.path).toBe('/options/method');
  });

  it('answers 404 for a line that does not exist', async () => {
    const res = await request(server.app.server).get('/api/v1/surveys/no-such-line/methods.svg');
    expect(res.status).toBe(404);
  });
});
