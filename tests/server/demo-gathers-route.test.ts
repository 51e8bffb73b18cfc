// Demo A's seismograph files served for the page's "Load the demo gathers"
// (server/demo-gathers-route.ts): the bytes are those the demo writer makes
// (engine/samples/demo-gathers.ts, the same as samples/), the page's list names them all,
// and nothing else of samples/ is served.
import { afterAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { buildApp } from '../../server/app.js';
import { demoGathers } from '../../engine/samples/demo-gathers.js';
import { DEMO_GATHER_FILES } from '../../web/drop-files.js';

const app = await buildApp({ dataDir: ':memory:' });
await app.ready();
afterAll(() => app.close());

describe('GET /samples/<demo gather file>', () => {
  it('serves every file the page asks for, byte for byte as the writer makes it', async () => {
    const made = new Map(demoGathers().map((g) => [g.fileName, Buffer.from(g.bytes)]));
    for (const name of DEMO_GATHER_FILES) {
      const res = await request(app.server).get(`/samples/${name}`).buffer(true).parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      });
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('application/octet-stream');
      expect(Buffer.compare(res.body as Buffer, made.get(name)!)).toBe(0);
    }
  });
  it('serves nothing else of samples/', async () => {
    for (const path of ['/samples/demo-line.json', '/samples/demo-line.csv', '/samples/..%2Fpackage.json', '/samples/demo-line-nope.sg2']) {
      const res = await request(app.server).get(path);
      expect(res.status).toBe(404);
    }
  });
});
