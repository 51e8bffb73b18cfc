// The demo seed (server/seed.ts): a fresh store gets Demo A as a pick line and Demo A from
// its seismograph files, the latter built by the upload's own steps, so its gathers are
// reviewable at once; a second start seeds nothing; a failure part-way stores nothing.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { DEMO_GATHERS_LINE_NAME, seedDemoLines } from '../../server/seed.js';
import { demoGathers, DEMO_GATHER_RECORDING } from '../../engine/samples/demo-gathers.js';
import { demoLine } from '../../engine/samples/demo-lines.js';
import { DEMO_GATHER_LINE_NAME } from '../../web/drop-files.js';
import { memoryApp } from '../helpers/memory-app.js';

const gathers = demoGathers();
const demo = demoLine();

interface Listed { id: string; name: string }
interface Line {
  name: string;
  latestRevision: number;
  revisions: { revision: number }[];
  gathers: { shotId: string; revision: number; traces: string }[];
  survey: { geophones: { x: number }[]; shots: { id: string; x: number; times: (number | null)[] }[] };
  interpretation: unknown;
}

describe('seeding a fresh store', () => {
  const dataDir = mkdtempSync(join(tmpdir(), 'arcline-seed-'));
  let app: FastifyInstance;
  let listed: Listed[];

  beforeAll(async () => {
    app = await buildApp({ dataDir, seedDemo: true, webRoot: null });
    await app.ready();
    listed = (await request(app.server).get('/api/v1/surveys')).body as Listed[];
  });
  afterAll(async () => {
    await app?.close();
    rmSync(dataDir, { recursive: true, force: true });
  });

  it('stores two lines: the demo pick line (newest, so the page opens it first) and the line of its seismograph files', () => {
    expect(listed.map((l) => l.name)).toEqual([demo.name, DEMO_GATHERS_LINE_NAME]);
    expect(app.store.countRows()).toMatchObject({ surveys: 2, revisions: 1 + gathers.length, gathers: gathers.length });
    // The page's "Load the demo gathers" makes a line of the same name.
    expect(DEMO_GATHERS_LINE_NAME).toBe(DEMO_GATHER_LINE_NAME);
  });

  it('the gathers line has one revision per shot and traces for every shot through the traces route', async () => {
    const line = (await request(app.server).get(`/api/v1/surveys/${listed[1].id}`)).body as Line;
    expect(line.latestRevision).toBe(gathers.length);
    expect(line.survey.shots.map((s) => s.id)).toEqual(gathers.map((g) => g.shotId));
    expect(line.gathers.map((g) => g.shotId).sort()).toEqual(gathers.map((g) => g.shotId).sort());
    for (const g of gathers) {
      const res = await request(app.server).get(`/api/v1/surveys/${listed[1].id}/gathers/${g.shotId}/traces?columns=200`);
      expect(res.status, g.shotId).toBe(200);
      expect(res.body.traces).toHaveLength(demo.geophones.length);
      expect(res.body.sampleIntervalMs).toBe(DEMO_GATHER_RECORDING.sampleIntervalMs);
      expect(res.body.automatic.times).toHaveLength(demo.geophones.length);
    }
  });

  it("its picks are the model's first arrivals within three samples (issue 12's tolerance, as tests/engine/demo-gathers.test.ts)", async () => {
    // The demo pick line holds the closed-form first arrivals (Kearey, Brooks & Hill 2002, ch. 5) rounded to 0.1 ms.
    const line = (await request(app.server).get(`/api/v1/surveys/${listed[1].id}`)).body as Line;
    const allowedMs = 3 * DEMO_GATHER_RECORDING.sampleIntervalMs + 0.05;
    let compared = 0;
    for (const shot of line.survey.shots) {
      const truth = demo.shots.find((s) => s.id === shot.id)!;
      expect(shot.x).toBe(truth.x);
      shot.times.forEach((t, i) => {
        const exact = truth.times[i];
        if (t === null || exact === null) return;
        expect(Math.abs(t - exact), `${shot.id} geophone ${i}`).toBeLessThanOrEqual(allowedMs);
        compared += 1;
      });
    }
    // Every pick made it (SNR 20: no dead trace or rejection expected).
    expect(compared).toBe(gathers.length * demo.geophones.length);
  });

  it('is what uploading the same files through the routes stores (the same steps)', async () => {
    const plain = await buildApp({ dataDir: ':memory:', webRoot: null });
    await plain.ready();
    try {
      let id = '';
      for (const g of gathers) {
        const path = id === '' ? `/api/v1/surveys/gathers?shotId=${g.shotId}&name=${encodeURIComponent(DEMO_GATHERS_LINE_NAME)}` : `/api/v1/surveys/${id}/gathers?shotId=${g.shotId}`;
        const res = await request(plain.server).post(path).set('Content-Type', 'application/octet-stream').serialize((b: Buffer) => b as unknown as string).send(Buffer.from(g.bytes));
        expect(res.status, JSON.stringify(res.body.error)).toBe(201);
        id = res.body.id;
      }
      const uploaded = plain.store.getRevision(id)!;
      const seeded = app.store.getRevision(listed[1].id)!;
      expect(seeded.survey).toEqual(uploaded.survey);
      expect(seeded.interpretation).toEqual(uploaded.interpretation);
      for (const g of gathers) expect(app.store.getGather(listed[1].id, g.shotId)!.seg2).toEqual(plain.store.getGather(id, g.shotId)!.seg2);
    } finally {
      await plain.close();
    }
  });

  it('a second start on the same store seeds nothing', async () => {
    const before = app.store.countRows();
    await app.close();
    app = await buildApp({ dataDir, seedDemo: true, webRoot: null });
    await app.ready();
    expect(app.store.countRows()).toEqual(before);
    const again = (await request(app.server).get('/api/v1/surveys')).body as Listed[];
    expect(again).toEqual(listed);
  });
});

describe('seeding stores both lines or nothing', () => {
  const server = memoryApp();

  it('a write failing part-way (the third revision of the gathers line) leaves the store empty', async () => {
    const { app } = server;
    let calls = 0;
    const original = app.store.addRevision.bind(app.store);
    const spy = vi.spyOn(app.store, 'addRevision').mockImplementation((...args) => {
      calls += 1;
      if (calls === 3) throw new Error('disk full (simulated)');
      return original(...args);
    });
    try {
      await expect(seedDemoLines(app.store, app.compute)).rejects.toThrow('disk full (simulated)');
    } finally {
      spy.mockRestore();
    }
    expect(calls).toBe(3);
    expect(app.store.countRows()).toEqual({ surveys: 0, revisions: 0, shareTokens: 0, gathers: 0 });
  });

  it('a line stored while the seed computes wins: the seed stores nothing', async () => {
    const { app } = server;
    const interpretation = await app.compute.run('interpret', { survey: demo });
    const seeding = seedDemoLines(app.store, app.compute);
    // The seed found the store empty and now computes; a colleague's line lands meanwhile.
    app.store.createSurvey(demo, interpretation);
    await expect(seeding).resolves.toBeNull();
    expect(app.store.countRows()).toMatchObject({ surveys: 1, revisions: 1, gathers: 0 });
  });
});
