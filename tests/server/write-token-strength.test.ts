// Weak write tokens are refused at start (issue 14, "Weak tokens accepted"): at least
// MIN_WRITE_TOKEN_LENGTH (32) characters, one word, and the refusal says how to make one.
// 32 random characters carry 128 bits or more (hex 4, base64 6 bits per character), the
// common-practice floor for access secrets (OWASP Session Management Cheat Sheet; NIST SP
// 800-131A's 112-bit floor for keys; both from memory).
import { randomBytes } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../server/app.js';
import { ConfigError, MIN_WRITE_TOKEN_LENGTH, checkWriteToken, readConfig } from '../../server/config.js';
import { startService } from '../../server/start.js';

const GOOD = 'Zr4kV9pQ2mX7wL0cT5yB8nH3fJ6dS1gA'; // invented, 32 characters

describe('the write token from ARCLINE_WRITE_TOKEN', () => {
  it('is at least 32 characters: 128 bits even as hex', () => {
    expect(MIN_WRITE_TOKEN_LENGTH).toBe(32);
    expect(MIN_WRITE_TOKEN_LENGTH * Math.log2(16)).toBeGreaterThanOrEqual(128);
  });

  it('refuses short tokens with a ConfigError that names the variable, the length and how to make one', () => {
    for (const token of ['x', 'secret', 'office-token-2026', GOOD.slice(0, 31)]) {
      let caught: unknown;
      try {
        readConfig({ ARCLINE_WRITE_TOKEN: token });
      } catch (error) {
        caught = error;
      }
      expect(caught, token).toBeInstanceOf(ConfigError);
      const message = (caught as Error).message;
      expect(message).toContain('ARCLINE_WRITE_TOKEN');
      expect(message).toContain(`is ${token.length} character`);
      expect(message).toContain('at least 32');
      expect(message).toContain('openssl rand -base64 32');
      expect(message).toContain("randomBytes(32).toString('base64url')");
    }
  });

  it('refuses whitespace anywhere, even in a long token', () => {
    for (const token of [` ${GOOD}`, `${GOOD} `, `${GOOD.slice(0, 16)} ${GOOD.slice(16)}`, `${GOOD}\n`, `${GOOD}\t`, `\r${GOOD}`]) {
      expect(() => readConfig({ ARCLINE_WRITE_TOKEN: token }), JSON.stringify(token)).toThrow(/no spaces or line breaks/);
    }
  });

  it('accepts a good token, and the tokens the advice makes', () => {
    expect(readConfig({ ARCLINE_WRITE_TOKEN: GOOD }).writeToken).toBe(GOOD);
    // What the two commands in the message print: 32 random bytes as base64url (43 characters)
    // and as base64 (44 characters, may contain + / =).
    for (const token of [randomBytes(32).toString('base64url'), randomBytes(32).toString('base64')]) {
      expect(checkWriteToken(token, 'ARCLINE_WRITE_TOKEN')).toBe(token);
    }
  });

  it('an empty variable means no token (loopback only), as before', () => {
    expect(readConfig({ ARCLINE_WRITE_TOKEN: '' }).writeToken).toBeUndefined();
  });
});

describe('the write token given to buildApp and startService', () => {
  it('buildApp refuses a short token', async () => {
    await expect(buildApp({ dataDir: ':memory:', writeToken: 'short' })).rejects.toThrow(/at least 32/);
    await expect(buildApp({ dataDir: ':memory:', host: '0.0.0.0', writeToken: GOOD.slice(1) })).rejects.toBeInstanceOf(ConfigError);
  });

  it('startService refuses to start with a short token and listens on nothing', async () => {
    const dataDir = mkdtempSync(join(tmpdir(), 'arcline-weak-token-'));
    try {
      await expect(startService({ HOST: '0.0.0.0', PORT: '0', DATA_DIR: dataDir, ARCLINE_WRITE_TOKEN: 'a' }, { logger: false })).rejects.toThrow(
        /ARCLINE_WRITE_TOKEN is 1 character long/,
      );
    } finally {
      rmSync(dataDir, { recursive: true, force: true });
    }
  });

  it('buildApp accepts a good token, and writes with it', async () => {
    const app = await buildApp({ dataDir: ':memory:', webRoot: null, host: '0.0.0.0', writeToken: GOOD });
    try {
      const demo = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as object;
      const res = await app.inject({ method: 'POST', url: '/api/v1/surveys', headers: { authorization: `Bearer ${GOOD}` }, payload: demo });
      expect(res.statusCode).toBe(201);
    } finally {
      await app.close();
    }
  });
});
