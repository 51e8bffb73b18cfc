// Share links are read keys (issue 14, "Revoked share links are not revoked"): the open list
// of stored lines never carries one, a read shows one only to a request that could write,
// and the writes that make one answer with it.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { memoryApp } from '../helpers/memory-app.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as object;
// Invented for this test; 32 characters at least, as the service asks.
const TOKEN = 'share-visibility-7c1e94b0d2a65f38e';
const WRITER = { authorization: `Bearer ${TOKEN}` };

/** The token part of a share path ("/share/<token>"). */
function tokenOf(shareUrl: unknown): string {
  expect(shareUrl).toMatch(/^\/share\/[A-Za-z0-9_-]{20,}$/);
  return String(shareUrl).split('/').pop()!;
}

async function storeLine(app: FastifyInstance, headers: Record<string, string> = {}): Promise<{ id: string; shareToken: string }> {
  const res = await app.inject({ method: 'POST', url: '/api/v1/surveys', headers, payload: demo });
  expect(res.statusCode).toBe(201);
  const body = res.json() as { id: string; shareUrl: string };
  return { id: body.id, shareToken: tokenOf(body.shareUrl) };
}

describe('share links with a write token configured (office network)', () => {
  const server = memoryApp({ host: '0.0.0.0', writeToken: TOKEN });

  it('the list carries no share link, no token string anywhere, only the contract\'s fields and their links', async () => {
    const { shareToken } = await storeLine(server.app, WRITER);
    const res = await server.app.inject({ method: 'GET', url: '/api/v1/surveys' });
    expect(res.statusCode).toBe(200);
    expect(res.body).not.toContain(shareToken);
    expect(res.body).not.toContain('/share/');
    const list = res.json() as Record<string, unknown>[];
    expect(list.length).toBeGreaterThan(0);
    for (const item of list) {
      // api-v1.md: GET /api/v1/surveys → [{"id","name","createdAt"}]; the rest is added.
      expect(Object.keys(item)).toEqual(expect.arrayContaining(['id', 'name', 'createdAt']));
      expect(item).not.toHaveProperty('shareUrl');
    }
    // The writer sees no share link in the list either: it is not the place for one.
    const asWriter = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers: WRITER });
    expect(asWriter.body).not.toContain(shareToken);
  });

  it('a reissued link is not visible to an anonymous reader (nor to a wrong token), and the writer sees it', async () => {
    const { id, shareToken: first } = await storeLine(server.app, WRITER);
    const reissued = await server.app.inject({ method: 'POST', url: `/api/v1/surveys/${id}/share`, headers: WRITER });
    expect(reissued.statusCode).toBe(201);
    const second = tokenOf((reissued.json() as { shareUrl: string }).shareUrl);
    expect(second).not.toBe(first);
    // The new link is live …
    expect((await server.app.inject({ method: 'GET', url: `/share/${second}` })).statusCode).toBe(200);
    // … and no reader without the token can find it.
    for (const headers of [{}, { authorization: `Bearer ${TOKEN.slice(0, -1)}x` }, { authorization: TOKEN }]) {
      const list = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers });
      expect(list.body).not.toContain(second);
      const detail = await server.app.inject({ method: 'GET', url: `/api/v1/surveys/${id}`, headers });
      expect(detail.statusCode, JSON.stringify(headers)).toBe(200);
      expect(detail.body).not.toContain(second);
      expect(detail.body).not.toContain(first);
      // The key stays, so clients reading it do not break.
      expect(detail.json()).toHaveProperty('shareUrl', null);
    }
    const asWriter = await server.app.inject({ method: 'GET', url: `/api/v1/surveys/${id}`, headers: WRITER });
    expect((asWriter.json() as { shareUrl: string }).shareUrl).toBe(`/share/${second}`);
  });

  it('a new revision answers the writer with the share link', async () => {
    const { id, shareToken } = await storeLine(server.app, WRITER);
    const res = await server.app.inject({ method: 'POST', url: `/api/v1/surveys/${id}/revisions`, headers: WRITER, payload: demo });
    expect(res.statusCode).toBe(201);
    expect((res.json() as { shareUrl: string }).shareUrl).toBe(`/share/${shareToken}`);
  });
});

describe('share links on loopback without a token (one person at the machine)', () => {
  const server = memoryApp({ host: '127.0.0.1' });

  it('the list carries none; a read shows it, as every request here may write (the page reads it there)', async () => {
    const { id, shareToken } = await storeLine(server.app);
    const list = await server.app.inject({ method: 'GET', url: '/api/v1/surveys' });
    expect(list.body).not.toContain(shareToken);
    const detail = await server.app.inject({ method: 'GET', url: `/api/v1/surveys/${id}` });
    expect((detail.json() as { shareUrl: string }).shareUrl).toBe(`/share/${shareToken}`);
  });
});
