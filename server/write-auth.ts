/**
 * Write protection. On a loopback host only the person at the machine can reach the
 * service; on any other host a write (storing surveys, revisions, managing share links)
 * needs `Authorization: Bearer <ARCLINE_WRITE_TOKEN>`. When a token is configured it is
 * required on every host, loopback included. Reads, share pages and the stateless
 * POST /api/v1/interpretations stay open.
 */
import { createHash, timingSafeEqual } from 'node:crypto';
import { isIP } from 'node:net';
import type { FastifyRequest } from 'fastify';
import { AppError } from './errors.js';

/** True for 127.0.0.0/8, ::1 (also IPv4-mapped ::ffff:127.x) and localhost. */
export function isLoopbackHost(host: string): boolean {
  const bare = host.trim().toLowerCase().replace(/^\[(.*)\]$/, '$1');
  if (bare === 'localhost' || bare.endsWith('.localhost')) return true;
  const family = isIP(bare);
  if (family === 4) return bare.split('.')[0] === '127';
  if (family === 6) {
    if (bare === '::1' || /^(0{1,4}:){7}0{0,3}1$/.test(bare) || bare === '0:0:0:0:0:0:0:1') return true;
    const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/.exec(bare);
    return mapped !== null && mapped[1].split('.')[0] === '127';
  }
  return false;
}

/**
 * Compares in constant time: both sides are hashed first, so neither the length nor the
 * content of the configured token leaks through the time the comparison takes.
 */
export function tokensMatch(presented: string, expected: string): boolean {
  const a = createHash('sha256').update(presented, 'utf8').digest();
  const b = createHash('sha256').update(expected, 'utf8').digest();
  return timingSafeEqual(a, b);
}

/**
 * Why a write by this request would be refused, or null when it would be accepted. The one
 * rule for writes, and for seeing what only a writer may see (the share link of a stored
 * line): with no token configured the service listens on loopback only (buildApp refuses
 * anything else), so every request that reached it and passed the host check may write.
 */
export function writeRefusal(writeToken: string | undefined, request: FastifyRequest): AppError | null {
  if (writeToken === undefined) return null;
  const header = request.headers.authorization;
  if (header === undefined || header.trim() === '') return new AppError('write_token_required');
  const match = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (match === null) {
    return new AppError('write_token_required', {
      message: 'The Authorization header must read "Bearer <token>".',
    });
  }
  return tokensMatch(match[1], writeToken) ? null : new AppError('write_token_invalid');
}

/** onRequest hook for write routes; runs before the body is read, so strangers cannot make us parse 5 MB. */
export function writeGuard(writeToken: string | undefined): (request: FastifyRequest) => Promise<void> {
  return async (request) => {
    const refusal = writeRefusal(writeToken, request);
    if (refusal !== null) throw refusal;
  };
}

/** Whether this request could write (see writeRefusal): reads use it to hide share links from others. */
export function writerCheck(writeToken: string | undefined): (request: FastifyRequest) => boolean {
  return (request) => writeRefusal(writeToken, request) === null;
}
