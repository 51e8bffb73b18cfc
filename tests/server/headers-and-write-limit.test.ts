// Security headers from @fastify/helmet with our strict CSP kept, and the rate limit on
// writes from @fastify/rate-limit (issue 14, item 4): guarded writes beyond the limit answer
// 429 rate_limited with Retry-After (RFC 6585 §4); reads and interpretations are not limited.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { memoryApp } from '../helpers/memory-app.js';
import { DEFAULT_CSP, SVG_CSP } from '../../server/security-headers.js';
import { readConfig } from '../../server/config.js';
import { SHARE_PAGE_CSP } from '../../server/share-page.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as object;
// Invented for this test; 32 characters at least, as the service asks.
const TOKEN = 'limit-test-token-1f7e93c02b6da845';
const LIMIT = 3;

describe('security headers', () => {
  const server = memoryApp();

  it('carries helmet\'s headers and our CSP on JSON, and the script-free CSP on SVG', async () => {
    const json = await server.app.inject({ method: 'GET', url: '/api/v1/surveys' });
    expect(json.headers['content-security-policy']).toBe(DEFAULT_CSP);
    expect(json.headers['x-content-type-options']).toBe('nosniff');
    expect(json.headers['x-frame-options']).toBe('DENY');
    expect(json.headers['referrer-policy']).toBe('no-referrer');
    expect(json.headers['cross-origin-opener-policy']).toBe('same-origin');
    expect(json.headers['cross-origin-resource-policy']).toBe('same-origin');
    expect(json.headers['x-permitted-cross-domain-policies']).toBe('none');
    // Plain HTTP on the office network: HSTS is a TLS proxy's decision.
    expect(json.headers['strict-transport-security']).toBeUndefined();
    const svg = await server.app.inject({ method: 'POST', url: '/api/v1/previews/section.svg', payload: demo });
    expect(svg.statusCode).toBe(200);
    expect(svg.headers['content-security-policy']).toBe(SVG_CSP);
    expect(svg.headers['x-content-type-options']).toBe('nosniff');
  });

  it('keeps the share page\'s own policy, and the headers on errors before routing', async () => {
    const stored = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', payload: demo });
    const page = await server.app.inject({ method: 'GET', url: (stored.json() as { shareUrl: string }).shareUrl });
    expect(page.statusCode).toBe(200);
    expect(page.headers['content-security-policy']).toBe(SHARE_PAGE_CSP);
    expect(page.headers['x-frame-options']).toBe('DENY');
    const badUrl = await server.app.inject({ method: 'GET', url: '/share/%zz' });
    expect(badUrl.statusCode).toBe(400);
    expect(badUrl.headers['x-content-type-options']).toBe('nosniff');
    expect(badUrl.headers['content-security-policy']).toBe(DEFAULT_CSP);
  });
});

describe('the rate limit on writes', () => {
  const server = memoryApp({ writeToken: TOKEN, writeRateLimit: LIMIT });

  it(`answers 429 rate_limited after ${LIMIT} writes a minute from one address, token guesses included, storing nothing`, async () => {
    const before = server.app.store.countRows();
    for (let i = 0; i < LIMIT; i += 1) {
      const guess = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', headers: { authorization: `Bearer guess-${i}` }, payload: demo });
      expect(guess.statusCode).toBe(401);
      expect(guess.headers['x-ratelimit-remaining']).toBe(String(LIMIT - i - 1));
    }
    for (const headers of [{}, { authorization: `Bearer ${TOKEN}` }]) {
      const res = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', headers, payload: demo });
      expect(res.statusCode).toBe(429);
      const error = (res.json() as { error: { code: string; message: string } }).error;
      expect(error.code).toBe('rate_limited');
      expect(error.message).toContain(`at most ${LIMIT} a minute`);
      const retryAfter = Number(res.headers['retry-after']);
      expect(retryAfter).toBeGreaterThan(0);
      expect(retryAfter).toBeLessThanOrEqual(60);
    }
    // Another write route shares the same bucket.
    const share = await server.app.inject({ method: 'DELETE', url: '/api/v1/surveys/AAAAAAAAAAAAAAAA/share', headers: { authorization: `Bearer ${TOKEN}` } });
    expect(share.statusCode).toBe(429);
    expect(server.app.store.countRows()).toEqual(before);
  });

  it('does not limit reads or interpretations', async () => {
    for (let i = 0; i < LIMIT + 2; i += 1) {
      expect((await server.app.inject({ method: 'GET', url: '/api/v1/surveys' })).statusCode).toBe(200);
    }
    expect((await server.app.inject({ method: 'POST', url: '/api/v1/interpretations', payload: demo })).statusCode).toBe(200);
  });
});

describe('ARCLINE_WRITE_RATE_LIMIT', () => {
  it('defaults to 60 a minute, 0 turns it off, and nonsense is refused naming the variable', () => {
    expect(readConfig({}).writeRateLimit).toBe(60);
    expect(readConfig({ ARCLINE_WRITE_RATE_LIMIT: '0' }).writeRateLimit).toBe(0);
    expect(readConfig({ ARCLINE_WRITE_RATE_LIMIT: '600' }).writeRateLimit).toBe(600);
    for (const raw of ['-1', 'lots', '1.5']) {
      expect(() => readConfig({ ARCLINE_WRITE_RATE_LIMIT: raw }), raw).toThrow(/ARCLINE_WRITE_RATE_LIMIT/);
    }
  });
});
