// Corrected picks posted back (issue 12, item 4): the page sends the stored survey with the
// edited times to POST /api/v1/surveys/:id/revisions?author=…; the new revision records who
// (the author) and when (its createdAt), and the earlier revision keeps the automatic picks.
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { demoLine } from '../../engine/samples/demo-lines.js';
import { memoryApp } from '../helpers/memory-app.js';

const server = memoryApp();

describe('posting corrected picks as a revision', () => {
  it('records the author and the time; the times are the edited ones; revision 1 is unchanged', async () => {
    const created = await request(server.app.server).post('/api/v1/surveys?author=Field%20crew').send(demoLine());
    expect(created.status).toBe(201);
    const id = created.body.id;
    const survey = demoLine();
    survey.shots[2].times[5] = (survey.shots[2].times[5] as number) + 1.5; // moved pick
    survey.shots[2].times[6] = null; // cleared pick
    const before = Date.now();
    const res = await request(server.app.server).post(`/api/v1/surveys/${id}/revisions?author=A.%20Reviewer`).send(survey);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ revision: 2, author: 'A. Reviewer' });
    const got = await request(server.app.server).get(`/api/v1/surveys/${id}`);
    expect(got.body.revisions.map((r: { author: string | null }) => r.author)).toEqual(['Field crew', 'A. Reviewer']);
    const at = Date.parse(got.body.revisions[1].createdAt);
    expect(at).toBeGreaterThanOrEqual(before - 1000);
    expect(got.body.survey.shots[2].times[5]).toBe((demoLine().shots[2].times[5] as number) + 1.5);
    expect(got.body.survey.shots[2].times[6]).toBeNull();
    const first = await request(server.app.server).get(`/api/v1/surveys/${id}?revision=1`);
    expect(first.body.survey.shots[2].times).toEqual(demoLine().shots[2].times);
  });

  it('an author longer than 100 characters is refused naming the parameter, nothing stored', async () => {
    const created = await request(server.app.server).post('/api/v1/surveys').send(demoLine());
    const before = server.app.store.countRows();
    const res = await request(server.app.server).post(`/api/v1/surveys/${created.body.id}/revisions?author=${'x'.repeat(101)}`).send(demoLine());
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('author');
    expect(server.app.store.countRows()).toEqual(before);
  });
});
