// Shot gathers into stored lines (server/routes/survey-gathers.ts): Demo A's SEG-2 files
// (samples/, invented data from the closed-form planar refractor) uploaded one per shot
// build the line revision by revision; refused uploads (broken file, other layout, no
// write token) leave the store exactly as it was; the stored gathers come back decimated.
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { buildApp } from '../../server/app.js';
import { demoGathers, DEMO_GATHER_RECORDING } from '../../engine/samples/demo-gathers.js';
import { demoLine, demoLineModel } from '../../engine/samples/demo-lines.js';
import { syntheticGather } from '../../engine/forward/synthetic-gather.js';
import { memoryApp } from '../helpers/memory-app.js';

const gathers = demoGathers();
const line = demoLine();
const DT = DEMO_GATHER_RECORDING.sampleIntervalMs;
const fileOf = (shotId: string): Buffer => Buffer.from(gathers.find((g) => g.shotId === shotId)!.bytes);

const server = memoryApp();

const upload = (path: string, body: Buffer, headers: Record<string, string> = {}) =>
  request(server.app.server).post(path).set({ 'Content-Type': 'application/octet-stream', ...headers }).serialize((b: Buffer) => b as unknown as string).send(body);

/** Everything a refused request must leave alone: row counts and the latest revision's survey. */
function snapshot(id?: string): unknown {
  return { rows: server.app.store.countRows(), latest: id === undefined ? null : server.app.store.getRevision(id), gathers: id === undefined ? null : server.app.store.listGathers(id) };
}

