// options.method "time-term" through the service (api-v1.md: `method` is "plus-minus",
// "grm" or "time-term", echoed at the top level; Willmore & Bancroft 1960 for the method):
// the interpretation carries the inversion's block and the section names the method; a bad
// method value and time terms with three layers forced get a 400 naming options.method.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { memoryApp } from '../helpers/memory-app.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8'));
const withOptions = (options: Record<string, unknown>) => JSON.stringify({ ...demo, options: { ...(demo.options ?? {}), ...options } });

const server = memoryApp({ webRoot: undefined });
const post = (path: string, body: string) => request(server.app.server).post(path).set('Content-Type', 'application/json').send(body);

describe('options.method "time-term"', () => {
  it('interprets by time terms on POST /api/v1/interpretations: method echoed, the inversion in `timeTerm`, depths with their σ', async () => {
    const res = await post('/api/v1/interpretations', withOptions({ method: 'time-term' }));
    expect(res.status).toBe(200);
    expect(res.body.method).toBe('time-term');
    expect(res.body.stations).toHaveLength(demo.geophones.length);
    const tt = res.body.timeTerm;
    expect(tt.picks).toBeGreaterThan(tt.unknowns);
    expect(tt.segments.length).toBeGreaterThanOrEqual(1);
    expect(tt.shots.map((s: { shot: string }) => s.shot)).toEqual(demo.shots.map((s: { id: string }) => s.id));
    const withDepth = res.body.stations.filter((s: { depth: number | null }) => s.depth !== null);
    expect(withDepth.length).toBeGreaterThan(demo.geophones.length / 2);
    for (const s of withDepth) expect(s.depthUncertainty).toBeGreaterThan(0);
  });

  it('names the method in the section title block of the preview', async () => {
    const res = await post('/api/v1/previews', withOptions({ method: 'time-term' }));
    expect(res.status).toBe(200);
    expect(res.body.sectionSvg).toContain('time-term method');
  });

  it('refuses an unknown method with a 400 naming options.method', async () => {
    const res = await post('/api/v1/interpretations', withOptions({ method: 'time-terms' }));
    expect(res.status).toBe(400);
    expect(res.body.error.path).toBe('/options/method');
    expect(res.body.error.problems[0].message).toContain('options.method');
    expect(res.body.error.problems[0].message).toContain('"time-term"');
  });

  it('refuses time terms with three layers forced, saying why', async () => {
    const res = await post('/api/v1/interpretations', withOptions({ method: 'time-term', layers: 3 }));
    expect(res.status).toBe(400);
    expect(res.body.error.path).toBe('/options/method');
    expect(res.body.error.problems.map((p: { code: string }) => p.code)).toContain('method-two-layer-only');
    expect(res.body.error.problems[0].message).toContain('two-layer');
  });
});
