/**
 * The compute pool's promises (server/compute/pool.ts): computations run off the event
 * loop, a full queue answers 503 with Retry-After, a computation past the time limit is
 * stopped and answered with the documented error leaving the store untouched, a client
 * that leaves cancels its work, a trickled body is cut off, and the service keeps
 * answering throughout. No assertion is on elapsed time: each checks an outcome.
 */
import { connect } from 'node:net';
import type { AddressInfo } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp, type AppOptions } from '../../server/app.js';
import { RETRY_AFTER_S } from '../../server/errors.js';
import type { Survey } from '../../engine/survey/survey.js';
import { planarSurvey } from '../helpers/planar-survey.js';

/** A flat two-layer line of `geophones` at 2 m with `shots` evenly spread: heavy when large. */
function longLine(geophones: number, shots: number): Survey {
  const geophoneXsM = Array.from({ length: geophones }, (_, i) => 2 * i);
  const last = geophoneXsM[geophoneXsM.length - 1];
  const layout = {
    geophoneXsM,
    shots: Array.from({ length: shots }, (_, k) => ({ id: `S${k}`, xM: -1 + ((last + 2) * k) / (shots - 1) })),
    groundElevationM: () => 100,
  };
  const survey = planarSurvey({ v1: 600, v2: 2400, refractorElevationAtZero: 94, dipDegrees: 0 }, layout);
  return { ...survey, shots: survey.shots.map((s) => ({ ...s, times: s.times.map((t) => (t === null ? null : Math.round(t * 100) / 100)) })) };
}

const SMALL = longLine(24, 5);
const HEAVY = longLine(1024, 64);

let apps: FastifyInstance[] = [];
async function app(options: Partial<AppOptions>): Promise<FastifyInstance> {
  const a = await buildApp({ dataDir: ':memory:', bodyLimitBytes: 8 * 1024 * 1024, ...options });
  apps.push(a);
  await a.ready();
  return a;
}
afterEach(async () => {
  await Promise.all(apps.map((a) => a.close()));
  apps = [];
});

/** Resolves with whether `promise` is still pending after `probe` settles. */
async function stillPendingAfter(promise: Promise<unknown>, probe: Promise<unknown>): Promise<boolean> {
  let settled = false;
  void promise.then(
    () => (settled = true),
    () => (settled = true),
  );
  await probe;
  return !settled;
}

describe('the compute pool', () => {
  it('answers /healthz and store reads while a maximum-size line is being interpreted', async () => {
    const a = await app({ compute: { threads: 1, timeLimitMs: 60_000 } });
    const long = request(a.server).post('/api/v1/interpretations').send(HEAVY).then((r) => r.status);
    // Give the heavy request time to reach its worker, then ask for the cheap things.
    await new Promise((r) => setTimeout(r, 300));
    const health = request(a.server).get('/healthz');
    expect(await stillPendingAfter(long, health)).toBe(true);
    expect((await health).status).toBe(200);
    const list = await request(a.server).get('/api/v1/surveys');
    expect(list.status).toBe(200);
    await a.close();
  });

  it('answers 503 with Retry-After and the contract body when every thread is busy and the queue is full', async () => {
    const a = await app({ compute: { threads: 1, maxQueued: 0, timeLimitMs: 60_000 } });
    const long = request(a.server).post('/api/v1/interpretations').send(HEAVY);
    void long.then(() => undefined);
    await new Promise((r) => setTimeout(r, 300));
    const busy = await request(a.server).post('/api/v1/interpretations').send(SMALL);
    expect(busy.status).toBe(503);
    expect(busy.headers['retry-after']).toBe(String(RETRY_AFTER_S));
    expect(busy.body.error.code).toBe('service_busy');
    expect(busy.body.error.message).toMatch(/busy/);
  });

  it('stops a computation past the time limit, names the limit, stores nothing, and keeps answering', async () => {
    const a = await app({ compute: { threads: 1, timeLimitMs: 1000 } });
    const before = await request(a.server).get('/api/v1/surveys');
    const slow = await request(a.server).post('/api/v1/surveys').send(HEAVY);
    expect(slow.status).toBe(422);
    expect(slow.body.error.code).toBe('compute_time_limit');
    expect(slow.body.error.message).toContain('limit of 1 s');
    const after = await request(a.server).get('/api/v1/surveys');
    expect(after.body).toEqual(before.body);
    // The worker was replaced: the next line is interpreted.
    const next = await request(a.server).post('/api/v1/interpretations').send(SMALL);
    expect(next.status).toBe(200);
    expect(next.body.stations).toHaveLength(24);
  });

  it('cancels the work of a client that disconnects, freeing its thread', async () => {
    const a = await app({ compute: { threads: 1, maxQueued: 0, timeLimitMs: 60_000 } });
    await a.listen({ host: '127.0.0.1', port: 0 });
    const { port } = a.server.address() as AddressInfo;
    const controller = new AbortController();
    const gone = fetch(`http://127.0.0.1:${port}/api/v1/interpretations`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(HEAVY),
      signal: controller.signal,
    }).catch(() => 'aborted');
    await new Promise((r) => setTimeout(r, 300));
    controller.abort();
    expect(await gone).toBe('aborted');
    // Without cancellation the only thread would stay busy for the whole heavy line and
    // this would answer 503 (queue 0); with it, the thread is soon free again.
    let status = 0;
    for (let attempt = 0; attempt < 50 && status !== 200; attempt++) {
      await new Promise((r) => setTimeout(r, 100));
      status = (await request(a.server).post('/api/v1/interpretations').send(SMALL)).status;
    }
    expect(status).toBe(200);
  });

  it('cuts off a request whose body trickles in past the request timeout', async () => {
    const a = await app({ requestTimeoutMs: 300 });
    await a.listen({ host: '127.0.0.1', port: 0 });
    const { port } = a.server.address() as AddressInfo;
    const closed = await new Promise<string>((resolve) => {
      const socket = connect(port, '127.0.0.1', () => {
        socket.write('POST /api/v1/interpretations HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\nContent-Length: 100000\r\n\r\n{"geo');
      });
      let answer = '';
      socket.on('data', (d) => (answer += d.toString()));
      socket.on('close', () => resolve(answer.split('\r\n')[0] ?? ''));
      // Safety net for the test itself: if the server never cuts it off, fail rather than hang.
      setTimeout(() => {
        resolve('still open');
        socket.destroy();
      }, 10_000).unref();
    });
    expect(closed).not.toBe('still open');
    expect(closed === '' || /^HTTP\/1\.1 408/.test(closed)).toBe(true);
  });
});
