/**
 * Security headers on every response. The page and the API share one policy: scripts and
 * everything else only from this origin, never inline; inline styles are allowed because
 * the renderer's SVG may carry style attributes. SVG documents get a policy with no
 * scripts at all (an SVG opened on its own is a document that could otherwise run one).
 * A route that sets its own Content-Security-Policy (the share page) keeps it.
 * Referrer-Policy no-referrer everywhere, so a share token never leaks through a link.
 * Images may also come from blob: URLs: the page shows previews of a line that is not
 * stored (POST /api/v1/previews/*.svg) as <img> from a blob: it made of the answer. A blob:
 * URL is made by this origin's own script, and an SVG in <img> runs no script.
 */
import type { FastifyReply, FastifyRequest } from 'fastify';

export const DEFAULT_CSP =
  "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'";

export const SVG_CSP = "default-src 'none'; style-src 'unsafe-inline'; frame-ancestors 'none'";

export async function addSecurityHeaders(_request: FastifyRequest, reply: FastifyReply, payload: unknown): Promise<unknown> {
  if (!reply.hasHeader('content-security-policy')) {
    const type = String(reply.getHeader('content-type') ?? '');
    reply.header('Content-Security-Policy', type.startsWith('image/svg+xml') ? SVG_CSP : DEFAULT_CSP);
  }
  reply.header('X-Content-Type-Options', 'nosniff');
  reply.header('X-Frame-Options', 'DENY');
  reply.header('Referrer-Policy', 'no-referrer');
  reply.header('Cross-Origin-Opener-Policy', 'same-origin');
  reply.header('Cross-Origin-Resource-Policy', 'same-origin');
  return payload;
}
