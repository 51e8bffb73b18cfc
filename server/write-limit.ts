/**
 * A rate limit on writes (@fastify/rate-limit): at most `perMinute` writes per client
 * address per minute, over every guarded write route together (store, revisions, share
 * links, gather uploads). It runs before the token check, so guesses at the write token
 * count too. Reads, share pages and the open writes that store nothing (interpretations,
 * previews, synthetic lines, gather picks) are not limited: the compute pool's queue
 * bounds those (503 service_busy). One bucket per address: behind a proxy every client
 * shares the proxy's address (set the limit for the whole office then, or 0 for none).
 * Counters live in memory (a restart clears them); a refused write answers 429
 * rate_limited with Retry-After in seconds.
 */
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import fastifyRateLimit from '@fastify/rate-limit';
import { AppError } from './errors.js';

/** Default writes per minute per client: generous for people at a page or a batch script. Our choice. */
export const DEFAULT_WRITES_PER_MINUTE = 60;

const MINUTE_MS = 60_000;

export type RequestHook = (request: FastifyRequest, reply: FastifyReply) => Promise<void>;

/** The limiter as an onRequest hook, or null when `perMinute` is 0 (no limit). */
export async function writeLimiter(app: FastifyInstance, perMinute: number): Promise<RequestHook | null> {
  if (perMinute === 0) return null;
  await app.register(fastifyRateLimit, { global: false });
  const limit = app.rateLimit({
    max: perMinute,
    timeWindow: MINUTE_MS,
    errorResponseBuilder: (_request, context) =>
      new AppError('rate_limited', {
        message: `Too many writes from this address: at most ${context.max} a minute. Try again in ${context.after}; nothing was stored.`,
      }),
  });
  return async (request, reply) => {
    await limit.call(app, request, reply);
  };
}

/** The write hooks in order: the limit (if any), then the token. */
export function withLimit(limit: RequestHook | null, guard: (request: FastifyRequest) => Promise<void>): RequestHook {
  if (limit === null) return async (request) => guard(request);
  return async (request, reply) => {
    await limit(request, reply);
    await guard(request);
  };
}
