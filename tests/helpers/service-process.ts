/**
 * The built service (dist/server/main.js) as a child process on a free loopback port, for
 * tests that must kill it (durability) or run it as another user (a read-only data folder).
 * ensureBuilt() runs the same stale-check build as npm start, once per test file.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll } from 'vitest';

export const ROOT = resolve(import.meta.dirname, '../..');

export function ensureBuilt(): void {
  const built = spawnSync(process.execPath, [resolve(ROOT, 'server/tools/build-if-stale.js')], { cwd: ROOT, encoding: 'utf8' });
  if (built.status !== 0) throw new Error(`build failed: ${built.stderr}`);
}

export function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address !== null ? address.port : 0;
      server.close(() => resolvePort(port));
    });
  });
}

export interface ServiceProcess {
  child: ChildProcess;
  base: string;
  /** Everything the process wrote to stderr and stdout so far. */
  output(): string;
  /** Resolves with the exit code (or the signal) once the process has ended. */
  exited: Promise<number | string | null>;
}

/**
 * Starts the service with DATA_DIR and the given environment; resolves once /healthz
 * answers, or rejects with the process's output if it exits first.
 */
export async function startServiceProcess(dataDir: string, env: Record<string, string> = {}, user?: { uid: number; gid: number }): Promise<ServiceProcess> {
  const port = await freePort();
  const child = spawn(process.execPath, [resolve(ROOT, 'dist/server/main.js')], {
    cwd: ROOT,
    env: { ...process.env, HOST: '127.0.0.1', PORT: String(port), DATA_DIR: dataDir, ARCLINE_SEED_DEMO: '0', ARCLINE_THREADS: '1', ARCLINE_WRITE_RATE_LIMIT: '0', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    ...(user ?? {}),
  });
  let output = '';
  child.stdout?.on('data', (d: Buffer) => (output += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (output += d.toString()));
  const exited = new Promise<number | string | null>((done) => child.once('exit', (code, signal) => done(code ?? signal)));
  const base = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (child.exitCode !== null || child.signalCode !== null) throw new Error(`the service exited at start: ${output}`);
    try {
      const res = await fetch(`${base}/healthz`);
      if (res.ok) break;
    } catch {
      /* not listening yet */
    }
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`the service did not answer /healthz within 30 s: ${output}`);
    }
    await new Promise((r) => setTimeout(r, 50));
  }
  return { child, base, output: () => output, exited };
}

/**
 * What a test file of service processes sets up: the build (once), the flat sample line,
 * and data folders that are removed after the file's tests.
 */
export function serviceProcessFixture(): { flatLine: () => Record<string, unknown>; dataDir: (prefix: string) => Promise<string> } {
  let line: Record<string, unknown> | null = null;
  const folders: string[] = [];
  beforeAll(async () => {
    ensureBuilt();
    line = JSON.parse(await readFile(resolve(ROOT, 'samples/flat-line.json'), 'utf8')) as Record<string, unknown>;
  }, 300_000);
  afterAll(async () => {
    for (const f of folders) await rm(f, { recursive: true, force: true });
  });
  return {
    flatLine: () => line!,
    dataDir: async (prefix) => {
      const dir = await mkdtemp(join(tmpdir(), prefix));
      folders.push(dir);
      return dir;
    },
  };
}
