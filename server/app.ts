/**
 * The app factory: checks its options, opens the store, wires plugins and returns the
 * Fastify instance without listening (server/main.ts listens; tests inject).
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import Fastify, { type FastifyInstance } from 'fastify';
import fastifyStatic from '@fastify/static';
import fastifySwagger from '@fastify/swagger';
import { ConfigError, checkWriteToken, readAllowedHosts } from './config.js';
import { AppError, handleError, handleNotFound } from './errors.js';
import { binaryBody } from './binary-body.js';
import { preRoutingHeaders, securityHeaders } from './security-headers.js';
import { withLimit, writeLimiter } from './write-limit.js';
import { SurveyStore } from './store.js';
import { isLoopbackHost, writeGuard, writerCheck } from './write-auth.js';
import { hostCheck, originCheck } from './request-origin.js';
import { seedDemoLines } from './seed.js';
import { demoGathersRoute, findSamplesDir } from './demo-gathers-route.js';
import { findWebRoot } from './web-root.js';
import { displayRulesRoute } from './display-rules-route.js';
import { healthRoutes } from './routes/health.js';
import { interpretationRoutes } from './routes/interpretations.js';
import { surveyRoutes } from './routes/surveys.js';
import { shareRoutes } from './routes/share.js';
import { syntheticRoutes } from './routes/synthetic.js';
import { previewRoutes } from './routes/previews.js';
import { exportRoutes } from './routes/exports.js';
import { surveyGatherRoutes } from './routes/survey-gathers.js';
import { gatherRoutes } from './routes/gathers.js';
import { ComputePool, type ComputePoolOptions } from './compute/pool.js';
import { openApiOptions, openApiRoutes } from './routes/openapi.js';

export interface AppOptions {
  /** Folder of the SQLite store, or ':memory:' (tests). */
  dataDir: string;
  /** The address the service will listen on; decides whether a write token is mandatory. Default 127.0.0.1. */
  host?: string;
  /** Bearer token for write routes. Required when host is not loopback; enforced whenever set; at least MIN_WRITE_TOKEN_LENGTH characters. */
  writeToken?: string;
  /**
   * Writes per minute per client address on the guarded write routes (server/write-limit.ts);
   * 0 for no limit. Default 0 here (tests); the service started from the environment uses
   * ARCLINE_WRITE_RATE_LIMIT, default DEFAULT_WRITES_PER_MINUTE.
   */
  writeRateLimit?: number;
  /** Further host names the service answers to (the Host header), beside those of `host` (server/request-origin.ts). */
  allowedHosts?: string[];
  /** Store the two demo lines (picks, and seismograph files: server/seed.ts) when the store is empty. Default false. */
  seedDemo?: boolean;
  /** Fastify's pino logger. Default false. */
  logger?: boolean;
  /** Largest accepted request body, bytes. Default 5 MiB. */
  bodyLimitBytes?: number;
  /** Folder served at /. Default: the project's web/ folder. */
  webRoot?: string | null;
  /** Worker threads, queue length and time limit of the compute pool (server/compute/pool.ts). */
  compute?: ComputePoolOptions;
  /**
   * The whole request (headers and body) must arrive within this, ms; a client trickling
   * its body is cut off. Default DEFAULT_REQUEST_TIMEOUT_MS.
   */
  requestTimeoutMs?: number;
  /** Largest the store file may grow, MB; a write past it answers 507 store_full (a quota, and how disk-full is tested). Default: no limit. */
  storeMaxMb?: number;
}

/**
 * Default time for a request to arrive, ms: a 5 MiB body over a slow office link takes a
 * few seconds; 30 s leaves room and still frees a connection held by a trickle. Our choice.
 */
export const DEFAULT_REQUEST_TIMEOUT_MS = 30_000;

export const DEFAULT_BODY_LIMIT_BYTES = 5 * 1024 * 1024;

export interface RouteEntry {
  method: string;
  url: string;
}

declare module 'fastify' {
  interface FastifyInstance {
    store: SurveyStore;
    compute: ComputePool;
    /** Every route as it was added (method and URL pattern): the route-walk test reads it. */
    routeTable: readonly RouteEntry[];
  }
}

