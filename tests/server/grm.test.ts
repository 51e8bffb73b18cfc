// options.method "grm" through the service (api-v1.md: method echoed at the top level;
// Palmer 1980 for the functions): the interpretation carries the XY functions, the stored
// line draws them, and the preview bundle has them (time-term: tests/server/time-term.test.ts).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { memoryApp } from '../helpers/memory-app.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8'));
const withMethod = (method: string) => JSON.stringify({ ...demo, options: { ...(demo.options ?? {}), method } });
const asText = (r: request.Response, cb: (err: Error | null, body: unknown) => void) => {
  let text = '';
  r.on('data', (c: Buffer) => (text += c.toString('utf8')));
  r.on('end', () => cb(null, text));
};

const server = memoryApp({ webRoot: undefined });

describe('options.method "grm"', () => {
  it('interprets by GRM: method echoed, the XY functions in `grm`, one station per geophone', async () => {
    const res = await request(server.app.server).post('/api/v1/interpretations').set('Content-Type', 'application/json').send(withMethod('grm'));
    expect(res.status).toBe(200);
    expect(res.body.method).toBe('grm');
    expect(res.body.stations).toHaveLength(demo.geophones.length);
    const grm = res.body.grm;
    expect(grm.xyFunctions[0].xy).toBe(0);
    expect(grm.xyFunctions.length).toBeGreaterThanOrEqual(5);
    expect(grm.xyFunctions.map((f: { xy: number }) => f.xy)).toContain(grm.optimumXy);
    expect(grm.criterion).toContain('Palmer 1980');
    for (const f of grm.xyFunctions) expect(f.stations.length).toBeGreaterThan(0);
  });

  it('leaves a plus-minus answer without `grm`', async () => {
    const res = await request(server.app.server).post('/api/v1/interpretations').set('Content-Type', 'application/json').send(withMethod('plus-minus'));
    expect(res.status).toBe(200);
    expect(res.body.method).toBe('plus-minus');
    expect(res.body.grm).toBeUndefined();
  });

  it('draws the stored line\'s GRM functions, and says there are none for a plus-minus line', async () => {
    const stored = await request(server.app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(withMethod('grm'));
    expect(stored.status).toBe(201);
    const res = await request(server.app.server).get(`/api/v1/surveys/${stored.body.id}/grm.svg`).buffer(true).parse(asText);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
    expect(res.body as string).toContain('data-role="xy-optimum"');
    expect(res.body as string).toContain('generalised reciprocal method');
    const pm = await request(server.app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send(withMethod('plus-minus'));
    const none = await request(server.app.server).get(`/api/v1/surveys/${pm.body.id}/grm.svg`).buffer(true).parse(asText);
    expect(none.status).toBe(200);
    expect(none.body as string).toContain('data-role="grm-none"');
  });

  it('puts the GRM functions in the preview bundle only for a GRM line', async () => {
    const grm = await request(server.app.server).post('/api/v1/previews').set('Content-Type', 'application/json').send(withMethod('grm'));
    expect(grm.status).toBe(200);
    expect(grm.body.grmSvg).toMatch(/<svg[\s>]/);
    expect(grm.body.sectionSvg).toContain('generalised reciprocal method');
    const pm = await request(server.app.server).post('/api/v1/previews').set('Content-Type', 'application/json').send(withMethod('plus-minus'));
    expect(pm.body.grmSvg).toBeUndefined();
  });
});
