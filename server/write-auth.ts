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

/** onRequest hook for write routes; runs before the body is read, so strangers cannot make us parse 5 MB. */
export function writeGuard(writeToken: string | undefined): (request: FastifyRequest) => Promise<void> {
  return async (request) => {
    if (writeToken === undefined) return;
    const header = request.headers.authorization;
    if (header === undefined || header.trim() === '') throw new AppError('write_token_required');
    const match = /^Bearer\s+(\S+)\s*$/i.exec(header);
    if (match === null) {
      throw new AppError('write_token_required', {
        message: 'The Authorization header must read "Bearer <token>".',
      });
    }
    if (!tokensMatch(match[1], writeToken)) throw new AppError('write_token_invalid');
  };
}
