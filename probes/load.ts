/**
 * npm run load: a busy morning on loopback, bounded in time (about 40 s). The built service
 * runs as its own process (fresh data folder, default pool); this process stores the demo
 * line, then for LOAD_SECONDS at 10 and again at 50 connections per stream sends, at once:
 *   - POST /api/v1/interpretations of the demo line,
 *   - GET /api/v1/surveys/:id/section.svg of the stored line,
 * while one maximum-size line (1,024 geophones, 64 shots) is interpreted over and over in
 * the background. Reports requests, p50 and p99 latency and the answers by status for each
 * stream; any answer other than 2xx and the documented 503 (service_busy, with
 * Retry-After) is an error. Figures, not assertions.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { availableParallelism, loadavg } from 'node:os';
import { join, resolve } from 'node:path';
import { tmpdir } from 'node:os';
import autocannon, { type Result } from 'autocannon';
import { maximumBenchLine } from '../bench/lines.js';

const root = resolve(new URL('../..', import.meta.url).pathname);
const LOAD_SECONDS = 8;

function statusLine(r: Result): { text: string; errors: number } {
  const stats = r.statusCodeStats ?? {};
  const parts = Object.entries(stats).map(([code, s]) => `${code}: ${s.count}`);
  const errors = Object.entries(stats).filter(([code]) => !(code.startsWith('2') || code === '503')).reduce((n, [, s]) => n + s.count, 0) + r.errors + r.timeouts;
  return { text: parts.join(', ') + (r.errors + r.timeouts > 0 ? `, socket errors ${r.errors}, timeouts ${r.timeouts}` : ''), errors };
}

async function main(): Promise<void> {
  const dataDir = mkdtempSync(join(tmpdir(), 'arcline-load-'));
  const port = 30_000 + Math.floor(Math.random() * 20_000);
  const child = spawn(process.execPath, [join(root, 'dist/server/main.js')], {
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATA_DIR: dataDir, ARCLINE_SEED_DEMO: '0', ARCLINE_TIME_LIMIT_MS: '30000', ARCLINE_WRITE_RATE_LIMIT: '0' },
    stdio: 'ignore',
  });
  const base = `http://127.0.0.1:${port}`;
  for (let k = 0; k < 200; k++) {
    if (await fetch(`${base}/healthz`).then((r) => r.ok, () => false)) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  const demo = readFileSync(join(root, 'samples/demo-line.json'), 'utf8');
  const stored = (await (await fetch(`${base}/api/v1/surveys`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: demo })).json()) as { id: string };
  const big = JSON.stringify(maximumBenchLine());
  console.log(`Load on loopback, ${availableParallelism()} cores, load average ${loadavg()[0].toFixed(1)}; ${LOAD_SECONDS} s per step; a 1,024 × 64 line interpreted over and over in the background`);
  console.log('| connections per stream | stream | requests | p50 ms | p99 ms | answers | errors |');
  console.log('|---|---|---|---|---|---|---|');
  let totalErrors = 0;
  for (const connections of [10, 50]) {
    let running = true;
    let bigDone = 0;
    const bigStatuses = new Map<number, number>();
    const background = (async () => {
      while (running) {
        const res = await fetch(`${base}/api/v1/interpretations`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: big }).catch(() => null);
        if (res) {
          bigStatuses.set(res.status, (bigStatuses.get(res.status) ?? 0) + 1);
          await res.arrayBuffer();
        }
        bigDone++;
      }
    })();
    const [interpretations, sections] = await Promise.all([
      autocannon({ url: `${base}/api/v1/interpretations`, method: 'POST', headers: { 'content-type': 'application/json' }, body: demo, connections, duration: LOAD_SECONDS, timeout: 30 }),
      autocannon({ url: `${base}/api/v1/surveys/${stored.id}/section.svg`, connections, duration: LOAD_SECONDS, timeout: 30 }),
    ]);
    running = false;
    await background;
    for (const [name, r] of [['POST interpretations (demo line)', interpretations], ['GET section.svg (stored line)', sections]] as const) {
      const s = statusLine(r);
      totalErrors += s.errors;
      console.log(`| ${connections} | ${name} | ${r.requests.total} | ${r.latency.p50} | ${r.latency.p99} | ${s.text} | ${s.errors} |`);
    }
    const bigErrors = [...bigStatuses.entries()].filter(([c]) => !(c < 300 || c === 503)).reduce((n, [, k]) => n + k, 0);
    totalErrors += bigErrors;
    console.log(`| ${connections} | background 1,024 × 64 line | ${bigDone} | – | – | ${[...bigStatuses.entries()].map(([c, k]) => `${c}: ${k}`).join(', ')} | ${bigErrors} |`);
  }
  child.kill('SIGTERM');
  rmSync(dataDir, { recursive: true, force: true });
  console.log(`errors (answers other than 2xx and 503, socket errors, timeouts): ${totalErrors}`);
  process.exitCode = totalErrors > 0 ? 1 : 0;
}

await main();
