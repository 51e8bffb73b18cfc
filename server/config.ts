/**
 * Service configuration from the environment (api-v1.md, "Starting the service"):
 *   HOST                 address to listen on, default 127.0.0.1 (0.0.0.0 for the office network)
 *   PORT                 TCP port, default 8080 (0 picks a free one)
 *   DATA_DIR             folder of the SQLite store, default ./data
 *   ARCLINE_WRITE_TOKEN  bearer token for write routes; required when HOST is not loopback
 *   ARCLINE_SEED_DEMO    "0"/"false" stops the demo line being stored into an empty store
 *   ARCLINE_THREADS      compute worker threads, default one per core
 *   ARCLINE_QUEUE        computations that may wait for a thread before 503, default 4 per thread
 *   ARCLINE_TIME_LIMIT_MS  a computation running longer is stopped, default 10000
 *   ARCLINE_REQUEST_TIMEOUT_MS  a request (headers and body) must arrive within this, default 30000
 */

/** A configuration mistake: main prints the message and exits 1. */
export class ConfigError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ConfigError';
  }
}

export interface ServiceConfig {
  host: string;
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
  let writeToken: string | undefined;
  if (token !== undefined && token !== '') {
    if (token.trim() !== token || /\s/.test(token)) {
      throw new ConfigError('ARCLINE_WRITE_TOKEN must not contain spaces or line breaks.');
    }
    writeToken = token;
  }
  return {
    host,
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
