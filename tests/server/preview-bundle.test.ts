// POST /api/v1/previews: the page's one request per Interpret. It must interpret the line
// exactly once and answer that interpretation together with both drawings of it, with the
// same errors as every other door that takes a survey.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';

// Counts the interpretations the app asks its compute pool for (server/compute/tasks.ts:
// the "interpret" and "preview" tasks each interpret the line exactly once; the work itself
// is real and runs in a worker thread): the count is the evidence that the route
// interprets once, independent of timing.
const calls = { interpret: 0 };
const INTERPRETING_TASKS = new Set(['interpret', 'preview']);

const { buildApp } = await import('../../server/app.js');

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');
const demoCsvText = readFileSync(new URL('../../samples/demo-line.csv', import.meta.url), 'utf8');
const flatJsonText = readFileSync(new URL('../../samples/flat-line.json', import.meta.url), 'utf8');

interface Bundle {
  interpretation: { stations: unknown[]; qc: { residuals?: unknown } };
  sectionSvg: string;
  sectionSheets: string[];
  travelTimesSvg: string;
}

let app: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
  const run = app.compute.run.bind(app.compute);
  app.compute.run = ((name, input, cancel) => {
    if (INTERPRETING_TASKS.has(name)) calls.interpret += 1;
    return run(name, input, cancel);
  }) as typeof app.compute.run;
});
afterAll(async () => {
  await app.close();
});
beforeEach(() => {
  calls.interpret = 0;
});

type BodyParser = Parameters<request.Test['parse']>[0];
type StreamParser = Extract<BodyParser, (res: never, callback: never) => void>;
const asText: StreamParser = (res, done) => {
  let text = '';
  res.on('data', (chunk: Buffer) => (text += chunk.toString('utf8')));
  res.on('end', () => done(null, text));
};

function postBundle(target: FastifyInstance, contentType: string, body: string | object) {
  return request(target.server).post('/api/v1/previews').set('Content-Type', contentType).send(body);
}

describe('POST /api/v1/previews', () => {
  it('interprets once and answers that interpretation with both drawings of it', async () => {
    const res = await postBundle(app, 'application/json', demoJsonText);
    expect(calls.interpret).toBe(1);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    expect(res.headers['cache-control']).toBe('no-store');
    const bundle = res.body as Bundle;
    expect(Object.keys(bundle).sort()).toEqual(['interpretation', 'sectionSheets', 'sectionSvg', 'travelTimesSvg']);
    // Demo A fits one sheet: the sheets are that one drawing.
    expect(bundle.sectionSheets).toEqual([bundle.sectionSvg]);
    // The forward check ran in that one interpretation (the page shows its RMS).
    expect(bundle.interpretation.qc.residuals).toBeDefined();

    // The same answers the three single-purpose routes give, which cost one interpretation each.
    calls.interpret = 0;
    const alone = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'application/json').send(demoJsonText);
    const section = await request(app.server).post('/api/v1/previews/section.svg').set('Content-Type', 'application/json').send(demoJsonText).buffer(true).parse(asText);
    const travelTimes = await request(app.server).post('/api/v1/previews/traveltimes.svg').set('Content-Type', 'application/json').send(demoJsonText).buffer(true).parse(asText);
    expect(calls.interpret).toBe(3);
    expect(bundle.interpretation).toEqual(alone.body);
    expect(bundle.sectionSvg).toBe(section.body);
    expect(bundle.travelTimesSvg).toBe(travelTimes.body);
    expect(bundle.sectionSvg).not.toBe(bundle.travelTimesSvg);
    expect(bundle.sectionSvg).toMatch(/^\s*(<\?xml[^>]*\?>\s*)?<svg[\s>]/);
  });

  it('draws a pick table as it draws the same line sent as JSON, still with one interpretation', async () => {
    const fromCsv = await postBundle(app, 'text/csv; charset=utf-8', demoCsvText);
    expect(calls.interpret).toBe(1);
    const fromJson = await postBundle(app, 'application/json', demoJsonText);
    expect(fromCsv.status).toBe(200);
    expect(fromCsv.body).toEqual(fromJson.body);
  });

  it('keeps user text escaped inside the drawings', async () => {
    const survey = JSON.parse(flatJsonText);
    survey.name = 'Line <script>alert(1)</script> & "north"';
    const res = await postBundle(app, 'application/json', survey);
    expect(res.status).toBe(200);
    for (const svg of [(res.body as Bundle).sectionSvg, (res.body as Bundle).travelTimesSvg]) {
      expect(svg).toContain('Line &lt;script&gt;alert(1)&lt;/script&gt; &amp;');
      expect(svg).not.toContain('<script');
    }
  });

  it('stores nothing and needs no write token', async () => {
    const guarded = await buildApp({ dataDir: ':memory:', writeToken: 'bundle-test-token-9e41c7a2b5d80f36' });
    try {
      await guarded.ready();
      expect((await postBundle(guarded, 'application/json', flatJsonText)).status).toBe(200);
      expect(guarded.store.countRows().surveys).toBe(0);
      expect(guarded.store.countRows()).toEqual((await buildEmptyCounts()));
    } finally {
      await guarded.close();
    }
  });

  it('answers the contract\'s 400 naming the field of a bad survey, and interprets nothing', async () => {
    const bad = JSON.parse(flatJsonText);
    bad.shots[1].times[5] = -4;
    const res = await postBundle(app, 'application/json', bad);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_survey');
    expect((res.body.problems as { path: string }[]).map((p) => p.path)).toContain('/shots/1/times/5');
    expect(calls.interpret).toBe(0);
  });

  it('answers 400 for a bad pick table line, an empty body, broken JSON and a form body', async () => {
    const lines = demoCsvText.split('\n');
    const firstDataLine = lines.findIndex((line) => /^W-off,/.test(line));
    lines[firstDataLine] = lines[firstDataLine].replace(/,[^,]*$/, ',soon');
    const table = await postBundle(app, 'text/csv', lines.join('\n'));
    expect(table.status).toBe(400);
    expect(table.body.error.code).toBe('invalid_pick_table');
    expect(table.body.error.path).toBe(`/csv/line/${firstDataLine + 1}/time_ms`);
    const empty = await postBundle(app, 'application/json', '');
    expect([empty.status, empty.body.error.code]).toEqual([400, 'empty_body']);
    const broken = await postBundle(app, 'application/json', '{"name": ');
    expect([broken.status, broken.body.error.code]).toEqual([400, 'invalid_json']);
    const form = await postBundle(app, 'application/x-www-form-urlencoded', 'a=1');
    expect([form.status, form.body.error.code]).toEqual([400, 'unsupported_content_type']);
    expect(calls.interpret).toBe(0);
  });

  it('answers 413 body_too_large for a body over the limit', async () => {
    const small = await buildApp({ dataDir: ':memory:', bodyLimitBytes: 16 * 1024 });
    try {
      await small.ready();
      const res = await postBundle(small, 'text/csv', `# ${'y'.repeat(16 * 1024)}\n${demoCsvText}`);
      expect(res.status).toBe(413);
      expect(res.body.error.code).toBe('body_too_large');
    } finally {
      await small.close();
    }
  });
});

/** Row counts of a store nothing was written to. */
async function buildEmptyCounts() {
  const empty = await buildApp({ dataDir: ':memory:' });
  try {
    await empty.ready();
    return empty.store.countRows();
  } finally {
    await empty.close();
  }
}
