// Write protection and start-up: a write token guards every write when configured, is
// mandatory off loopback, and configuration mistakes stop the service with a clear message.
import { mkdtempSync, rmSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { ConfigError, readConfig } from '../../server/config.js';
import { startService } from '../../server/start.js';
import { DEMO_GATHERS_LINE_NAME } from '../../server/seed.js';
import { isLoopbackHost, tokensMatch } from '../../server/write-auth.js';

const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');
// Invented for these tests; as long as the service asks (32 characters at least).
const TOKEN = 'office-token-4f9c2a7e1b-d83a6c05e17f';

describe('write token on a shared host', () => {
  let app: FastifyInstance;
  let id: string;

  beforeAll(async () => {
    app = await buildApp({ dataDir: ':memory:', host: '0.0.0.0', writeToken: TOKEN });
    await app.ready();
    const res = await request(app.server).post('/api/v1/surveys').set('Authorization', `Bearer ${TOKEN}`).send(JSON.parse(demoJsonText));
    expect(res.status).toBe(201);
    id = res.body.id;
  });
  afterAll(async () => {
    await app.close();
  });

  const writes = (): { label: string; send: (auth?: string) => request.Test }[] => [
    { label: 'POST /api/v1/surveys', send: (auth) => withAuth(request(app.server).post('/api/v1/surveys'), auth).send(JSON.parse(demoJsonText)) },
    { label: 'POST revisions', send: (auth) => withAuth(request(app.server).post(`/api/v1/surveys/${id}/revisions`), auth).send(JSON.parse(demoJsonText)) },
    { label: 'POST share', send: (auth) => withAuth(request(app.server).post(`/api/v1/surveys/${id}/share`), auth) },
    { label: 'DELETE share', send: (auth) => withAuth(request(app.server).delete(`/api/v1/surveys/${id}/share`), auth) },
  ];

  function withAuth(test: request.Test, auth?: string): request.Test {
    return auth === undefined ? test : test.set('Authorization', auth);
  }

  it('answers 401 write_token_required without a token, and stores nothing', async () => {
    const before = app.store.countRows();
    for (const write of writes()) {
      const res = await write.send();
      expect(res.status, write.label).toBe(401);
      expect(res.body.error.code).toBe('write_token_required');
      expect(res.headers['www-authenticate']).toMatch(/^Bearer/);
    }
    expect(app.store.countRows()).toEqual(before);
  });

  it('answers 401 write_token_invalid with a wrong token, and stores nothing', async () => {
    const before = app.store.countRows();
    for (const auth of [`Bearer ${TOKEN}x`, 'Bearer nope', `Bearer ${TOKEN.slice(0, -1)}`]) {
      for (const write of writes()) {
        const res = await write.send(auth);
        expect(res.status, `${write.label} ${auth}`).toBe(401);
        expect(res.body.error.code).toBe('write_token_invalid');
      }
    }
    const basic = await writes()[0].send(`Basic ${Buffer.from(`user:${TOKEN}`).toString('base64')}`);
    expect(basic.status).toBe(401);
    expect(app.store.countRows()).toEqual(before);
  });

  it('checks the token before reading the body', async () => {
    const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', 'application/json').send('{not json');
    expect(res.status).toBe(401);
  });

  it('accepts the right token: 201 on store and revision, 201/204 on share management', async () => {
    const auth = `Bearer ${TOKEN}`;
    const [store, revise, reshare, revoke] = writes();
    expect((await store.send(auth)).status).toBe(201);
    expect((await revise.send(auth)).status).toBe(201);
    expect((await reshare.send(auth)).status).toBe(201);
    expect((await revoke.send(auth)).status).toBe(204);
  });

  it('keeps reads, share pages and the stateless interpretation open', async () => {
    expect((await request(app.server).get('/healthz')).status).toBe(200);
    expect((await request(app.server).get('/api/v1/surveys')).status).toBe(200);
    expect((await request(app.server).get(`/api/v1/surveys/${id}`)).status).toBe(200);
    expect((await request(app.server).get(`/api/v1/surveys/${id}/stations.csv`)).status).toBe(200);
    expect((await request(app.server).post('/api/v1/interpretations').send(JSON.parse(demoJsonText))).status).toBe(200);
    const share = await request(app.server).post(`/api/v1/surveys/${id}/share`).set('Authorization', `Bearer ${TOKEN}`);
    expect((await request(app.server).get(share.body.shareUrl)).status).toBe(200);
  });
});

describe('write token on loopback', () => {
  it('is not needed when none is configured', async () => {
    const app = await buildApp({ dataDir: ':memory:', host: '127.0.0.1' });
    try {
      await app.ready();
      expect((await request(app.server).post('/api/v1/surveys').send(JSON.parse(demoJsonText))).status).toBe(201);
    } finally {
      await app.close();
    }
  });

  it('is enforced when one is configured', async () => {
    const app = await buildApp({ dataDir: ':memory:', host: 'localhost', writeToken: TOKEN });
    try {
      await app.ready();
      expect((await request(app.server).post('/api/v1/surveys').send(JSON.parse(demoJsonText))).status).toBe(401);
      const ok = await request(app.server).post('/api/v1/surveys').set('Authorization', `bearer ${TOKEN}`).send(JSON.parse(demoJsonText));
      expect(ok.status).toBe(201);
    } finally {
      await app.close();
    }
  });
});

describe('refusing to start', () => {
  it('buildApp refuses a non-loopback host without a write token, naming the variable', async () => {
    for (const host of ['0.0.0.0', '::', '192.0.2.10', 'survey-office.example']) {
      await expect(buildApp({ dataDir: ':memory:', host }), host).rejects.toThrow(/ARCLINE_WRITE_TOKEN/);
      await expect(buildApp({ dataDir: ':memory:', host })).rejects.toBeInstanceOf(ConfigError);
    }
  });

  it('buildApp refuses options that make no sense', async () => {
    await expect(buildApp({ dataDir: '' })).rejects.toThrow(/dataDir/);
    await expect(buildApp({ dataDir: ':memory:', bodyLimitBytes: -5 })).rejects.toThrow(/bodyLimitBytes/);
    await expect(buildApp({ dataDir: ':memory:', writeToken: 'two words' })).rejects.toThrow(/write token/);
    await expect(buildApp({ dataDir: ':memory:', writeToken: 'x' })).rejects.toThrow(/at least 32/);
  });

  it('startService refuses HOST=0.0.0.0 without ARCLINE_WRITE_TOKEN and listens on nothing', async () => {
    const dataDir = mkdtempSync(join(tmpdir(), 'arcline-refuse-'));
    try {
      await expect(startService({ HOST: '0.0.0.0', PORT: '0', DATA_DIR: dataDir }, { logger: false })).rejects.toThrow(
        /Refusing to start on 0\.0\.0\.0 without a write token/,
      );
    } finally {
      rmSync(dataDir, { recursive: true, force: true });
    }
  });
});

describe('readConfig', () => {
  it('gives the documented defaults', () => {
    expect(readConfig({})).toEqual({ host: '127.0.0.1', allowedHosts: [], writeRateLimit: 60, port: 8080, dataDir: './data', writeToken: undefined, seedDemo: true });
  });

  it('reads every variable', () => {
    const env = { HOST: '0.0.0.0', PORT: '9000', DATA_DIR: '/srv/arcline', ARCLINE_WRITE_TOKEN: TOKEN, ARCLINE_SEED_DEMO: '0', ARCLINE_ALLOWED_HOSTS: 'Arcline.Office.example, 10.0.0.12,[fd00::5]', ARCLINE_WRITE_RATE_LIMIT: '0' };
    expect(readConfig(env)).toEqual({
      host: '0.0.0.0',
      allowedHosts: ['arcline.office.example', '10.0.0.12', 'fd00::5'],
      writeRateLimit: 0,
      port: 9000,
      dataDir: '/srv/arcline',
      writeToken: TOKEN,
      seedDemo: false,
    });
  });

  it('rejects a bad PORT, a token with spaces and a bad flag with a message naming the variable', () => {
    for (const port of ['http', '80.5', '-1', '70000']) {
      expect(() => readConfig({ PORT: port }), port).toThrow(/PORT/);
    }
    expect(() => readConfig({ ARCLINE_WRITE_TOKEN: 'a b' })).toThrow(/ARCLINE_WRITE_TOKEN/);
    expect(() => readConfig({ ARCLINE_SEED_DEMO: 'maybe' })).toThrow(/ARCLINE_SEED_DEMO/);
  });
});

describe('isLoopbackHost and tokensMatch', () => {
  it('knows loopback from everything else', () => {
    for (const host of ['127.0.0.1', '127.1.2.3', '::1', '[::1]', 'localhost', 'LOCALHOST', '::ffff:127.0.0.1']) {
      expect(isLoopbackHost(host), host).toBe(true);
    }
    for (const host of ['0.0.0.0', '::', '10.0.0.5', '128.0.0.1', 'example.org', '::ffff:10.0.0.1', 'localhost.example.org']) {
      expect(isLoopbackHost(host), host).toBe(false);
    }
  });

  it('matches only the exact token', () => {
    expect(tokensMatch(TOKEN, TOKEN)).toBe(true);
    expect(tokensMatch(`${TOKEN} `, TOKEN)).toBe(false);
    expect(tokensMatch('', TOKEN)).toBe(false);
    expect(tokensMatch(TOKEN.toUpperCase(), TOKEN)).toBe(false);
  });
});

describe('startService', () => {
  it('listens on a real socket, seeds the two demo lines into an empty store once, and keeps them across restarts', async () => {
    const dataDir = mkdtempSync(join(tmpdir(), 'arcline-start-'));
    try {
      const first = await startService({ HOST: '127.0.0.1', PORT: '0', DATA_DIR: dataDir }, { logger: false });
      let ids: string[];
      try {
        expect(first.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
        const health = await fetch(new URL('healthz', first.url));
        expect(health.status).toBe(200);
        // The demo pick line (newest) and the line of its seismograph files (server/seed.ts).
        const list = (await (await fetch(new URL('api/v1/surveys', first.url))).json()) as { id: string; name: string }[];
        expect(list.map((s) => s.name)).toEqual([JSON.parse(demoJsonText).name, DEMO_GATHERS_LINE_NAME]);
        ids = list.map((s) => s.id);
        for (const id of ids) {
          const detail = await fetch(new URL(`api/v1/surveys/${id}`, first.url));
          expect(detail.status).toBe(200);
        }
      } finally {
        await first.app.close();
      }
      const second = await startService({ HOST: '127.0.0.1', PORT: '0', DATA_DIR: dataDir }, { logger: false });
      try {
        const list = (await (await fetch(new URL('api/v1/surveys', second.url))).json()) as { id: string }[];
        expect(list.map((s) => s.id)).toEqual(ids);
      } finally {
        await second.app.close();
      }
    } finally {
      rmSync(dataDir, { recursive: true, force: true });
    }
  });

  it('does not seed when ARCLINE_SEED_DEMO=0', async () => {
    const dataDir = mkdtempSync(join(tmpdir(), 'arcline-noseed-'));
    try {
      const { app } = await startService({ HOST: '127.0.0.1', PORT: '0', DATA_DIR: dataDir, ARCLINE_SEED_DEMO: '0' }, { logger: false });
      try {
        expect(app.store.countRows().surveys).toBe(0);
      } finally {
        await app.close();
      }
    } finally {
      rmSync(dataDir, { recursive: true, force: true });
    }
  });
});
