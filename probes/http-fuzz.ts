/**
 * npm run fuzz:http [-- --cases N --seed S --seconds T]: HTTP fuzzing of the service on
 * loopback. Starts the built service (dist/server/main.js) on a free port with a fresh data
 * folder, reads the route table from its OpenAPI document (so a new route is fuzzed without
 * touching this file), stores the demo line so that :id, :token and :shotId routes have
 * real values, then sends seeded random requests to every route:
 *   - valid bodies (the demo line as JSON and as a pick table, a demo SEG-2 gather) mutated
 *     in structure and in bytes; wrong, missing and odd content types;
 *   - truncated bodies (a Content-Length longer than what is sent, then the socket held or
 *     closed), oversized bodies, odd headers (huge, repeated, non-ASCII, bad encodings),
 *     odd query strings and path segments.
 * Counts per status class, 5xx, hangs (no answer within HANG_MS while the body was complete)
 * and crashes (the service exiting); after each batch it checks /healthz. Every request
 * that drew a 5xx or hung is saved as a reproducer in tests/reproducers (replayed by
 * `npm test`). Bounded by --cases (default 4000) and --seconds (default 300).
 * Plain node:net requests, so that malformed requests are sent as they are.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { seededUniform } from '../engine/forward/seeded-random.js';

const root = resolve(new URL('../..', import.meta.url).pathname);
const args = new Map<string, string>();
for (let k = 2; k < process.argv.length; k += 2) args.set(process.argv[k].replace(/^--/, ''), process.argv[k + 1]);
const CASES = Number(args.get('cases') ?? 4000);
const SEED = Number(args.get('seed') ?? 20261205);
const SECONDS = Number(args.get('seconds') ?? 300);
/** No answer within this long to a complete request is a hang (the compute time limit is 5 s by default). */
const HANG_MS = 15_000;

const rng = seededUniform(SEED);
const pick = <T>(items: readonly T[]): T => items[Math.floor(rng() * items.length)];

interface FuzzRequest {
  method: string;
  url: string;
  contentType?: string;
  headers?: Record<string, string>;
  /** Body as text (latin1 for bytes). */
  body?: string;
  /** Send this many bytes fewer than Content-Length says, then close. */
  shortBy?: number;
}

interface Outcome {
  status: number | null;
  hung: boolean;
  closed: boolean;
  ms: number;
}

/** Sends one request on a fresh socket; resolves with the status line's code, or null when the socket closed without one. */
function send(port: number, r: FuzzRequest): Promise<Outcome> {
  return new Promise((resolvePromise) => {
    const started = Date.now();
    const body = r.body === undefined ? null : Buffer.from(r.body, 'latin1');
    const lines = [`${r.method} ${r.url} HTTP/1.1`, `Host: 127.0.0.1:${port}`, 'Connection: close'];
    if (r.contentType !== undefined) lines.push(`Content-Type: ${r.contentType}`);
    for (const [k, v] of Object.entries(r.headers ?? {})) lines.push(`${k}: ${v}`);
    if (body) lines.push(`Content-Length: ${body.length}`);
    const socket = connect(port, '127.0.0.1');
    let answer = '';
    let done = false;
    const finish = (o: Omit<Outcome, 'ms'>): void => {
      if (done) return;
      done = true;
      clearTimeout(timer);
      socket.destroy();
      resolvePromise({ ...o, ms: Date.now() - started });
    };
    // A truncated body must be ended by the service's request timeout (408 or a close), so
    // silence past HANG_MS is a hang whatever was sent.
    const timer = setTimeout(() => finish({ status: statusOf(answer), hung: statusOf(answer) === null, closed: false }), HANG_MS);
    socket.on('connect', () => {
      socket.write(lines.join('\r\n') + '\r\n\r\n');
      if (body) socket.write(r.shortBy ? body.subarray(0, Math.max(0, body.length - r.shortBy)) : body);
      // A truncated body is left hanging: the service's request timeout must end it.
    });
    socket.on('data', (chunk) => {
      answer += chunk.toString('latin1');
      if (statusOf(answer) !== null) finish({ status: statusOf(answer), hung: false, closed: false });
    });
    socket.on('error', () => finish({ status: statusOf(answer), hung: false, closed: true }));
    socket.on('close', () => finish({ status: statusOf(answer), hung: false, closed: true }));
  });
}

