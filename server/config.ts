/**
 * Service configuration from the environment (api-v1.md, "Starting the service"):
 *   HOST                 address to listen on, default 127.0.0.1 (0.0.0.0 for the office network)
 *   PORT                 TCP port, default 8080 (0 picks a free one)
 *   DATA_DIR             folder of the SQLite store, default ./data
 *   ARCLINE_WRITE_TOKEN  bearer token for write routes; required when HOST is not loopback;
 *                        at least MIN_WRITE_TOKEN_LENGTH characters, no spaces
 *   ARCLINE_ALLOWED_HOSTS  comma-separated host names the service also answers to (Host header)
 *   ARCLINE_WRITE_RATE_LIMIT  writes per minute per client address, default 60; 0 for no limit
 *   ARCLINE_SEED_DEMO    "0"/"false" stops the two demo lines being stored into an empty store
 *   ARCLINE_THREADS      compute worker threads, default one per core
 *   ARCLINE_QUEUE        computations that may wait for a thread before 503, default 4 per thread
 *   ARCLINE_TIME_LIMIT_MS  a computation running longer is stopped, default 10000
 *   ARCLINE_REQUEST_TIMEOUT_MS  a request (headers and body) must arrive within this, default 30000
 */

import { DEFAULT_WRITES_PER_MINUTE } from './write-limit.js';

/** A configuration mistake: main prints the message and exits 1. */
export class ConfigError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ConfigError';
  }
}

/**
 * Shortest write token accepted, characters. 32 random characters carry at least 128 bits
 * (hex: 4 bits each; base64: 6 bits each, 192 bits), out of reach of online guessing at any
 * rate a network allows. 128 bits is common practice for secrets that guard access (the
 * OWASP Session Management Cheat Sheet asks at least 64 bits of entropy for session ids;
 * NIST SP 800-131A sets 112 bits as the least security strength for keys; both from
 * memory). Length alone cannot show that a token is random; the message says how to make one.
 */
export const MIN_WRITE_TOKEN_LENGTH = 32;

/** How to make a good token, quoted in every refusal. */
export const MAKE_TOKEN_HINT =
  'Make one with `openssl rand -base64 32` or `node -e "console.log(require(\'crypto\').randomBytes(32).toString(\'base64url\'))"`.';

/** Checks a write token; `source` names where it came from (the variable or the option). */
export function checkWriteToken(token: string, source: string): string {
  if (token.trim() !== token || /\s/.test(token)) {
    throw new ConfigError(`${source} must be one word: no spaces or line breaks. ${MAKE_TOKEN_HINT}`);
  }
  if (token.length < MIN_WRITE_TOKEN_LENGTH) {
    throw new ConfigError(
      `${source} is ${token.length} character${token.length === 1 ? '' : 's'} long; it must be at least ${MIN_WRITE_TOKEN_LENGTH} ` +
        `random characters, so it cannot be guessed over the network. ${MAKE_TOKEN_HINT}`,
    );
  }
  return token;
}

/**
 * Host names from ARCLINE_ALLOWED_HOSTS: comma separated, each a bare name or address
 * (no scheme, port or path; IPv6 in brackets or bare), compared without case.
 */
