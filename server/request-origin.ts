/**
 * Who may address the service, and from which page (issue 14, "No Host or Origin check").
 *
 * Host: a page on another site can make its own name point at this machine (DNS
 * rebinding); the browser then sends that name in `Host` and treats our answers as the
 * other site's, so it could read and write the store. A request whose Host is not a name
 * this service answers to is refused (421 host_not_allowed, RFC 9110 §15.5.20: the
 * request was directed at a server not able to answer for that authority). The names:
 *  - the address the service listens on (HOST) and every name in ARCLINE_ALLOWED_HOSTS;
 *  - on loopback, the loopback names and addresses (localhost, *.localhost, 127.0.0.0/8,
 *    ::1): browsers resolve those themselves, never through DNS;
 *  - on any other address (the office network): also the loopback names when listening
 *    on every address (0.0.0.0, ::), this machine's host name, and any IP address written
 *    as such: a browser sends an IP literal as Host only when it connected to that very
 *    address, so no other site can use one (webpack-dev-server and Vite accept IP
 *    literals for the same reason; common practice).
 * A request without Host (HTTP/1.0) carries no name a rebinding page could have chosen,
 * and passes. /healthz answers any Host: it says nothing but "ok", and monitors call it
 * by whatever name they were given.
 *
 * Origin: a write (any method but GET, HEAD, OPTIONS) whose `Origin` header (or, without
 * one, `Referer`) names another host than the request's own `Host` is refused (403
 * cross_origin_write), so another site's page cannot store lines or rotate share links
 * with the browser's access to this service. Browsers send Origin on every cross-site
 * POST (Fetch standard); scripts (curl) send none and pass, and remain under the write token.
 * Both checks run as onRequest hooks, before the write guard and before the body is read.
 */
import { hostname as machineName } from 'node:os';
import { isIP } from 'node:net';
import type { FastifyRequest } from 'fastify';
import { AppError } from './errors.js';
import { isLoopbackHost } from './write-auth.js';

/** Methods that change nothing (RFC 9110 §9.2.1), so another site's page may send them. */
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** Routes that answer whatever the Host. */
const ANY_HOST_PATHS = new Set(['/healthz']);

/** The name part of a Host header or an allowed name: lower case, no port, no brackets, no final dot. */
export function hostName(authority: string): string {
  const text = authority.trim().toLowerCase();
  const bracketed = /^\[([^\]]*)\](?::\d*)?$/.exec(text);
  if (bracketed !== null) return bracketed[1];
  // A bare IPv6 address (two colons or more) has no port.
  if ((text.match(/:/g) ?? []).length > 1) return text;
  return text.replace(/:\d*$/, '').replace(/\.$/, '');
}

function isWildcard(host: string): boolean {
  const bare = hostName(host);
  return bare === '0.0.0.0' || bare === '::' || /^(0{1,4}:){7}0{1,4}$/.test(bare);
}

/** This machine's host name and its first label ("survey-box.office.example" and "survey-box"). */
function machineNames(): string[] {
  const full = machineName().trim().toLowerCase();
  return full === '' ? [] : [full, full.split('.')[0]];
}

/** Whether the service, listening on `bindHost`, answers to `name` (a hostName()). */
export function hostAllowedBy(bindHost: string, allowedHosts: readonly string[]): (name: string) => boolean {
  const bound = hostName(bindHost);
  const loopbackOnly = isLoopbackHost(bound);
  const wildcard = isWildcard(bindHost);
  const names = new Set([bound, ...allowedHosts.map(hostName), ...(loopbackOnly ? [] : machineNames())]);
  return (name) => {
    if (names.has(name)) return true;
    if (loopbackOnly) return isLoopbackHost(name);
    if (isIP(name) !== 0) return true;
    return wildcard && isLoopbackHost(name);
  };
}

/** onRequest hook: refuses a request whose Host is not one of this service's names. */
export function hostCheck(bindHost: string, allowedHosts: readonly string[]): (request: FastifyRequest) => Promise<void> {
  const allowed = hostAllowedBy(bindHost, allowedHosts);
  return async (request) => {
    const host = request.headers.host;
    if (host === undefined || ANY_HOST_PATHS.has(request.url.split('?')[0])) return;
    const name = hostName(host);
    if (!allowed(name)) {
      throw new AppError('host_not_allowed', {
        message: `This service does not answer to the host name "${name.slice(0, 100)}". Use the address it was started on, or add the name to ARCLINE_ALLOWED_HOSTS.`,
      });
    }
  };
}

/** host[:port] of an Origin or Referer value as the URL standard writes it (default port dropped), or null if unreadable. */
function authorityOf(url: string): string | null {
  try {
    const parsed = new URL(url);
    return parsed.host === '' ? null : parsed.host.toLowerCase();
  } catch {
    return null;
  }
}

/** The request's own Host in the same form (default port 80 dropped, as a browser omits it). */
function ownAuthority(host: string): string | null {
  return authorityOf(`http://${host.trim()}`);
}

/** onRequest hook: refuses a write sent by a page of another origin. */
export async function originCheck(request: FastifyRequest): Promise<void> {
  if (SAFE_METHODS.has(request.method)) return;
  const origin = request.headers.origin;
  const referer = request.headers.referer;
  const source = origin ?? referer;
  if (source === undefined || source === '') return;
  const from = authorityOf(source);
  const host = request.headers.host;
  const own = host === undefined ? null : ownAuthority(host);
  // An origin the browser would not name ("null" from a sandboxed frame or a file) is foreign too.
  if (from === null || own === null || from !== own) {
    throw new AppError('cross_origin_write', {
      message: `This write came from a page of another site (${origin !== undefined ? 'Origin' : 'Referer'} "${source.slice(0, 100)}", not this service's "${(host ?? '').slice(0, 100)}"); it was refused. Write from the Arcline page itself, or from a script that sends no Origin header.`,
    });
  }
}

