// Host and Origin checks (issue 14, "No Host or Origin check"): a page using DNS rebinding
// sends its own name as Host and is refused on every route but /healthz (421, RFC 9110
// §15.5.20 Misdirected Request); a write whose Origin (or Referer) names another origin
// than the request's own Host is refused (403); scripts without Origin pass.
import { readFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { memoryApp } from '../helpers/memory-app.js';
import { hostAllowedBy, hostName } from '../../server/request-origin.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as object;
// Invented for this test; 32 characters at least, as the service asks.
const TOKEN = 'host-origin-test-4d0b8e27a95c13f6';
const OWN_HOST = 'localhost:8080';

function expectCoded(res: { statusCode: number; json: () => unknown }, status: number, code: string): string {
  expect(res.statusCode).toBe(status);
  const error = (res.json() as { error: { code: string; message: string; path: string } }).error;
  expect(error.code).toBe(code);
  expect(typeof error.path).toBe('string');
  expect(error.message.length).toBeGreaterThan(20);
  return error.message;
}

async function storeLine(app: FastifyInstance, headers: Record<string, string> = {}) {
  return app.inject({ method: 'POST', url: '/api/v1/surveys', headers: { host: OWN_HOST, ...headers }, payload: demo });
}

describe('on loopback without a token: the rebinding attack of the issue', () => {
  const server = memoryApp({ host: '127.0.0.1' });

  it('refuses a foreign Host on reads and writes with 421 host_not_allowed, storing nothing', async () => {
    const before = server.app.store.countRows();
    for (const host of ['evil.example', 'evil.example:8080', 'localhost.evil.example', '10.0.0.5:8080', 'rebind.127.0.0.1.nip.example']) {
      const read = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers: { host } });
      expect(expectCoded(read, 421, 'host_not_allowed'), host).toContain('ARCLINE_ALLOWED_HOSTS');
      const write = await storeLine(server.app, { host, origin: `http://${host}` });
      expectCoded(write, 421, 'host_not_allowed');
      const rotate = await server.app.inject({ method: 'POST', url: '/api/v1/surveys/abc/share', headers: { host } });
      expectCoded(rotate, 421, 'host_not_allowed');
      const unknown = await server.app.inject({ method: 'GET', url: '/nothing-here', headers: { host } });
      expectCoded(unknown, 421, 'host_not_allowed');
    }
    expect(server.app.store.countRows()).toEqual(before);
  });

  it('answers the loopback names, with or without a port', async () => {
    for (const host of ['localhost', 'localhost:8080', 'LOCALHOST:8080', '127.0.0.1:8080', '127.0.0.2', '[::1]:8080', 'arcline.localhost:8080', 'localhost.']) {
      const res = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers: { host } });
      expect(res.statusCode, host).toBe(200);
    }
  });

  it('answers /healthz whatever the Host (it tells nothing)', async () => {
    const res = await server.app.inject({ method: 'GET', url: '/healthz', headers: { host: 'evil.example' } });
    expect(res.statusCode).toBe(200);
  });

  it('refuses the same on a real socket (supertest), security headers included', async () => {
    const res = await request(server.app.server).get('/api/v1/surveys').set('Host', 'evil.example');
    expect(res.status).toBe(421);
    expect(res.body.error.code).toBe('host_not_allowed');
    expect(res.headers['content-security-policy']).toBeDefined();
  });

  it('refuses a write from another origin with 403 cross_origin_write, storing nothing', async () => {
    const before = server.app.store.countRows();
    const foreign: Record<string, string>[] = [
      { origin: 'http://evil.example' },
      { origin: 'http://localhost:9999' }, // another port is another origin (RFC 6454)
      { origin: 'https://evil.example' },
      { origin: 'null' }, // a sandboxed frame or a file
      { referer: 'http://evil.example/page.html' }, // no Origin: the Referer decides
    ];
    for (const headers of foreign) {
      expectCoded(await storeLine(server.app, headers), 403, 'cross_origin_write');
    }
    expect(server.app.store.countRows()).toEqual(before);
  });

  it('refuses a cross-site rotation of a share link: the old link still works', async () => {
    const stored = await storeLine(server.app);
    const { id, shareUrl } = stored.json() as { id: string; shareUrl: string };
    for (const method of ['POST', 'DELETE'] as const) {
      const res = await server.app.inject({ method, url: `/api/v1/surveys/${id}/share`, headers: { host: OWN_HOST, origin: 'http://evil.example' } });
      expectCoded(res, 403, 'cross_origin_write');
    }
    expect((await server.app.inject({ method: 'GET', url: shareUrl, headers: { host: OWN_HOST } })).statusCode).toBe(200);
  });

  it('refuses other writes from another origin too, even those that store nothing', async () => {
    const res = await server.app.inject({ method: 'POST', url: '/api/v1/interpretations', headers: { host: OWN_HOST, origin: 'http://evil.example' }, payload: demo });
    expectCoded(res, 403, 'cross_origin_write');
  });

  it('accepts a same-origin write (the page) and a write without Origin (curl, scripts)', async () => {
    expect((await storeLine(server.app, { origin: `http://${OWN_HOST}` })).statusCode).toBe(201);
    expect((await storeLine(server.app, { origin: 'HTTP://LOCALHOST:8080' })).statusCode).toBe(201);
    expect((await storeLine(server.app, { referer: `http://${OWN_HOST}/index.html` })).statusCode).toBe(201);
    expect((await storeLine(server.app)).statusCode).toBe(201);
    const shared = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', headers: { host: 'localhost' }, payload: demo });
    const { id } = shared.json() as { id: string };
    const rotated = await server.app.inject({ method: 'POST', url: `/api/v1/surveys/${id}/share`, headers: { host: 'localhost', origin: 'http://localhost' } });
    expect(rotated.statusCode).toBe(201);
  });

  it('lets another site read nothing it may not (GET with a foreign Origin is a read; the Host check still applies)', async () => {
    const res = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers: { host: OWN_HOST, origin: 'http://evil.example' } });
    expect(res.statusCode).toBe(200);
    expect(res.headers['access-control-allow-origin']).toBeUndefined();
  });
});