/** The final status of an answer: interim 1xx answers (100 Continue) are skipped. */
function statusOf(answer: string): number | null {
  const re = /HTTP\/1\.[01] (\d{3})[^\r\n]*\r\n(?:[^\r\n]+\r\n)*\r\n/g;
  let final: number | null = null;
  for (let m = re.exec(answer); m !== null; m = re.exec(answer)) {
    final = Number(m[1]);
    if (final >= 200) return final;
  }
  return final !== null && final >= 200 ? final : null;
}

// ---- bodies -------------------------------------------------------------------------
const demoJson = readFileSync(join(root, 'samples/demo-line.json'), 'utf8');
const demoCsv = readFileSync(join(root, 'samples/demo-line.csv'), 'utf8');
const demoSeg2 = readFileSync(join(root, 'samples/demo-line-W-end.sg2')).toString('latin1');

const oddValues: unknown[] = [null, true, -1, 0, 1e308, -1e308, 1e-320, '', 'x'.repeat(300), '=cmd|calc', '<script>alert(1)</script>', '../../etc/passwd', '\u0000', '\ud800', [], {}, [[[]]], { $ref: '#' }, { __proto__: { x: 1 } }, 'NaN', '1e999'];

function mutateJson(text: string): string {
  const doc = JSON.parse(text) as Record<string, unknown>;
  const paths: (string | number)[][] = [];
  const walk = (v: unknown, path: (string | number)[]): void => {
    if (paths.length > 400) return;
    paths.push(path);
    if (Array.isArray(v)) v.forEach((x, i) => walk(x, [...path, i]));
    else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
  };
  walk(doc, []);
  const times = 1 + Math.floor(rng() * 3);
  for (let t = 0; t < times; t++) {
    const path = pick(paths);
    if (path.length === 0) continue;
    // An earlier edit may have removed or replaced part of the path: walk only what is left.
    let parent: unknown = doc;
    for (const key of path.slice(0, -1)) parent = parent !== null && typeof parent === 'object' ? (parent as Record<string | number, unknown>)[key] : undefined;
    if (parent === null || typeof parent !== 'object') continue;
    const last = path[path.length - 1];
    const r = rng();
    const target = parent as Record<string | number, unknown>;
    if (r < 0.5) target[last] = pick(oddValues);
    else if (r < 0.7) delete target[last];
    else if (r < 0.85 && Array.isArray(target)) target.push(target[last as number]);
    else target[`${String(last)}_extra`] = pick(oddValues);
  }
  return JSON.stringify(doc);
}

function mutateBytes(text: string): string {
  const chars = text.split('');
  const edits = 1 + Math.floor(rng() * 8);
  for (let e = 0; e < edits; e++) {
    const at = Math.floor(rng() * (chars.length + 1));
    const r = rng();
    if (r < 0.4) chars[at] = String.fromCharCode(Math.floor(rng() * 256));
    else if (r < 0.7) chars.splice(at, 1 + Math.floor(rng() * 20));
    else chars.splice(at, 0, pick(['{', '}', '[', ']', ',', '"', '\\', '\n', '\r', '\u00ff', '0', '-', 'e', ':']));
  }
  return chars.join('');
}

function bodyFor(kind: 'json' | 'csv' | 'seg2'): string {
  const base = kind === 'json' ? demoJson : kind === 'csv' ? demoCsv : demoSeg2;
  const r = rng();
  if (r < 0.15) return base;
  if (kind === 'json' && r < 0.6) return mutateJson(base);
  if (r < 0.9) return mutateBytes(base);
  return base.slice(0, Math.floor(rng() * base.length));
}

const contentTypes = ['application/json', 'text/csv', 'application/octet-stream', 'text/plain', 'application/xml', 'multipart/form-data; boundary=x', 'application/json; charset=utf-16', 'application/json; charset=latin1', 'APPLICATION/JSON', 'text/csv; header=absent', '', 'application/x-www-form-urlencoded', '*/*', 'application/json, text/csv'];

const oddHeaders: Record<string, string>[] = [
  { Accept: 'image/png' },
  { Accept: '*/*;q=0' },
  { 'Accept-Encoding': 'gzip, br, zstd' },
  { 'Content-Encoding': 'gzip' },
  { 'X-Forwarded-For': '1.2.3.4' },
  { Authorization: 'Bearer' },
  { Authorization: 'Bearer x'.padEnd(9000, 'x') },
  { Authorization: 'Basic Zm9vOmJhcg==' },
  { Origin: 'null' },
  { Cookie: 'a='.padEnd(6000, 'b') },
  { 'X-Odd': '\u00e9\u00e8' },
  { Range: 'bytes=0-10' },
  { 'If-None-Match': '*' },
  { Expect: '100-continue' },
];

