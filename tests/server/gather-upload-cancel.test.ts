/**
 * A gather upload whose client leaves before the service has picked and interpreted it
 * stores nothing (the page's Cancel, web/gather-drop.js, relies on it). Made deterministic
 * without timing: the pool's one thread is kept busy by a large line, so the upload waits
 * in the queue; the client aborts while it waits; the next upload is then stored alone.
 */
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { demoGathers } from '../../engine/samples/demo-gathers.js';
import type { Survey } from '../../engine/survey/survey.js';
import { planarSurvey } from '../helpers/planar-survey.js';

/** A flat two-layer line (closed-form times, tests/helpers/planar-survey.ts) of 1,024 geophones and 64 shots: long to interpret. */
function heavyLine(): Survey {
  const geophoneXsM = Array.from({ length: 1024 }, (_, i) => 2 * i);
  const last = geophoneXsM[geophoneXsM.length - 1];
  const layout = { geophoneXsM, shots: Array.from({ length: 64 }, (_, k) => ({ id: `S${k}`, xM: -1 + ((last + 2) * k) / 63 })), groundElevationM: () => 100 };
  const survey = planarSurvey({ v1: 600, v2: 2400, refractorElevationAtZero: 94, dipDegrees: 0 }, layout);
  return { ...survey, shots: survey.shots.map((s) => ({ ...s, times: s.times.map((t) => (t === null ? null : Math.round(t * 100) / 100)) })) };
}

describe('a gather upload cancelled by its client', () => {
  let app: FastifyInstance;
  let base = '';
  beforeAll(async () => {
    app = await buildApp({ dataDir: ':memory:', webRoot: null, bodyLimitBytes: 8 * 1024 * 1024, compute: { threads: 1, maxQueued: 4, timeLimitMs: 120_000 } });
    await app.listen({ host: '127.0.0.1', port: 0 });
    base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
  });
  afterAll(async () => {
    await app.close();
  });

  it('stores nothing when the client leaves while the file waits to be picked; the next upload is stored alone', async () => {
    const file = { bytes: Buffer.from(demoGathers()[0].bytes) };
    // The heavy line takes the only thread at once (run from here, not over HTTP, so it is surely first).
    const busy = app.compute.run('interpret', { survey: heavyLine() });
    expect(app.compute.queued).toBe(0);
    const controller = new AbortController();
    const upload = fetch(`${base}/api/v1/surveys/gathers?shotId=W-off&name=cancelled`, {
      method: 'POST',
      headers: { 'content-type': 'application/octet-stream' },
      body: file.bytes,
      signal: controller.signal,
    }).then(
      (r) => `answered ${r.status}`,
      () => 'aborted',
    );
    // The file is read by the service and waits for the busy thread.
    for (let i = 0; i < 500 && app.compute.queued === 0; i++) await new Promise((r) => setTimeout(r, 10));
    expect(app.compute.queued).toBe(1);
    controller.abort();
    expect(await upload).toBe('aborted');
    expect((await busy).stations.length).toBeGreaterThan(0);

    const next = await fetch(`${base}/api/v1/surveys/gathers?shotId=W-off&name=kept`, { method: 'POST', headers: { 'content-type': 'application/octet-stream' }, body: file.bytes });
    expect(next.status).toBe(201);
    expect(app.store.listSurveys().map((s) => s.name)).toEqual(['kept']);
    expect(app.store.countRows()).toMatchObject({ surveys: 1, revisions: 1, gathers: 1 });
  });
});