describe('uploading one SEG-2 file per shot', () => {
  let id = '';

  it('creates a line from the first file: its picks as the first shot, who and when recorded', async () => {
    const res = await upload('/api/v1/surveys/gathers?shotId=W-end&name=Demo%20A%20from%20gathers&author=R.%20Okafor', fileOf('W-end'));
    expect(res.status).toBe(201);
    id = res.body.id;
    expect(res.body).toMatchObject({ revision: 1, shotId: 'W-end', replaced: false, author: 'R. Okafor', name: 'Demo A from gathers' });
    expect(res.headers.location).toBe(`/api/v1/surveys/${id}`);
    const got = await request(server.app.server).get(`/api/v1/surveys/${id}`);
    expect(got.body.survey.geophones).toEqual(line.geophones);
    expect(got.body.survey.shots).toHaveLength(1);
    expect(got.body.survey.shots[0]).toMatchObject({ id: 'W-end', x: -1.5, elevation: 86 });
    expect(got.body.survey.shots[0].times).toEqual(res.body.picks.times);
    expect(got.body.revisions[0]).toMatchObject({ revision: 1, author: 'R. Okafor' });
    expect(Date.parse(got.body.revisions[0].createdAt)).not.toBeNaN();
    expect(got.body.gathers).toEqual([expect.objectContaining({ shotId: 'W-end', revision: 1, traces: `/api/v1/surveys/${id}/gathers/W-end/traces` })]);
    // A one-shot line has no forward and reverse pair: stored anyway, the interpretation says so.
    expect(got.body.interpretation.qc.warnings.map((w: { code: string }) => w.code)).toContain('no-opposing-pair');
    const section = await request(server.app.server).get(`/api/v1/surveys/${id}/section.svg`);
    expect(section.status).toBe(200);
  });

  it('adds each further shot as a new revision; the line of five gathers interprets near the model', async () => {
    let revision = 1;
    for (const shotId of ['W-off', 'mid', 'E-end', 'E-off']) {
      const res = await upload(`/api/v1/surveys/${id}/gathers?shotId=${shotId}`, fileOf(shotId));
      expect(res.status, JSON.stringify(res.body.error)).toBe(201);
      revision += 1;
      expect(res.body.revision).toBe(revision);
      expect(res.body.author).toBeNull();
    }
    const got = await request(server.app.server).get(`/api/v1/surveys/${id}`);
    expect(got.body.survey.shots.map((s: { id: string }) => s.id)).toEqual(['W-end', 'W-off', 'mid', 'E-end', 'E-off']);
    // Every stored pick within 3 samples of Demo A's picks (the closed-form first arrivals,
    // Kearey, Brooks & Hill 2002, ch. 5, rounded to 0.1 ms).
    for (const shot of got.body.survey.shots) {
      const truth = line.shots.find((s) => s.id === shot.id)!;
      shot.times.forEach((t: number, i: number) => expect(Math.abs(t - (truth.times[i] as number))).toBeLessThanOrEqual(3 * DT + 0.05));
    }
    // The model's velocities (700 / 2,800 m/s) recovered within 10 % (our tolerance for picked data).
    const model = demoLineModel().refractor;
    const layers = got.body.interpretation.layers;
    expect(Math.abs(layers[0].velocity - model.v1) / model.v1).toBeLessThan(0.1);
    expect(Math.abs(layers[1].velocity - model.v2) / model.v2).toBeLessThan(0.1);
  });

  it('a shot id already in the line is replaced, not added', async () => {
    const res = await upload(`/api/v1/surveys/${id}/gathers?shotId=mid&author=Second%20reader`, fileOf('mid'));
    expect(res.status).toBe(201);
    expect(res.body.replaced).toBe(true);
    const got = await request(server.app.server).get(`/api/v1/surveys/${id}`);
    expect(got.body.survey.shots).toHaveLength(5);
    expect(got.body.revisions.at(-1)).toMatchObject({ author: 'Second reader' });
  });

  it('a broken file answers 400 naming the byte offset, and nothing is stored', async () => {
    const before = snapshot(id);
    const file = fileOf('E-off');
    const cut = file.subarray(0, file.length - 1000);
    const res = await upload(`/api/v1/surveys/${id}/gathers?shotId=E-off`, cut);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_seg2');
    expect(typeof res.body.error.byteOffset).toBe('number');
    expect(res.body.error.message).toContain(`byte ${res.body.error.byteOffset}`);
    expect(snapshot(id)).toEqual(before);
    const created = await upload('/api/v1/surveys/gathers', cut);
    expect(created.status).toBe(400);
    expect(snapshot(id)).toEqual(before);
  });

  it('another geophone layout answers 409 and stores nothing; confirmed, the layouts are merged', async () => {
    const before = snapshot(id);
    // The same file read as 24 geophones every 3 m from x = 1.5 m: every geophone moved.
    const query = 'shotId=shifted&geophoneX0=1.5&geophoneSpacing=3';
    const refused = await upload(`/api/v1/surveys/${id}/gathers?${query}`, fileOf('mid'));
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('layout_changed');
    expect(refused.body.error.message).toContain('layoutChange=confirm');
    expect(snapshot(id)).toEqual(before);
    const merged = await upload(`/api/v1/surveys/${id}/gathers?${query}&layoutChange=confirm`, fileOf('mid'));
    expect(merged.status, JSON.stringify(merged.body.error)).toBe(201);
    const got = await request(server.app.server).get(`/api/v1/surveys/${id}`);
    const xs = got.body.survey.geophones.map((g: { x: number }) => g.x);
    expect(xs).toHaveLength(48);
    expect(xs).toEqual([...xs].sort((a, b) => a - b));
    const westEnd = got.body.survey.shots.find((s: { id: string }) => s.id === 'W-end');
    // The earlier shots have no pick at the new positions, and keep theirs at the old ones.
    expect(westEnd.times[xs.indexOf(1.5)]).toBeNull();
    expect(westEnd.times[xs.indexOf(0)]).not.toBeNull();
  });

  it('unknown line: 404 before anything is read', async () => {
    const res = await upload('/api/v1/surveys/nosuchline/gathers', fileOf('mid'));
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('survey_not_found');
  });

  it('a bad query parameter answers 400 naming it', async () => {
    const res = await upload(`/api/v1/surveys/${id}/gathers?author=`, fileOf('mid'));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('author');
  });

  describe('decimated traces of a stored gather', () => {
    it('min/max per column over the record, each trace scaled to its peak', async () => {
      const res = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/W-off/traces?columns=64`);
      expect(res.status).toBe(200);
      const body = res.body;
      expect(body).toMatchObject({ shotId: 'W-off', revision: 2, scheme: 'min-max', columns: 64, sampleIntervalMs: DT });
      expect(body.fromMs).toBeCloseTo(DEMO_GATHER_RECORDING.delayMs, 9);
      expect(body.toMs).toBeCloseTo(DEMO_GATHER_RECORDING.delayMs + (DEMO_GATHER_RECORDING.samples - 1) * DT, 9);
      expect(body.traces).toHaveLength(24);
      // Against the generator's own samples (engine/forward/synthetic-gather.ts, the data the
      // file was written from, rounded to float32): 512 samples into 64 columns of 8.
      const model = demoLineModel();
      const geophones = model.geophoneXsM.map((x) => ({ x, elevation: model.groundElevationM(x) }));
      const source = { x: -24, elevation: model.groundElevationM(-24) };
      const { traces } = syntheticGather({ model: model.refractor, shot: source, geophones, sampleIntervalMs: DT, samples: 512, delayMs: -10, peakFrequencyHz: 100, snr: 20, seed: 7001 });
      for (const k of [0, 11, 23]) {
        const samples = Array.from(traces[k], Math.fround);
        const peak = Math.max(...samples.map(Math.abs));
        expect(body.traces[k].peak).toBeCloseTo(peak, 6);
        for (let c = 0; c < 64; c++) {
          const column = samples.slice(8 * c, 8 * c + 8);
          expect(body.traces[k].min[c]).toBeCloseTo(Math.min(...column) / peak, 3);
          expect(body.traces[k].max[c]).toBeCloseTo(Math.max(...column) / peak, 3);
        }
      }
    });

    it("carries the picker's own picks and confidence, as POST /api/v1/gathers/picks gives them for the file", async () => {
      const res = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/W-off/traces?columns=32`);
      expect(res.status).toBe(200);
      const picked = await upload('/api/v1/gathers/picks', fileOf('W-off'));
      expect(picked.status).toBe(200);
      const { automatic } = res.body;
      expect(automatic.times).toEqual(picked.body.times);
      expect(automatic.confidence).toEqual(picked.body.confidence);
      expect(automatic.status).toEqual(picked.body.traces.map((t: { status: string }) => t.status));
      // Against the closed-form first arrivals the file was made from (demo-gathers.ts,
      // Kearey, Brooks & Hill 2002, ch. 5): every pick within 4 samples (the README's accuracy
      // table has its largest SNR-30 error at 5 samples over 960 traces; this file is SNR 20).
      const truth = gathers.find((g) => g.shotId === 'W-off')!.firstArrivalsMs;
      automatic.times.forEach((t: number | null, i: number) => {
        expect(t).not.toBeNull();
        expect(Math.abs((t as number) - truth[i])).toBeLessThanOrEqual(4 * DT);
      });
      automatic.confidence.forEach((c: number) => expect(c).toBeGreaterThan(0.5));
    });

    it('bounded: columns are capped, a window narrows the record, unknown shots are 404', async () => {
      const big = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/W-off/traces?columns=5000`);
      expect(big.status).toBe(400);
      expect(big.body.error.message).toContain('columns');
      const window = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/W-off/traces?fromMs=0&toMs=50&columns=100`);
      expect(window.status).toBe(200);
      expect(window.body).toMatchObject({ fromMs: 0, toMs: 50, columns: 100, columnMs: 0.5 });
      window.body.traces.forEach((t: { min: number[]; max: number[] }) => {
        expect(t.min).toHaveLength(100);
        t.min.forEach((v, c) => expect(v).toBeLessThanOrEqual(t.max[c]));
      });
      const empty = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/W-off/traces?fromMs=500&toMs=600`);
      expect(empty.status).toBe(400);
      const missing = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/nope/traces`);
      expect(missing.status).toBe(404);
      expect(missing.body.error.code).toBe('gather_not_found');
      // The gather as it stood at revision 1: only W-end had been uploaded.
      const early = await request(server.app.server).get(`/api/v1/surveys/${id}/gathers/W-off/traces?revision=1`);
      expect(early.status).toBe(404);
    });
  });
});

describe('a service with a write token', () => {
  it('refuses an upload without it (401) and stores nothing', async () => {
    const guarded = await buildApp({ dataDir: ':memory:', webRoot: null, writeToken: 'a-long-enough-secret-token-for-tests' });
    try {
      await guarded.ready();
      const before = guarded.store.countRows();
      const res = await request(guarded.server).post('/api/v1/surveys/gathers').set('Content-Type', 'application/octet-stream').serialize((b: Buffer) => b as unknown as string).send(fileOf('mid'));
      expect(res.status).toBe(401);
      expect(guarded.store.countRows()).toEqual(before);
    } finally {
      await guarded.close();
    }
  });
});