function oddUrl(url: string): string {
  const r = rng();
  if (r < 0.2) return url + pick(['?revision=-1', '?revision=abc', '?revision=99999999999999999999', '?sheet=0', '?sheet=1e9', '?sheet=abc', '?paper=Z9', '?scale=-5', '?ve=0', '?ve=1e9', '?author=' + 'a'.repeat(500), '?author=%00', '?layoutChange=maybe', '?a=1&a=2', '?%zz']);
  if (r < 0.3) return url.replace(/[A-Za-z0-9_-]{16,}/, pick(['..%2F..%2Fetc%2Fpasswd', '%00', 'x'.repeat(300), '0', '-1', '%E2%80%AE', 'null']));
  if (r < 0.35) return url + '/';
  if (r < 0.4) return url.toUpperCase();
  return url;
}

// ---- routes --------------------------------------------------------------------------
interface RouteEntry {
  method: string;
  path: string;
  body: 'json' | 'csv' | 'seg2' | 'none';
}

async function routeTable(port: number): Promise<RouteEntry[]> {
  const res = await fetch(`http://127.0.0.1:${port}/api/v1/openapi.json`);
  const doc = (await res.json()) as { paths: Record<string, Record<string, { requestBody?: { content?: Record<string, unknown> } }>> };
  const out: RouteEntry[] = [];
  for (const [path, methods] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(methods)) {
      const types = Object.keys(op.requestBody?.content ?? {});
      const body = types.some((t) => t.includes('octet')) ? 'seg2' : types.some((t) => t.includes('csv')) && !types.some((t) => t.includes('json')) ? 'csv' : types.length > 0 ? 'json' : 'none';
      out.push({ method: method.toUpperCase(), path, body });
    }
  }
  // The share pages are not in the API document; fuzz them as well.
  for (const p of ['/share/{token}', '/share/{token}/section.svg', '/share/{token}/traveltimes.svg', '/share/{token}/stations.csv', '/', '/healthz']) {
    if (!out.some((r) => r.path === p)) out.push({ method: 'GET', path: p, body: 'none' });
  }
  return out;
}

function fill(path: string, ids: { id: string; token: string; shotId: string }): string {
  return path
    .replace(/\{id\}|:id/g, ids.id)
    .replace(/\{token\}|:token/g, ids.token)
    .replace(/\{shotId\}|:shotId/g, ids.shotId)
    .replace(/\{[a-zA-Z]+\}/g, 'x');
}

function makeRequest(route: RouteEntry, ids: { id: string; token: string; shotId: string }): FuzzRequest {
  const url = oddUrl(fill(route.path, ids));
  const r = rng();
  const method = r < 0.05 ? pick(['PUT', 'DELETE', 'PATCH', 'OPTIONS', 'HEAD', 'TRACE', 'FOO']) : route.method;
  const headers = rng() < 0.2 ? pick(oddHeaders) : undefined;
  if (route.body === 'none' && rng() < 0.8) return { method, url, headers };
  const kind = route.body === 'none' ? pick(['json', 'csv', 'seg2'] as const) : rng() < 0.8 ? route.body : pick(['json', 'csv', 'seg2'] as const);
  let body = bodyFor(kind);
  const naturalType = kind === 'json' ? 'application/json' : kind === 'csv' ? 'text/csv' : 'application/octet-stream';
  const contentType = rng() < 0.7 ? naturalType : pick(contentTypes);
  const s = rng();
  if (s < 0.03) body = body.repeat(Math.ceil(6_000_000 / Math.max(1, body.length))).slice(0, 6_000_000);
  const shortBy = s > 0.99 ? 1 + Math.floor(rng() * 100) : undefined;
  return { method, url, contentType, headers, body, shortBy };
}

// ---- the service ---------------------------------------------------------------------
/** The service process now running, killed when this script ends however it ends. */
let current: ChildProcess | null = null;
process.on('exit', () => current?.kill('SIGKILL'));