function checkOptions(options: AppOptions): Required<Omit<AppOptions, 'writeToken' | 'webRoot' | 'compute' | 'storeMaxMb'>> & Pick<AppOptions, 'writeToken'> {
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
  const requestTimeoutMs = options.requestTimeoutMs ?? DEFAULT_REQUEST_TIMEOUT_MS;
  if (!Number.isInteger(requestTimeoutMs) || requestTimeoutMs < 100) {
    throw new ConfigError(`requestTimeoutMs must be a whole number of at least 100; got ${String(options.requestTimeoutMs)}.`);
  }
  const rawToken = options.writeToken === '' ? undefined : options.writeToken;
  if (rawToken !== undefined && typeof rawToken !== 'string') throw new ConfigError('The write token must be a string.');
  const writeToken = rawToken === undefined ? undefined : checkWriteToken(rawToken, 'The write token');
  const writeRateLimit = options.writeRateLimit ?? 0;
  if (!Number.isInteger(writeRateLimit) || writeRateLimit < 0) {
    throw new ConfigError(`writeRateLimit must be a whole number of writes per minute (0 for no limit); got ${String(options.writeRateLimit)}.`);
  }
  const allowedHosts = options.allowedHosts ?? [];
  if (!Array.isArray(allowedHosts) || allowedHosts.some((name) => typeof name !== 'string')) {
    throw new ConfigError('allowedHosts must be a list of host names.');
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
    allowedHosts: readAllowedHosts(allowedHosts.join(',')),
    writeRateLimit,
    seedDemo: options.seedDemo ?? false,
    logger: options.logger ?? false,
    bodyLimitBytes,
    requestTimeoutMs,
  };
}

/**
 * The HTTP server with its clocks set: a request (headers and body) must arrive whole
 * within `requestTimeoutMs` (Node answers 408 and closes: a trickled body is cut off; it
 * checks every CONNECTION_CHECK_MS, so the cut comes at most that much later), and an
 * idle socket is closed after that plus the compute time limit (a socket is idle while
 * its answer is computed).
 */
function timedServer(handler: (req: IncomingMessage, res: ServerResponse) => void, requestTimeoutMs: number, timeLimitMs: number): Server {
  const server = createServer(
    {
      requestTimeout: requestTimeoutMs,
      headersTimeout: Math.min(requestTimeoutMs, HEADERS_TIMEOUT_MS),
      connectionsCheckingInterval: CONNECTION_CHECK_MS,
      keepAliveTimeout: KEEP_ALIVE_TIMEOUT_MS,
    },
    handler,
  );
  server.setTimeout(requestTimeoutMs + timeLimitMs);
  return server;
}

/** Headers must arrive within this, ms (Node's own default is 60 s). Our choice. */
const HEADERS_TIMEOUT_MS = 10_000;
/** How often Node checks request and header timeouts, ms (its default, 30 s, would let a trickle last that long). */
const CONNECTION_CHECK_MS = 1_000;
/** An idle keep-alive connection is closed after this, ms. Node's default. */
const KEEP_ALIVE_TIMEOUT_MS = 5_000;

/** The body as UTF-8 text; a binary file is refused by name (400 seg2_file / binary_body), its bytes never echoed. */
function textOf(body: Buffer): string {
  const binary = binaryBody(body);
  if (binary !== null) throw new AppError(binary.kind === 'seg2' ? 'seg2_file' : 'binary_body', { message: binary.message });
  return body.toString('utf8');
}

