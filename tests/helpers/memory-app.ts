/**
 * The service on an in-memory store for one test file: built before its tests, closed after.
 * `const server = memoryApp();` then `server.app.inject(…)` inside the tests.
 */
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll } from 'vitest';
import { buildApp } from '../../server/app.js';

export function memoryApp(options: Partial<Parameters<typeof buildApp>[0]> = {}): { app: FastifyInstance } {
  const holder = {} as { app: FastifyInstance };
  beforeAll(async () => {
    holder.app = await buildApp({ dataDir: ':memory:', webRoot: null, ...options });
    await holder.app.ready();
  });
  afterAll(async () => {
    await holder.app.close();
  });
  return holder;
}
