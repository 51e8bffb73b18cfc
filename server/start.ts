/**
 * Starting the service from the environment: read config, build, listen. main.ts calls
 * this and turns a ConfigError into a clear message and exit code 1; tests call it too.
 */
import type { FastifyInstance } from 'fastify';
import { buildApp } from './app.js';
import { readConfig } from './config.js';

export async function startService(env: NodeJS.ProcessEnv, options: { logger?: boolean } = {}): Promise<{ app: FastifyInstance; url: string }> {
  const config = readConfig(env);
  const app = await buildApp({
    dataDir: config.dataDir,
    host: config.host,
    allowedHosts: config.allowedHosts,
    writeRateLimit: config.writeRateLimit,
    writeToken: config.writeToken,
    seedDemo: config.seedDemo,
    compute: { threads: config.threads, maxQueued: config.maxQueued, timeLimitMs: config.timeLimitMs },
    requestTimeoutMs: config.requestTimeoutMs,
    storeMaxMb: config.storeMaxMb,
    logger: options.logger ?? true,
  });
  try {
    await app.listen({ host: config.host, port: config.port });
  } catch (error) {
    await app.close();
    throw error;
  }
  const address = app.server.address();
  const port = typeof address === 'object' && address !== null ? address.port : config.port;
  const shownHost = config.host.includes(':') && !config.host.startsWith('[') ? `[${config.host}]` : config.host;
  return { app, url: `http://${shownHost}:${port}/` };
}
