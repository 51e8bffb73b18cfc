/**
 * Security headers on every response: @fastify/helmet (helmet's well-kept set:
 * X-Content-Type-Options nosniff, Referrer-Policy no-referrer, Cross-Origin-Opener- and
 * -Resource-Policy same-origin, Origin-Agent-Cluster, X-Frame-Options, …) and our own
 * Content-Security-Policy, chosen by what the response is:
 *  - the page and the API share one policy: scripts and everything else only from this
 *    origin, never inline; inline styles are allowed because the renderer's SVG may carry
 *    style attributes. Images may also come from blob: URLs: the page shows previews of a
 *    line that is not stored (POST /api/v1/previews/*.svg) as <img> from a blob: it made of
 *    the answer; a blob: URL is made by this origin's own script, and an SVG in <img> runs
 *    no script;
 *  - SVG documents get a policy with no scripts at all (an SVG opened on its own is a
 *    document that could otherwise run one);
 *  - a route that sets its own policy (the share page) keeps it.
 * Helmet's own CSP is off because it is one policy for every response, set before the
 * route knows its type. HSTS is off: the service speaks plain HTTP on the office network,
 * and a TLS proxy in front sets its own (an HSTS header for a whole name is that proxy's
 * decision). Referrer-Policy no-referrer everywhere, so a share token never leaks through
 * a link. X-Frame-Options DENY, as frame-ancestors 'none' says.
 */
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import fastifyHelmet from '@fastify/helmet';

export const DEFAULT_CSP =
  "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'";

export const SVG_CSP = "default-src 'none'; style-src 'unsafe-inline'; frame-ancestors 'none'";

/** What we ask of helmet; everything not named keeps helmet's default. */
export const HELMET_OPTIONS = {
  contentSecurityPolicy: false,
  strictTransportSecurity: false,
  frameguard: { action: 'deny' },
  referrerPolicy: { policy: 'no-referrer' },
  crossOriginOpenerPolicy: { policy: 'same-origin' },
  crossOriginResourcePolicy: { policy: 'same-origin' },
} as const;

/** onSend hook: the Content-Security-Policy for this response's type, unless the route set one. */
export async function addContentSecurityPolicy(_request: FastifyRequest, reply: FastifyReply, payload: unknown): Promise<unknown> {
  if (!reply.hasHeader('content-security-policy')) {
    const type = String(reply.getHeader('content-type') ?? '');
    reply.header('Content-Security-Policy', type.startsWith('image/svg+xml') ? SVG_CSP : DEFAULT_CSP);
  }
  return payload;
}

/** Registers helmet and the CSP hook on the root, before any route. */
export async function securityHeaders(app: FastifyInstance): Promise<void> {
  await app.register(fastifyHelmet, HELMET_OPTIONS);
  app.addHook('onSend', addContentSecurityPolicy);
}

/**
 * For an error Fastify meets before routing (a badly encoded URL), when no hook runs: the
 * headers that matter on a JSON error body.
 */
export function preRoutingHeaders(reply: FastifyReply): void {
  reply.header('Content-Security-Policy', DEFAULT_CSP);
  reply.header('X-Content-Type-Options', 'nosniff');
  reply.header('X-Frame-Options', 'DENY');
  reply.header('Referrer-Policy', 'no-referrer');
}
