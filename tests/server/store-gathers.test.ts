// Store schema version 2 (issue 12): revisions record their author and shot gathers are kept
// with the revision their upload made. A store written by version 1 (the schema below is
// version 1's, copied from server/store.ts before the change) opens and migrates in place,
// keeping its rows; the expected-latest guard refuses a revision built on a stale one.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { SCHEMA_VERSION, STORE_FILE_NAME, SurveyStore } from '../../server/store.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import type { Survey } from '../../engine/survey/survey.js';

const survey = JSON.parse(readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8')) as Survey;
const interpretation = interpret(survey);

const dirs: string[] = [];
afterEach(() => {
  for (const dir of dirs.splice(0)) rmSync(dir, { recursive: true, force: true });
});

const VERSION_1 = `CREATE TABLE surveys (id TEXT PRIMARY KEY, name TEXT NOT NULL, created_at TEXT NOT NULL, updated_at TEXT NOT NULL, latest_revision INTEGER NOT NULL);
  CREATE TABLE revisions (survey_id TEXT NOT NULL REFERENCES surveys(id), revision INTEGER NOT NULL CHECK (revision >= 1), name TEXT NOT NULL,
    survey_json TEXT NOT NULL, interpretation_json TEXT NOT NULL, created_at TEXT NOT NULL, PRIMARY KEY (survey_id, revision));
  CREATE TABLE share_tokens (token TEXT PRIMARY KEY, survey_id TEXT NOT NULL REFERENCES surveys(id), created_at TEXT NOT NULL, revoked_at TEXT);
  CREATE INDEX share_tokens_by_survey ON share_tokens(survey_id);`;

describe('store schema 2: authors and gathers', () => {
  it('migrates a version-1 store in place: old revisions have no author, new ones do', () => {
    const dir = mkdtempSync(join(tmpdir(), 'arcline-store-v1-'));
    dirs.push(dir);
    const db = new Database(join(dir, STORE_FILE_NAME));
    db.exec(VERSION_1);
    db.prepare("INSERT INTO surveys VALUES ('old', 'Old line', '2026-01-01T00:00:00.000Z', '2026-01-01T00:00:00.000Z', 1)").run();
    db.prepare("INSERT INTO revisions VALUES ('old', 1, 'Old line', ?, ?, '2026-01-01T00:00:00.000Z')").run(JSON.stringify(survey), JSON.stringify(interpretation));
    db.pragma('user_version = 1');
    db.close();

    const store = new SurveyStore(dir);
    try {
      expect(store.schemaVersion()).toBe(SCHEMA_VERSION);
      expect(store.listRevisions('old')).toEqual([{ revision: 1, name: 'Old line', createdAt: '2026-01-01T00:00:00.000Z', author: null }]);
      const seg2 = Uint8Array.from([0x3a, 0x55, 1, 2, 3]);
      const added = store.addRevision('old', survey, interpretation, { author: 'K. Mensah', gather: { shotId: 'mid', seg2, overrides: { shotX: 34.5 } } });
      expect(added?.revision).toBe(2);
      expect(store.listRevisions('old')[1].author).toBe('K. Mensah');
      const gather = store.getGather('old', 'mid');
      expect(gather?.revision).toBe(2);
      expect(Array.from(gather!.seg2)).toEqual([0x3a, 0x55, 1, 2, 3]);
      expect(gather?.overrides).toEqual({ shotX: 34.5 });
      expect(store.getGather('old', 'mid', 1)).toBeNull();
      expect(store.listGathers('old')).toEqual([{ shotId: 'mid', revision: 2, createdAt: added!.createdAt, bytes: 5 }]);
    } finally {
      store.close();
    }
  });

  it('writes nothing when the latest revision is no longer the one the new revision was built on', () => {
    const store = new SurveyStore(':memory:');
    try {
      const { summary } = store.createSurvey(survey, interpretation);
      store.addRevision(summary.id, survey, interpretation);
      const before = store.countRows();
      const seg2 = Uint8Array.from([1]);
      expect(store.addRevision(summary.id, survey, interpretation, { gather: { shotId: 'x', seg2, overrides: {} } }, 1)).toBeNull();
      expect(store.countRows()).toEqual(before);
      expect(store.addRevision(summary.id, survey, interpretation, { gather: { shotId: 'x', seg2, overrides: {} } }, 2)?.revision).toBe(3);
      expect(store.countRows().gathers).toBe(1);
    } finally {
      store.close();
    }
  });
});
