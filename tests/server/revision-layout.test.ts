// A new revision must be of the same line (api-v1.md, POST /api/v1/surveys/:id/revisions):
// a body whose geophone layout differs from the stored line's is refused with 409 unless the
// request says the change is meant (this service: ?layoutChange=confirm); nothing is written
// on a 409. Issue 11 item 7: storing Demo B as a revision of Demo A replaced Demo A's content.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { layoutChange } from '../../server/revision-layout.js';
import { surveyToPickTable } from '../../engine/survey/csv-import.js';
import type { Survey } from '../../engine/survey/survey.js';

const demoA = (): Survey => JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8'));
const demoB = (): Survey => JSON.parse(readFileSync(new URL('../../samples/flat-line.json', import.meta.url), 'utf8'));

let app: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

async function storeA(): Promise<string> {
  const res = await request(app.server).post('/api/v1/surveys').send(demoA());
  expect(res.status).toBe(201);
  return res.body.id;
}

const revise = (id: string, body: Survey, query = ''): request.Test => request(app.server).post(`/api/v1/surveys/${id}/revisions${query}`).send(body);

describe('revisions of another geophone layout', () => {
  it('refuses Demo B as a revision of Demo A with 409 layout_changed, says what changes, and writes nothing', async () => {
    const id = await storeA();
    const before = app.store.countRows();
    const res = await revise(id, demoB());
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('layout_changed');
    expect(res.body.error.path).toBe('/geophones');
    // Demo A: 24 geophones at 3 m from 0 to 69 m; Demo B: 24 at 2 m from 0 to 46 m, so 23 move.
    const change = res.body.error.layoutChange;
    expect(change.stored).toEqual({ geophones: 24, fromX: 0, toX: 69, revision: 1, name: demoA().name });
    expect(change.sent).toEqual({ geophones: 24, fromX: 0, toX: 46 });
    expect(change.movedGeophones).toBe(23);
    expect(change.firstMoved).toEqual({ geophone: 2, storedX: 3, sentX: 2 });
    expect(change.largestShiftM).toBe(23);
    expect(change.confirmWith).toBe('layoutChange=confirm');
    expect(res.body.error.message).toContain(`"${demoA().name}"`);
    expect(change.description).toBe(
      'The new revision has 24 geophones from x = 0 m to 46 m, every 2 m; revision 1 of the stored line has 24 geophones from x = 0 m to 69 m, every 3 m: ' +
        '23 of the 24 geophones are at other positions: geophone 2 at x = 2 m (stored: 3 m), and the largest move is 23 m.',
    );
    // One text: the message quotes the description word for word (the page shows the description).
    expect(res.body.error.message.startsWith(change.description)).toBe(true);
    expect(res.body.error.message).toContain('?layoutChange=confirm');
    expect(res.body.error.message).toContain('nothing was stored');

    expect(app.store.countRows()).toEqual(before);
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(detail.body.latestRevision).toBe(1);
    expect(detail.body.name).toBe(demoA().name);
    expect(detail.body.survey.geophones).toEqual(demoA().geophones);
  });

  it('names a change of geophone count with both spreads', async () => {
    const id = await storeA();
    const longer = demoA();
    longer.geophones.push({ x: 72, elevation: 40 });
    for (const shot of longer.shots) shot.times.push(null);
    const res = await revise(id, longer);
    expect(res.status).toBe(409);
    const change = res.body.error.layoutChange;
    expect(change.stored.geophones).toBe(24);
    expect(change.sent).toEqual({ geophones: 25, fromX: 0, toX: 72 });
    expect(change.movedGeophones).toBeNull();
    expect(change.description).toBe('The new revision has 25 geophones from x = 0 m to 72 m, every 3 m; revision 1 of the stored line has 24 geophones from x = 0 m to 69 m, every 3 m.');
    expect(res.body.error.message).toContain(change.description);
  });

  it('says when the whole spread is moved by one distance', async () => {
    const id = await storeA();
    const moved = demoA();
    moved.geophones = moved.geophones.map((g) => ({ ...g, x: g.x + 5 }));
    const res = await revise(id, moved);
    expect(res.status).toBe(409);
    expect(res.body.error.layoutChange.movedGeophones).toBe(24);
    expect(res.body.error.message).toContain('all 24 geophones are moved by +5 m');
  });

  it('refuses a pick table of another layout the same way', async () => {
    const id = await storeA();
    const res = await request(app.server).post(`/api/v1/surveys/${id}/revisions`).set('Content-Type', 'text/csv').send(surveyToPickTable(demoB()));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('layout_changed');
  });

  it('stores the revision when the request says the change is meant (?layoutChange=confirm)', async () => {
    const id = await storeA();
    const res = await revise(id, demoB(), '?layoutChange=confirm');
    expect(res.status).toBe(201);
    expect(res.body.revision).toBe(2);
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(detail.body.survey.geophones).toEqual(demoB().geophones);
    // Later revisions are compared with the latest layout: B is now the line, A is a change.
    expect((await revise(id, demoB())).status).toBe(201);
    const back = await revise(id, demoA());
    expect(back.status).toBe(409);
    expect(back.body.error.layoutChange.stored.revision).toBe(3);
  });

  it('answers 400 on another value of layoutChange, naming the parameter', async () => {
    const id = await storeA();
    const res = await revise(id, demoB(), '?layoutChange=yes');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_request');
    expect(res.body.error.path).toBe('/layoutChange');
    expect(res.body.error.message).toContain('"confirm"');
  });

  it('takes corrections of the same line: picks, shots, elevations, name, and positions within 1 mm', async () => {
    const id = await storeA();
    const corrected = demoA();
    corrected.name = 'Demo A, levels corrected';
    corrected.geophones = corrected.geophones.map((g, i) => ({ x: g.x + (i === 3 ? 0.0004 : 0), elevation: (g.elevation ?? 0) + 0.2 }));
    corrected.shots[0].times[4] = null;
    corrected.shots.pop();
    const res = await revise(id, corrected);
    expect(res.status).toBe(201);
    expect(res.body.revision).toBe(2);
  });
});

describe('layoutChange (pure)', () => {
  const stored = { revision: 1, name: 'L', geophones: [{ x: 0 }, { x: 2 }, { x: 4 }] };
  it('is null for the same positions and reports one moved geophone with its shift', () => {
    expect(layoutChange(stored, [{ x: 0 }, { x: 2.001 }, { x: 4 }])).toBeNull();
    const change = layoutChange(stored, [{ x: 0 }, { x: 2.5 }, { x: 4 }]);
    expect(change?.movedGeophones).toBe(1);
    expect(change?.firstMoved).toEqual({ geophone: 2, storedX: 2, sentX: 2.5 });
    expect(change?.largestShiftM).toBe(0.5);
    expect(change?.description).toBe(
      'The new revision has 3 geophones from x = 0 m to 4 m, irregularly spaced; revision 1 of the stored line has 3 geophones from x = 0 m to 4 m, every 2 m: ' +
        'one of the 3 geophones is at another position: geophone 2 at x = 2.5 m (stored: 2 m).',
    );
    // A move of a few millimetres is written to the millimetre, not rounded away.
    expect(layoutChange(stored, [{ x: 0 }, { x: 2.004 }, { x: 4 }])?.description).toContain('geophone 2 at x = 2.004 m (stored: 2 m)');
  });
});
