/**
 * Service configuration from the environment (api-v1.md, "Starting the service"):
 *   HOST                 address to listen on, default 127.0.0.1 (0.0.0.0 for the office network)
 *   PORT                 TCP port, default 8080 (0 picks a free one)
 *   DATA_DIR             folder of the SQLite store, default ./data
 *   ARCLINE_WRITE_TOKEN  bearer token for write routes; required when HOST is not loopback
 *   ARCLINE_SEED_DEMO    "0"/"false" stops the demo line being stored into an empty store
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
  };
}
