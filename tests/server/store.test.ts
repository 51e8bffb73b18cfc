// The SQLite store: WAL file under DATA_DIR, migrated schema, revisions never overwritten,
// share tokens revoked and reissued, data kept across reopen.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { SCHEMA_VERSION, STORE_FILE_NAME, SurveyStore, newShareToken } from '../../server/store.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import type { Survey } from '../../engine/survey/survey.js';

const demo = (): Survey => {
  const { survey } = validateSurvey(JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')));
  if (survey === null) throw new Error('samples/demo-line.json is not a valid survey');
  return survey;
};

const dirs: string[] = [];
afterEach(() => {
  for (const dir of dirs.splice(0)) rmSync(dir, { recursive: true, force: true });
});
function tempDir(): string {
  const dir = mkdtempSync(join(tmpdir(), 'arcline-store-'));
  dirs.push(dir);
  return dir;
}

describe('SurveyStore on disk', () => {
  it('creates DATA_DIR, uses WAL and records the schema version', () => {
    const dataDir = join(tempDir(), 'nested', 'data');
    const store = new SurveyStore(dataDir);
    try {
      expect(existsSync(join(dataDir, STORE_FILE_NAME))).toBe(true);
      expect(store.journalMode()).toBe('wal');
      expect(store.schemaVersion()).toBe(SCHEMA_VERSION);
      expect(SCHEMA_VERSION).toBeGreaterThanOrEqual(1);
    } finally {
      store.close();
    }
  });

  it('keeps surveys, revisions and tokens across a reopen, without migrating twice', () => {
    const dataDir = tempDir();
    const survey = demo();
    const interpretation = interpret(survey);
    const first = new SurveyStore(dataDir);
    const { summary } = first.createSurvey(survey, interpretation);
    first.addRevision(summary.id, { ...survey, name: 'Second' }, interpretation);
    first.close();

    const second = new SurveyStore(dataDir);
    try {
      expect(second.schemaVersion()).toBe(SCHEMA_VERSION);
      expect(second.countRows()).toEqual({ surveys: 1, revisions: 2, shareTokens: 1, gathers: 0 });
      expect(second.getRevision(summary.id, 1)?.survey).toEqual(survey);
      expect(second.getRevision(summary.id)?.name).toBe('Second');
      expect(second.surveyIdForToken(summary.shareToken!)).toBe(summary.id);
    } finally {
      second.close();
    }
  });
});

describe('SurveyStore revisions and tokens', () => {
  it('numbers revisions 1, 2, 3 and never changes an earlier one', () => {
    const store = new SurveyStore(':memory:');
    try {
      const survey = demo();
      const interpretation = interpret(survey);
      const { summary } = store.createSurvey(survey, interpretation);
      const second = store.addRevision(summary.id, { ...survey, name: 'r2' }, interpretation);
      const third = store.addRevision(summary.id, { ...survey, name: 'r3' }, interpretation);
      expect([second?.revision, third?.revision]).toEqual([2, 3]);
      expect(store.listRevisions(summary.id).map((r) => r.name)).toEqual([survey.name, 'r2', 'r3']);
      expect(store.getRevision(summary.id, 1)?.name).toBe(survey.name);
      expect(store.getSummary(summary.id)?.latestRevision).toBe(3);
      expect(store.getRevision(summary.id, 4)).toBeNull();
      expect(store.addRevision('missing', survey, interpretation)).toBeNull();
      expect(store.countRows()).toEqual({ surveys: 1, revisions: 3, shareTokens: 1, gathers: 0 });
    } finally {
      store.close();
    }
  });

  it('revokes the old token when issuing a new one, and keeps the revoked row', () => {
    const store = new SurveyStore(':memory:');
    try {
      const survey = demo();
      const { summary } = store.createSurvey(survey, interpret(survey));
      const oldToken = summary.shareToken!;
      const newToken = store.reissueShareToken(summary.id)!;
      expect(newToken).not.toBe(oldToken);
      expect(store.surveyIdForToken(oldToken)).toBeNull();
      expect(store.surveyIdForToken(newToken)).toBe(summary.id);
      expect(store.getSummary(summary.id)?.shareToken).toBe(newToken);
      expect(store.revokeShareToken(summary.id)).toBe(true);
      expect(store.surveyIdForToken(newToken)).toBeNull();
      expect(store.getSummary(summary.id)?.shareToken).toBeNull();
      expect(store.countRows().shareTokens).toBe(2);
      expect(store.reissueShareToken('missing')).toBeNull();
      expect(store.revokeShareToken('missing')).toBe(false);
    } finally {
      store.close();
    }
  });

  it('makes tokens of 256 random bits in base64url', () => {
    const tokens = new Set(Array.from({ length: 200 }, () => newShareToken()));
    expect(tokens.size).toBe(200);
    for (const token of tokens) {
      expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
      expect(Buffer.from(token, 'base64url')).toHaveLength(32);
    }
  });

  it('refuses a store written by a newer schema', () => {
    const dataDir = tempDir();
    const store = new SurveyStore(dataDir);
    store.close();
    // Simulate a newer program having migrated the file further.
    const db = new Database(join(dataDir, STORE_FILE_NAME));
    db.pragma(`user_version = ${SCHEMA_VERSION + 1}`);
    db.close();
    expect(() => new SurveyStore(dataDir)).toThrow(/newer than this program knows/);
  });
});