export function readAllowedHosts(raw: string | undefined): string[] {
  if (raw === undefined || raw.trim() === '') return [];
  const names: string[] = [];
  // O(n) in the number of names.
  for (const part of raw.split(',')) {
    const name = part.trim().toLowerCase();
    if (name === '') continue;
    const bare = name.replace(/^\[(.*)\]$/, '$1');
    const looksLikeIpv6 = bare.includes(':') && /^[0-9a-f:.]+$/.test(bare);
    if (/[\s/@?#]/.test(name) || (!looksLikeIpv6 && name.includes(':'))) {
      throw new ConfigError(
        `ARCLINE_ALLOWED_HOSTS lists host names only, without scheme, port or path (e.g. "arcline.office.example,10.0.0.12"); got "${part.trim()}".`,
      );
    }
    names.push(bare.replace(/\.$/, ''));
  }
  return names;
}

export interface ServiceConfig {
  host: string;
  allowedHosts: string[];
  writeRateLimit: number;
  port: number;
  dataDir: string;
  writeToken: string | undefined;
  seedDemo: boolean;
  threads: number | undefined;
  maxQueued: number | undefined;
  timeLimitMs: number | undefined;
  requestTimeoutMs: number | undefined;
  /** Largest the store file may grow, MB (ARCLINE_STORE_MAX_MB); writes beyond get 507 store_full. */
  storeMaxMb: number | undefined;
}

export const CONFIG_DEFAULTS = { host: '127.0.0.1', port: 8080, dataDir: './data' } as const;

function readPort(raw: string | undefined): number {
  if (raw === undefined || raw.trim() === '') return CONFIG_DEFAULTS.port;
  const text = raw.trim();
  const port = Number(text);
  if (!/^\d+$/.test(text) || !Number.isInteger(port) || port > 65535) {
    throw new ConfigError(`PORT must be a whole number from 0 to 65535; got "${raw}".`);
  }
  return port;
}

function readFlag(name: string, raw: string | undefined, fallback: boolean): boolean {
  if (raw === undefined || raw.trim() === '') return fallback;
  const text = raw.trim().toLowerCase();
  if (['1', 'true', 'yes', 'on'].includes(text)) return true;
  if (['0', 'false', 'no', 'off'].includes(text)) return false;
  throw new ConfigError(`${name} must be true or false (1/0); got "${raw}".`);
}

/** A whole number within [min, max] from the environment, or undefined (use the default). */
function readWhole(name: string, raw: string | undefined, min: number, max: number): number | undefined {
  if (raw === undefined || raw.trim() === '') return undefined;
  const text = raw.trim();
  const value = Number(text);
  if (!/^\d+$/.test(text) || value < min || value > max) {
    throw new ConfigError(`${name} must be a whole number from ${min} to ${max}; got "${raw}".`);
  }
  return value;
}

/** Reads and checks the environment; throws ConfigError with a message a person can act on. */
export function readConfig(env: NodeJS.ProcessEnv): ServiceConfig {
  const host = env.HOST?.trim() || CONFIG_DEFAULTS.host;
  if (/\s/.test(host)) throw new ConfigError(`HOST must be one address or host name; got "${env.HOST}".`);
  const dataDir = env.DATA_DIR?.trim() || CONFIG_DEFAULTS.dataDir;
  const token = env.ARCLINE_WRITE_TOKEN;
  const writeToken = token === undefined || token === '' ? undefined : checkWriteToken(token, 'ARCLINE_WRITE_TOKEN');
  return {
    host,
    allowedHosts: readAllowedHosts(env.ARCLINE_ALLOWED_HOSTS),
    writeRateLimit: readWhole('ARCLINE_WRITE_RATE_LIMIT', env.ARCLINE_WRITE_RATE_LIMIT, 0, 1_000_000) ?? DEFAULT_WRITES_PER_MINUTE,
    port: readPort(env.PORT),
    dataDir,
    writeToken,
    seedDemo: readFlag('ARCLINE_SEED_DEMO', env.ARCLINE_SEED_DEMO, true),
    threads: readWhole('ARCLINE_THREADS', env.ARCLINE_THREADS, 1, 256),
    maxQueued: readWhole('ARCLINE_QUEUE', env.ARCLINE_QUEUE, 0, 10_000),
    timeLimitMs: readWhole('ARCLINE_TIME_LIMIT_MS', env.ARCLINE_TIME_LIMIT_MS, 100, 3_600_000),
    requestTimeoutMs: readWhole('ARCLINE_REQUEST_TIMEOUT_MS', env.ARCLINE_REQUEST_TIMEOUT_MS, 100, 3_600_000),
    storeMaxMb: readWhole('ARCLINE_STORE_MAX_MB', env.ARCLINE_STORE_MAX_MB, 1, 1_000_000),
  };
}