describe('on the office network with ARCLINE_ALLOWED_HOSTS', () => {
  const server = memoryApp({ host: '0.0.0.0', writeToken: TOKEN, allowedHosts: ['arcline.office.example'] });

  it('answers the listed names, IP literals, this machine\'s name and loopback; refuses others', async () => {
    const own = hostname().toLowerCase();
    for (const host of ['arcline.office.example', 'Arcline.Office.Example:8080', '10.1.2.3:8080', '[fd00::12]:8080', 'localhost:8080', own, `${own}:8080`]) {
      const res = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers: { host } });
      expect(res.statusCode, host).toBe(200);
    }
    for (const host of ['office.example', 'arcline.office.example.evil.example', 'evil.example']) {
      const res = await server.app.inject({ method: 'GET', url: '/api/v1/surveys', headers: { host } });
      expectCoded(res, 421, 'host_not_allowed');
    }
  });

  it('checks the Origin before the token: a foreign page is refused even with the right token', async () => {
    const res = await server.app.inject({
      method: 'POST',
      url: '/api/v1/surveys',
      headers: { host: 'arcline.office.example', origin: 'http://evil.example', authorization: `Bearer ${TOKEN}` },
      payload: demo,
    });
    expectCoded(res, 403, 'cross_origin_write');
    const ok = await server.app.inject({
      method: 'POST',
      url: '/api/v1/surveys',
      headers: { host: 'arcline.office.example', origin: 'http://arcline.office.example', authorization: `Bearer ${TOKEN}` },
      payload: demo,
    });
    expect(ok.statusCode).toBe(201);
  });
});

describe('hostName and hostAllowedBy', () => {
  it('reads the name of a Host header (RFC 9110 §7.2: host [":" port], IPv6 in brackets)', () => {
    expect(hostName('Example.ORG:8080')).toBe('example.org');
    expect(hostName('[::1]:8080')).toBe('::1');
    expect(hostName('[::1]')).toBe('::1');
    expect(hostName('example.org.')).toBe('example.org');
    expect(hostName('10.0.0.1')).toBe('10.0.0.1');
  });

  it('on a named or addressed host, answers that name and IP literals, and no loopback name', () => {
    const allowed = hostAllowedBy('192.0.2.10', ['survey-box.example']);
    expect(allowed('192.0.2.10')).toBe(true);
    expect(allowed('survey-box.example')).toBe(true);
    expect(allowed('198.51.100.7')).toBe(true);
    expect(allowed('localhost')).toBe(false);
    expect(allowed('evil.example')).toBe(false);
  });

  it('on loopback, answers only loopback names and the listed ones', () => {
    const allowed = hostAllowedBy('127.0.0.1', ['arcline.test']);
    expect(allowed('arcline.test')).toBe(true);
    expect(allowed('::1')).toBe(true);
    expect(allowed('192.0.2.10')).toBe(false);
  });
});
