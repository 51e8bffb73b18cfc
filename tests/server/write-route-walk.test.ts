// Every write route, taken from the route table as the app built it, refuses a request
// without the right write token (issue 14, item 4): a route added later without the guard
// fails here. Open writes are listed by name below, as README's "Write protection" lists
// them: they store nothing. The token is compared by hashing both sides and
// crypto.timingSafeEqual (server/write-auth.ts tokensMatch), so the time does not tell how
// much of a guess was right.
import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { memoryApp } from '../helpers/memory-app.js';

const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as object;
// Invented for this test; 32 characters at least, as the service asks.
const TOKEN = 'route-walk-token-8a3f51c9e07d2b64';

/** Writes that store nothing, open without a token (README, "Write protection"). */
const OPEN_WRITES = new Set([
  'POST /api/v1/interpretations',
  'POST /api/v1/previews',
  'POST /api/v1/previews/section.svg',
  'POST /api/v1/previews/traveltimes.svg',
  'POST /api/v1/previews/methods',
  'POST /api/v1/synthetic',
  'POST /api/v1/gathers/picks',
]);

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The token with one character changed: the first, a middle one, the last. */
function oneCharOff(token: string, at: number): string {
  const c = token[at];
  return token.slice(0, at) + (c === 'a' ? 'b' : 'a') + token.slice(at + 1);
}

const WRONG_AUTHORIZATIONS: [string, string | undefined][] = [
  ['no Authorization', undefined],
  ['empty Authorization', ''],
  ['a wrong token', 'Bearer not-the-token-but-just-as-long-as-it'],
  ['the first character off', `Bearer ${oneCharOff(TOKEN, 0)}`],
  ['a middle character off', `Bearer ${oneCharOff(TOKEN, 16)}`],
  ['the last character off', `Bearer ${oneCharOff(TOKEN, TOKEN.length - 1)}`],
  ['the token less its last character', `Bearer ${TOKEN.slice(0, -1)}`],
  ['the token and one more', `Bearer ${TOKEN}x`],
  ['the token in upper case', `Bearer ${TOKEN.toUpperCase()}`],
  ['the token without the word Bearer', TOKEN],
  ['the word Bearer alone', 'Bearer'],
  ['the token as Basic credentials', `Basic ${Buffer.from(`arcline:${TOKEN}`).toString('base64')}`],
  ['the token twice', `Bearer ${TOKEN} ${TOKEN}`],
];

describe('every write route refuses a missing or wrong token', () => {
  const server = memoryApp({ host: '0.0.0.0', writeToken: TOKEN });
  let id: string;

  beforeAll(async () => {
    const res = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', headers: { authorization: `Bearer ${TOKEN}` }, payload: demo });
    expect(res.statusCode).toBe(201);
    id = (res.json() as { id: string }).id;
  });

  const writeRoutes = () => {
    const all = server.app.routeTable.filter((r) => !SAFE.has(r.method));
    return {
      guarded: all.filter((r) => !OPEN_WRITES.has(`${r.method} ${r.url}`)),
      open: all.filter((r) => OPEN_WRITES.has(`${r.method} ${r.url}`)),
    };
  };

  /** A URL of the route: its parameters filled with the stored line's id and a shot id. */
  const urlOf = (pattern: string): string =>
    pattern.replace(/:(\w+)/g, (_, name: string) => (name === 'id' ? id : encodeURIComponent(`${name}-1`)));

  it('finds the write routes in the route table, and every listed open one exists', () => {
    const { guarded, open } = writeRoutes();
    // Store, revise, share (issue, revoke) and the two gather uploads at least.
    expect(guarded.length).toBeGreaterThanOrEqual(6);
    expect(new Set(open.map((r) => `${r.method} ${r.url}`))).toEqual(OPEN_WRITES);
  });

  it('answers 401 to every wrong Authorization on every guarded route, and stores nothing', async () => {
    const { guarded } = writeRoutes();
    const before = server.app.store.countRows();
    let refused = 0;
    // O(routes × variants) requests, each refused before its body is read.
    for (const route of guarded) {
      for (const [label, authorization] of WRONG_AUTHORIZATIONS) {
        const headers: Record<string, string> = authorization === undefined ? {} : { authorization };
        const res = await server.app.inject({ method: route.method as 'POST', url: urlOf(route.url), headers, payload: demo });
        expect(res.statusCode, `${route.method} ${route.url} with ${label}`).toBe(401);
        expect((res.json() as { error: { code: string } }).error.code).toMatch(/^write_token_(required|invalid)$/);
        expect(res.headers['www-authenticate']).toMatch(/^Bearer/);
        refused += 1;
      }
    }
    expect(refused).toBe(guarded.length * WRONG_AUTHORIZATIONS.length);
    console.log(`route walk: ${refused} wrong-token writes to ${guarded.length} guarded routes, all refused`);
    expect(server.app.store.countRows()).toEqual(before);
  });

  it('lets the right token through on every guarded route (so the 401s above are the token\'s doing)', async () => {
    const { guarded } = writeRoutes();
    for (const route of guarded) {
      const res = await server.app.inject({ method: route.method as 'POST', url: urlOf(route.url), headers: { authorization: `Bearer ${TOKEN}` }, payload: demo });
      expect(res.statusCode, `${route.method} ${route.url}`).not.toBe(401);
      expect(res.statusCode, `${route.method} ${route.url}`).toBeLessThan(500);
    }
  });

  it('keeps the listed open writes open: no token needed, and they store nothing', async () => {
    const { open } = writeRoutes();
    const before = server.app.store.countRows();
    for (const route of open) {
      const res = await server.app.inject({ method: route.method as 'POST', url: route.url, payload: demo });
      expect(res.statusCode, `${route.method} ${route.url}`).not.toBe(401);
    }
    expect(server.app.store.countRows()).toEqual(before);
  });
});
