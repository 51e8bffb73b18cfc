/**
 * HTTP benchmark of the service (second part of `npm run bench`), on loopback only and
 * bounded in time (about 30 s). Reports, in one run:
 * - throughput of POST /api/v1/interpretations with the demo line, residuals off and on,
 *   against a route that only parses and echoes the same body (the JSON floor), as ratios;
 * - /healthz p99 latency on an idle service and while a maximum-size line (1,024 geophones,
 *   64 shots, residuals off) is being interpreted;
 * - how long SIGTERM-style closing takes while that line is being computed.
 * Figures, never assertions: speed is not tested, it is measured here.
 */
import { availableParallelism, cpus, loadavg } from 'node:os';
import autocannon from 'autocannon';
import { buildApp } from '../server/app.js';
import { demoLine } from '../engine/samples/demo-lines.js';
import { maximumBenchLine } from './lines.js';

const SECONDS = 5;
const CONNECTIONS = 10;

async function main(): Promise<void> {
  const app = await buildApp({ dataDir: ':memory:', bodyLimitBytes: 8 * 1024 * 1024 });
  // The floor: Fastify parsing the same JSON body and echoing it, nothing else.
  app.post('/bench/echo', async (request) => request.body);
  await app.listen({ host: '127.0.0.1', port: 0 });
  const address = app.server.address();
  const base = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
  const headers = { 'content-type': 'application/json' };
  const demo = demoLine();
  const bodyOff = JSON.stringify({ ...demo, options: { ...demo.options, residuals: false } });
  const bodyOn = JSON.stringify({ ...demo, options: { ...demo.options, residuals: true } });

  const post = (path: string, body: string) =>
    autocannon({ url: base + path, method: 'POST', headers, body, connections: CONNECTIONS, duration: SECONDS });
  // Warm the workers (module loading, JIT) before measuring.
  for (let i = 0; i < 2 * app.compute.threads; i++) await fetch(base + '/api/v1/interpretations', { method: 'POST', headers, body: bodyOn });

  const echo = await post('/bench/echo', bodyOn);
  const off = await post('/api/v1/interpretations', bodyOff);
  const on = await post('/api/v1/interpretations', bodyOn);
  const idle = await autocannon({ url: base + '/healthz', connections: 1, duration: 3 });

  const heavy = JSON.stringify(maximumBenchLine());
  const started = performance.now();
  const heavyAnswer = fetch(base + '/api/v1/interpretations', { method: 'POST', headers, body: heavy }).then(async (r) => ({
    status: r.status,
    ms: performance.now() - started,
    code: r.ok ? '' : ((await r.json()) as { error: { code: string } }).error.code,
  }));
  await new Promise((r) => setTimeout(r, 200));
  const busy = await autocannon({ url: base + '/healthz', connections: 1, duration: 3 });
  const heavyResult = await heavyAnswer;

  // Closing while a maximum line is being computed (what SIGTERM does in server/main.ts).
  const again = fetch(base + '/api/v1/interpretations', { method: 'POST', headers, body: heavy }).then((r) => r.status);
  await new Promise((r) => setTimeout(r, 500));
  const closing = performance.now();
  await app.close();
  const closeMs = performance.now() - closing;
  const againStatus = await again.catch(() => 'connection closed');

  const rps = (r: { requests: { average: number } }): string => r.requests.average.toFixed(0);
  const rows = [
    ['echo route (parse + serialise the demo line)', rps(echo), '1', `${echo.non2xx} non-2xx`],
    ['POST /api/v1/interpretations, residuals off', rps(off), (off.requests.average / echo.requests.average).toFixed(4), `p99 ${off.latency.p99} ms, ${off.non2xx} non-2xx`],
    ['POST /api/v1/interpretations, residuals on', rps(on), (on.requests.average / echo.requests.average).toFixed(4), `p99 ${on.latency.p99} ms, ${on.non2xx} non-2xx`],
  ];
  console.log(`\n## HTTP (${new Date().toISOString().slice(0, 10)}, ${cpus()[0]?.model ?? 'cpu'}, ${availableParallelism()} cores, load ${loadavg()[0].toFixed(2)}, ${app.compute.threads} worker threads)`);
  console.log(`${CONNECTIONS} connections, ${SECONDS} s each, demo line (24 geophones, 5 shots)\n`);
  console.log('| route | requests/s | ratio to echo | notes |');
  console.log('|---|---|---|---|');
  for (const r of rows) console.log(`| ${r.join(' | ')} |`);
  console.log('\n| /healthz | p50 ms | p99 ms | max ms |');
  console.log('|---|---|---|---|');
  console.log(`| idle service | ${idle.latency.p50} | ${idle.latency.p99} | ${idle.latency.max} |`);
  console.log(`| while a 1024-geophone, 64-shot line is interpreted | ${busy.latency.p50} | ${busy.latency.p99} | ${busy.latency.max} |`);
  console.log(
    `\nThe maximum line answered ${heavyResult.status}${heavyResult.code ? ` ${heavyResult.code}` : ''} after ${heavyResult.ms.toFixed(0)} ms. ` +
      `Closing the service while it computed a second one took ${closeMs.toFixed(0)} ms (that request: ${againStatus}).`,
  );
}

await main();