export async function buildApp(options: AppOptions): Promise<FastifyInstance> {
  const checked = checkOptions(options);
  const store = new SurveyStore(checked.dataDir, { maxMb: options.storeMaxMb });
  const compute = new ComputePool(options.compute);
  const app = Fastify({
    logger: checked.logger,
    bodyLimit: checked.bodyLimitBytes,
    serverFactory: (handler) => timedServer(handler, checked.requestTimeoutMs, compute.timeLimitMs),
    // Errors Fastify meets before routing (a badly encoded URL) get the same coded body and headers.
    frameworkErrors: (error, request, reply) => {
      preRoutingHeaders(reply);
      handleError(error, request, reply);
    },
  });
  try {
    app.decorate('store', store);
    app.decorate('compute', compute);
    const routeTable: RouteEntry[] = [];
    // O(1) per route added.
    app.addHook('onRoute', (route) => {
      for (const method of [route.method].flat()) routeTable.push({ method, url: route.url });
    });
    app.decorate('routeTable', routeTable);
    // Workers stop first, so requests still waiting on them answer at once (503) and the
    // server can close within a second even while a long line is being computed.
    app.addHook('preClose', async () => compute.close());
    app.addHook('onClose', async () => store.close());
    app.setErrorHandler(handleError);
    app.setNotFoundHandler(handleNotFound);
    await securityHeaders(app);

    // Every body is read as bytes first, so a file sent by mistake (a SEG-2 record, a
    // workbook) is named for what it is and never decoded and quoted back (binary-body.ts).
    // JSON: Fastify's own parser (guards against __proto__ poisoning), except that an empty
    // body reaches the route as "no body" so the route can answer with its own message.
    const jsonParser = app.getDefaultJsonParser('error', 'error');
    app.addContentTypeParser('application/json', { parseAs: 'buffer' }, (request, body, done) => {
      let text: string;
      try {
        text = textOf(body as Buffer);
      } catch (error) {
        done(error as Error, undefined);
        return;
      }
      if (text.trim() === '') {
        done(null, undefined);
        return;
      }
      jsonParser(request, text, done);
    });
    // Only JSON and pick tables are accepted; Fastify's plain-text parser would let any text through.
    app.removeContentTypeParser('text/plain');
    // A pick table arrives as text; importPickTable reads it.
    app.addContentTypeParser('text/csv', { parseAs: 'buffer' }, (_request, body, done) => {
      try {
        done(null, textOf(body as Buffer));
      } catch (error) {
        done(error as Error, undefined);
      }
    });
    // Any other media type (or none): a file is named, anything else is the wrong type.
    app.addContentTypeParser('*', { parseAs: 'buffer' }, (_request, body, done) => {
      try {
        textOf(body as Buffer);
        done(new AppError('unsupported_content_type'), undefined);
      } catch (error) {
        done(error as Error, undefined);
      }
    });

    // Before every route (hooks apply to routes added after them): a foreign Host is
    // refused on every route but /healthz, a write from another site's page on every route.
    app.addHook('onRequest', hostCheck(checked.host, checked.allowedHosts));
    app.addHook('onRequest', originCheck);

    // The write routes' onRequest: the rate limit (guesses at the token count), then the token.
    const guard = withLimit(await writeLimiter(app, checked.writeRateLimit), writeGuard(checked.writeToken));
    const isWriter = writerCheck(checked.writeToken);
    // Before the routes: it collects every route's schema as the route is added.
    await app.register(fastifySwagger, openApiOptions);
    await app.register(openApiRoutes);
    await app.register(healthRoutes);
    await app.register(interpretationRoutes);
    await app.register(surveyRoutes, { store, guard, isWriter });
    await app.register(shareRoutes, { store });
    await app.register(syntheticRoutes);
    await app.register(previewRoutes);
    await app.register(exportRoutes, { store });
    await app.register(gatherRoutes);
    await app.register(surveyGatherRoutes, { store, guard });

    const webRoot = options.webRoot === undefined ? findWebRoot() : options.webRoot;
    if (webRoot !== null) {
      await app.register(fastifyStatic, { root: webRoot, prefix: '/', index: ['index.html'] });
      // The page imports the display rules from the engine (one copy for every reader).
      await app.register(displayRulesRoute);
      // Demo A's seismograph files for the page's "Load the demo gathers".
      const samplesDir = findSamplesDir();
      if (samplesDir !== null) await app.register(demoGathersRoute, { samplesDir });
    }

    if (checked.seedDemo) {
      const seeded = await seedDemoLines(store, compute);
      if (seeded !== null) app.log.info(seeded, 'stored the demo lines (picks, and seismograph files) in the empty store');
    }
    return app;
  } catch (error) {
    await app.close();
    await compute.close();
    throw error;
  }
}
