/**
 * The app factory: checks its options, opens the store, wires plugins and returns the
 * Fastify instance without listening (server/main.ts listens; tests inject).
 */
import Fastify, { type FastifyInstance } from 'fastify';
import fastifyStatic from '@fastify/static';
import fastifySwagger from '@fastify/swagger';
import { ConfigError } from './config.js';
import { handleError, handleNotFound } from './errors.js';
import { addSecurityHeaders } from './security-headers.js';
import { SurveyStore } from './store.js';
import { isLoopbackHost, writeGuard } from './write-auth.js';
import { seedDemoLine } from './seed.js';
import { findWebRoot } from './web-root.js';
import { healthRoutes } from './routes/health.js';
import { interpretationRoutes } from './routes/interpretations.js';
import { surveyRoutes } from './routes/surveys.js';
import { shareRoutes } from './routes/share.js';
import { syntheticRoutes } from './routes/synthetic.js';
import { previewRoutes } from './routes/previews.js';
import { openApiOptions, openApiRoutes } from './routes/openapi.js';

export interface AppOptions {
  /** Folder of the SQLite store, or ':memory:' (tests). */
  dataDir: string;
  /** The address the service will listen on; decides whether a write token is mandatory. Default 127.0.0.1. */
  host?: string;
  /** Bearer token for write routes. Required when host is not loopback; enforced whenever set. */
  writeToken?: string;
  /** Store the demo line when the store is empty. Default false. */
  seedDemo?: boolean;
  /** Fastify's pino logger. Default false. */
  logger?: boolean;
  /** Largest accepted request body, bytes. Default 5 MiB. */
  bodyLimitBytes?: number;
  /** Folder served at /. Default: the project's web/ folder. */
  webRoot?: string | null;
}

export const DEFAULT_BODY_LIMIT_BYTES = 5 * 1024 * 1024;

declare module 'fastify' {
  interface FastifyInstance {
    store: SurveyStore;
  }
}

function checkOptions(options: AppOptions): Required<Omit<AppOptions, 'writeToken' | 'webRoot'>> & Pick<AppOptions, 'writeToken'> {
  if (options === null || typeof options !== 'object') throw new ConfigError('buildApp needs an options object.');
  if (typeof options.dataDir !== 'string' || options.dataDir.trim() === '') {
    throw new ConfigError('dataDir must name a folder for the store (or be ":memory:").');
  }
  const host = options.host ?? '127.0.0.1';
  if (typeof host !== 'string' || host.trim() === '') throw new ConfigError('host must be an address or host name.');
  const bodyLimitBytes = options.bodyLimitBytes ?? DEFAULT_BODY_LIMIT_BYTES;
  if (!Number.isInteger(bodyLimitBytes) || bodyLimitBytes < 1024) {
    throw new ConfigError(`bodyLimitBytes must be a whole number of at least 1024; got ${String(options.bodyLimitBytes)}.`);
  }
  const writeToken = options.writeToken === '' ? undefined : options.writeToken;
  if (writeToken !== undefined && (typeof writeToken !== 'string' || /\s/.test(writeToken))) {
    throw new ConfigError('The write token must be one word without spaces.');
  }
  if (!isLoopbackHost(host) && writeToken === undefined) {
    throw new ConfigError(
      `Refusing to start on ${host} without a write token: anyone on the network could store surveys. ` +
        'Set ARCLINE_WRITE_TOKEN to a long random string (e.g. `openssl rand -base64 32`), or listen on 127.0.0.1.',
    );
  }
  return {
    dataDir: options.dataDir,
    host,
    writeToken,
    seedDemo: options.seedDemo ?? false,
    logger: options.logger ?? false,
    bodyLimitBytes,
  };
}

export async function buildApp(options: AppOptions): Promise<FastifyInstance> {
  const checked = checkOptions(options);
  const store = new SurveyStore(checked.dataDir);
  const app = Fastify({
    logger: checked.logger,
    bodyLimit: checked.bodyLimitBytes,
    // Errors Fastify meets before routing (a badly encoded URL) get the same coded body and headers.
    frameworkErrors: (error, request, reply) => {
      void addSecurityHeaders(request, reply, undefined);
      handleError(error, request, reply);
    },
  });
  try {
    app.decorate('store', store);
    app.addHook('onClose', async () => store.close());
    app.setErrorHandler(handleError);
    app.setNotFoundHandler(handleNotFound);
    app.addHook('onSend', addSecurityHeaders);

    // JSON: Fastify's own parser (guards against __proto__ poisoning), except that an empty
    // body reaches the route as "no body" so the route can answer with its own message.
    const jsonParser = app.getDefaultJsonParser('error', 'error');
    app.addContentTypeParser('application/json', { parseAs: 'string' }, (request, body, done) => {
      if (body === '' || (typeof body === 'string' && body.trim() === '')) {
        done(null, undefined);
        return;
      }
      jsonParser(request, body as string, done);
    });
    // Only JSON and pick tables are accepted; Fastify's plain-text parser would let any text through.
    app.removeContentTypeParser('text/plain');
    // A pick table arrives as text; importPickTable reads it.
    app.addContentTypeParser('text/csv', { parseAs: 'string' }, (_request, body, done) => done(null, body));

    const guard = writeGuard(checked.writeToken);
    // Before the routes: it collects every route's schema as the route is added.
    await app.register(fastifySwagger, openApiOptions);
    await app.register(openApiRoutes);
    await app.register(healthRoutes);
    await app.register(interpretationRoutes);
    await app.register(surveyRoutes, { store, guard });
    await app.register(shareRoutes, { store });
    await app.register(syntheticRoutes);
    await app.register(previewRoutes);

    const webRoot = options.webRoot === undefined ? findWebRoot() : options.webRoot;
    if (webRoot !== null) {
      await app.register(fastifyStatic, { root: webRoot, prefix: '/', index: ['index.html'] });
    }

    if (checked.seedDemo) {
      const id = await seedDemoLine(store);
      if (id !== null) app.log.info({ id }, 'stored the demo line in the empty store');
    }
    return app;
  } catch (error) {
    await app.close();
    throw error;
  }
}
