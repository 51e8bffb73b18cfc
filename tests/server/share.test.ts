// Share links: a read-only, script-free page per stored survey, reachable only through an
// unguessable token that can be reissued or revoked.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';
import { escapeHtml } from '../../server/share-page.js';

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');

let app: FastifyInstance;

/** supertest keeps an SVG body as text only when told to. */
const asText = (r: request.Response, cb: (err: Error | null, body: unknown) => void) => {
  let text = '';
  r.on('data', (c: Buffer) => (text += c.toString('utf8')));
  r.on('end', () => cb(null, text));
};

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  await app.ready();
});
afterAll(async () => {
  await app.close();
});

async function store(name: string): Promise<{ id: string; shareUrl: string }> {
  const survey = JSON.parse(demoJsonText);
  survey.name = name;
  const res = await request(app.server).post('/api/v1/surveys').send(survey);
  expect(res.status).toBe(201);
  return res.body;
}

describe('GET /share/:token', () => {
  it('shows the line name, the cautions, both drawings and the station table, with no script', async () => {
    const name = 'Line 7 — abutment "north" & ramp';
    const { shareUrl } = await store(name);
    const res = await request(app.server).get(shareUrl);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/html/);
    expect(res.text).toContain(escapeHtml(name));
    expect(res.text).toContain('Line 7 — abutment &quot;north&quot; &amp; ramp');
    for (const caution of CAUTIONS) expect(res.text).toContain(escapeHtml(caution));
    expect((res.text.match(/<svg[\s>]/g) ?? []).length).toBeGreaterThanOrEqual(2);
    const geophones = JSON.parse(demoJsonText).geophones.length;
    const tbody = /<tbody>([\s\S]*?)<\/tbody>/.exec(res.text)?.[1] ?? '';
    expect((tbody.match(/<tr>/g) ?? []).length).toBe(geophones);
    expect(res.text).toContain(`${shareUrl}/stations.csv`);
    expect(res.text).not.toMatch(/<script/i);
    expect(res.text).not.toMatch(/\son[a-z]+\s*=/i);
  });

  it('sends a policy that forbids every script, no caching and no referrer', async () => {
    const { shareUrl } = await store('Policy line');
    const res = await request(app.server).get(shareUrl);
    const csp = res.headers['content-security-policy'];
    expect(csp).toContain("default-src 'none'");
    expect(csp).not.toContain('script-src');
    expect(csp).toContain("frame-ancestors 'none'");
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['cache-control']).toBe('no-store');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });

  it('escapes a hostile line name everywhere on the page', async () => {
    const { shareUrl } = await store('<script>alert(1)</script>');
    const res = await request(app.server).get(shareUrl);
    expect(res.status).toBe(200);
    expect(res.text).not.toContain('<script>alert(1)</script>');
    expect(res.text).not.toMatch(/<script/i);
    expect(res.text).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
  });

  it('serves the station table and both drawings under the token', async () => {
    const { shareUrl } = await store('Pieces line');
    const csv = await request(app.server).get(`${shareUrl}/stations.csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.text.split('\r\n').filter((l) => l !== '')).toHaveLength(JSON.parse(demoJsonText).geophones.length + 1);
    for (const piece of ['section.svg', 'traveltimes.svg']) {
      const res = await request(app.server).get(`${shareUrl}/${piece}`).buffer(true).parse((r, cb) => {
        let text = '';
        r.on('data', (c: Buffer) => (text += c.toString('utf8')));
        r.on('end', () => cb(null, text));
      });
      expect(res.status, piece).toBe(200);
      expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
      expect(res.body as string).toMatch(/<svg[\s>]/);
    }
  });

  it('serves the methods compared under the token: every method, the cautions word for word, not cached', async () => {
    const { shareUrl } = await store('Methods line');
    const res = await request(app.server).get(`${shareUrl}/methods.svg`).buffer(true).parse(asText);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
    expect(res.headers['cache-control']).toBe('no-store');
    expect(res.headers['x-robots-tag']).toBe('noindex, nofollow');
    const svg = res.body as string;
    for (const m of ['plus-minus', 'grm', 'time-term']) expect(svg).toContain(`data-role="method-refractor" data-method="${m}"`);
    // DESIGN.md: every drawing handed to an engineer carries the cautions; their wrapped lines read back as the full text.
    const words = svg.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    for (const caution of CAUTIONS) expect(words).toContain(caution);
    expect(svg).not.toMatch(/<script/i);
    // The same drawing as the stored line's own route (the share is a key to it, not another figure).
    const { id } = (await request(app.server).get(`/api/v1/surveys`)).body.find((s: { name: string }) => s.name === 'Methods line');
    const direct = await request(app.server).get(`/api/v1/surveys/${id}/methods.svg`).buffer(true).parse(asText);
    expect(direct.body).toBe(svg);
  });

  it('offers the methods compared behind a disclosure: an image of …/methods.svg loaded only when opened, no script', async () => {
    const { shareUrl } = await store('Disclosure line');
    const page = await request(app.server).get(shareUrl);
    const details = /<details class="methods"[^>]*>([\s\S]*?)<\/details>/.exec(page.text)?.[1] ?? '';
    expect(details).toContain('<summary>Methods compared');
    const img = /<img [^>]*>/.exec(details)?.[0] ?? '';
    expect(img).toContain(`src="${shareUrl}/methods.svg"`);
    expect(img).toContain('loading="lazy"');
    expect(img).toMatch(/alt="[^"]{40,}"/);
    for (const file of ['methods.pdf', 'methods.png']) expect(details).toContain(`${shareUrl}/${file}`);
    // The policy lets the image in: same origin (img-src 'self').
    expect(page.headers['content-security-policy']).toMatch(/img-src 'self'/);
    expect(page.text).not.toMatch(/<script/i);
  });

  it('allows no write under /share: POST, PUT, PATCH and DELETE answer 404', async () => {
    const { shareUrl } = await store('Read-only line');
    const before = app.store.countRows();
    for (const path of [shareUrl, `${shareUrl}/stations.csv`, `${shareUrl}/methods.svg`, '/share']) {
      for (const method of ['post', 'put', 'patch', 'delete'] as const) {
        const res = await request(app.server)[method](path).send({ name: 'changed' });
        expect([404, 405], `${method} ${path}`).toContain(res.status);
      }
    }
    expect(app.store.countRows()).toEqual(before);
    const page = await request(app.server).get(shareUrl);
    expect(page.status).toBe(200);
    expect(page.text).toContain('Read-only line');
  });

  it('answers 404 for unknown and malformed tokens', async () => {
    const unknown = 'A'.repeat(43);
    for (const path of [`/share/${unknown}`, `/share/${unknown}/stations.csv`, `/share/${unknown}/methods.svg`, '/share/short', '/share/%3Cscript%3E', '/share/short/methods.svg']) {
      const res = await request(app.server).get(path);
      expect(res.status, path).toBe(404);
      expect(res.body.error.code).toBe('share_not_found');
    }
  });
});

describe('managing the share link', () => {
  it('gives every stored survey its own token of at least 128 bits', async () => {
    const a = await store('Token line A');
    const b = await store('Token line B');
    const tokenA = a.shareUrl.split('/').pop()!;
    const tokenB = b.shareUrl.split('/').pop()!;
    expect(tokenA).not.toBe(tokenB);
    // 43 base64url characters carry 256 bits.
    expect(Buffer.from(tokenA, 'base64url').length * 8).toBeGreaterThanOrEqual(128);
  });

  it('POST …/share revokes the old token and issues a new one that works', async () => {
    const { id, shareUrl: oldUrl } = await store('Reissued line');
    const res = await request(app.server).post(`/api/v1/surveys/${id}/share`);
    expect(res.status).toBe(201);
    expect(res.body.shareUrl).toMatch(/^\/share\/[A-Za-z0-9_-]{43}$/);
    expect(res.body.shareUrl).not.toBe(oldUrl);
    const old = await request(app.server).get(oldUrl);
    expect(old.status).toBe(404);
    expect(old.body.error.code).toBe('share_not_found');
    const fresh = await request(app.server).get(res.body.shareUrl);
    expect(fresh.status).toBe(200);
    expect(fresh.text).toContain('Reissued line');
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(detail.body.shareUrl).toBe(res.body.shareUrl);
  });

  it('DELETE …/share revokes the link: the page answers 404 and the survey has no shareUrl', async () => {
    const { id, shareUrl } = await store('Revoked line');
    const res = await request(app.server).delete(`/api/v1/surveys/${id}/share`);
    expect(res.status).toBe(204);
    expect((await request(app.server).get(shareUrl)).status).toBe(404);
    expect((await request(app.server).get(`${shareUrl}/section.svg`)).status).toBe(404);
    const detail = await request(app.server).get(`/api/v1/surveys/${id}`);
    expect(detail.body.shareUrl).toBeNull();
    const again = await request(app.server).post(`/api/v1/surveys/${id}/share`);
    expect(again.status).toBe(201);
    expect((await request(app.server).get(again.body.shareUrl)).status).toBe(200);
    // The old link stays dead after a new one is issued.
    expect((await request(app.server).get(`${shareUrl}/methods.svg`)).status).toBe(404);
  });

  it('a revoked link stops the methods compared at once: 404 share_not_found, though the same link answered just before', async () => {
    const { id, shareUrl } = await store('Revoked methods line');
    expect((await request(app.server).get(`${shareUrl}/methods.svg`)).status).toBe(200);
    expect((await request(app.server).delete(`/api/v1/surveys/${id}/share`)).status).toBe(204);
    const res = await request(app.server).get(`${shareUrl}/methods.svg`);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('share_not_found');
    expect(res.text).not.toMatch(/<svg/);
    // Reissued: the new link serves it, the old one still does not.
    const again = await request(app.server).post(`/api/v1/surveys/${id}/share`);
    expect((await request(app.server).get(`${again.body.shareUrl}/methods.svg`)).status).toBe(200);
    expect((await request(app.server).get(`${shareUrl}/methods.svg`)).status).toBe(404);
  });

  it('answers 404 when managing the link of an unknown survey', async () => {
    expect((await request(app.server).post('/api/v1/surveys/AAAAAAAAAAAAAAAA/share')).status).toBe(404);
    expect((await request(app.server).delete('/api/v1/surveys/AAAAAAAAAAAAAAAA/share')).status).toBe(404);
  });

  it('shows the latest revision on the shared page', async () => {
    const { id, shareUrl } = await store('Before correction');
    const corrected = JSON.parse(demoJsonText);
    corrected.name = 'After correction';
    expect((await request(app.server).post(`/api/v1/surveys/${id}/revisions`).send(corrected)).status).toBe(201);
    const page = await request(app.server).get(shareUrl);
    expect(page.text).toContain('After correction');
    expect(page.text).toContain('revision 2');
  });
});

describe('escapeHtml', () => {
  it('escapes the five characters that matter in text and attributes', () => {
    expect(escapeHtml(`<a href="x" title='y'>&</a>`)).toBe('&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;&lt;/a&gt;');
  });
});