async function startService(dataDir: string, port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, [join(root, 'dist/server/main.js')], {
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATA_DIR: dataDir, ARCLINE_SEED_DEMO: '0', ARCLINE_REQUEST_TIMEOUT_MS: '3000', ARCLINE_WRITE_RATE_LIMIT: '0' }, // rate limit off: the fuzzed writes must reach the routes,
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  child.stderr?.on('data', () => undefined);
  current = child;
  for (let k = 0; k < 100; k++) {
    try {
      const res = await fetch(`http://127.0.0.1:${port}/healthz`);
      if (res.ok) return child;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('the service did not start');
}

async function storeDemo(port: number): Promise<{ id: string; token: string; shotId: string }> {
  const res = await fetch(`http://127.0.0.1:${port}/api/v1/surveys`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: demoJson });
  const stored = (await res.json()) as { id: string; shareUrl: string | null };
  const token = stored.shareUrl?.split('/').pop() ?? 'none';
  const shotId = (JSON.parse(demoJson) as { shots: { id: string }[] }).shots[0].id;
  return { id: stored.id, token, shotId };
}

/** Real ids in a URL become placeholders, which the replay fills from a line it stores itself. */
let placeholders: { id: string; token: string; shotId: string } | null = null;

function saveReproducer(r: FuzzRequest, why: string): string {
  const url = placeholders ? r.url.split(placeholders.id).join('{id}').split(placeholders.token).join('{token}') : r.url;
  const doc = { why, method: r.method, url, contentType: r.contentType, headers: r.headers, body: r.body, bodyEncoding: 'latin1' };
  const name = `http-${createHash('sha256').update(JSON.stringify(doc)).digest('hex').slice(0, 12)}.json`;
  writeFileSync(join(root, 'tests/reproducers', name), JSON.stringify(doc) + '\n');
  return name;
}

async function main(): Promise<void> {
  const dataDir = mkdtempSync(join(tmpdir(), 'arcline-fuzz-'));
  const port = 20_000 + Math.floor(rng() * 20_000);
  let child = await startService(dataDir, port);
  let crashes = 0;
  child.on('exit', () => crashes++);
  const ids = await storeDemo(port);
  placeholders = ids;
  const routes = await routeTable(port);
  const byClass = new Map<string, number>();
  let fiveXx = 0;
  let hangs = 0;
  let unanswered = 0;
  let sent = 0;
  const saved: string[] = [];
  const started = Date.now();
  for (; sent < CASES && Date.now() - started < SECONDS * 1000; sent++) {
    const route = pick(routes);
    const request = makeRequest(route, ids);
    const outcome = await send(port, request);
    const oversized = (request.body?.length ?? 0) > 5_000_000;
    // An oversized body is refused as it arrives (413, then the socket closed while the client
    // is still writing: the client may see the reset before the answer).
    const cls = outcome.status === null ? (request.shortBy !== undefined ? 'truncated body closed' : oversized ? 'oversized body closed' : 'closed') : `${Math.floor(outcome.status / 100)}xx`;
    byClass.set(cls, (byClass.get(cls) ?? 0) + 1);
    if (outcome.status !== null && outcome.status >= 500 && outcome.status !== 503) {
      fiveXx++;
      saved.push(saveReproducer(request, `status ${outcome.status}`));
    }
    if (outcome.hung) {
      hangs++;
      saved.push(saveReproducer(request, `no answer within ${HANG_MS} ms`));
    }
    if (outcome.status === null && request.shortBy === undefined && !oversized && !outcome.hung) {
      unanswered++;
      if (unanswered <= 3) console.log(`closed without an answer: ${request.method} ${request.url.slice(0, 80)} ${request.contentType ?? ''} ${JSON.stringify(request.headers ?? {}).slice(0, 80)} body ${request.body?.length ?? 0} bytes`);
    }
    if (sent % 100 === 99 || child.exitCode !== null) {
      const alive = child.exitCode === null && (await fetch(`http://127.0.0.1:${port}/healthz`).then((r) => r.ok).catch(() => false));
      if (!alive) {
        saved.push(saveReproducer(request, 'the service stopped answering /healthz after this request'));
        child.kill('SIGKILL');
        child = await startService(dataDir, port);
        child.on('exit', () => crashes++);
      }
    }
  }
  child.removeAllListeners('exit');
  child.kill('SIGTERM');
  rmSync(dataDir, { recursive: true, force: true });
  const seconds = ((Date.now() - started) / 1000).toFixed(0);
  console.log(`HTTP fuzz, seed ${SEED}: ${sent} requests to ${routes.length} routes in ${seconds} s`);
  console.log(`answers: ${[...byClass.entries()].sort().map(([k, v]) => `${k} ${v}`).join(', ')}`);
  console.log(`5xx other than 503: ${fiveXx}; hangs: ${hangs}; crashes: ${crashes}; closed without an answer (complete request): ${unanswered}`);
  if (saved.length > 0) console.log(`reproducers saved in tests/reproducers: ${saved.join(', ')}`);
  process.exitCode = fiveXx + hangs + crashes > 0 ? 1 : 0;
}

await main().catch((error: unknown) => {
  console.error('the fuzzer failed:', error);
  process.exitCode = 2;
});
