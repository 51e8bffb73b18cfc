/**
 * The survey store: one SQLite file (better-sqlite3, WAL) under DATA_DIR, or an in-memory
 * database for tests. A stored survey is a list of revisions; a correction adds a revision
 * and never overwrites one. Each survey has at most one live share token; issuing a new one
 * revokes the old. Every write runs in one transaction.
 */
import { accessSync, constants as fsConstants, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import Database from 'better-sqlite3';
import { StoreUnavailableError, storeFailureOf, type StoreFailure } from './store-failures.js';
import type { Survey } from '../engine/survey/survey.js';
import type { Interpretation } from '../engine/output/interpretation.js';

export const STORE_FILE_NAME = 'arcline.sqlite';

/** Schema migrations, applied in order; PRAGMA user_version records how many have run. */
const MIGRATIONS: readonly string[] = [
  `CREATE TABLE surveys (
     id TEXT PRIMARY KEY,
     name TEXT NOT NULL,
     created_at TEXT NOT NULL,
     updated_at TEXT NOT NULL,
     latest_revision INTEGER NOT NULL
   );
   CREATE TABLE revisions (
     survey_id TEXT NOT NULL REFERENCES surveys(id),
     revision INTEGER NOT NULL CHECK (revision >= 1),
     name TEXT NOT NULL,
     survey_json TEXT NOT NULL,
     interpretation_json TEXT NOT NULL,
     created_at TEXT NOT NULL,
     PRIMARY KEY (survey_id, revision)
   );
   CREATE TABLE share_tokens (
     token TEXT PRIMARY KEY,
     survey_id TEXT NOT NULL REFERENCES surveys(id),
     created_at TEXT NOT NULL,
     revoked_at TEXT
   );
   CREATE INDEX share_tokens_by_survey ON share_tokens(survey_id);`,
  // Issue 12: who stored a revision (a name the client gives; null for older revisions),
  // and the shot gathers uploaded into a line, kept as the raw SEG-2 bytes with the
  // geometry the request supplied, so the traces can be drawn again later. A gather row
  // belongs to the revision its upload made; the latest row of a shot id is its gather.
  `ALTER TABLE revisions ADD COLUMN author TEXT;
   CREATE TABLE gathers (
     survey_id TEXT NOT NULL REFERENCES surveys(id),
     shot_id TEXT NOT NULL,
     revision INTEGER NOT NULL,
     seg2 BLOB NOT NULL,
     overrides_json TEXT NOT NULL,
     created_at TEXT NOT NULL,
     PRIMARY KEY (survey_id, shot_id, revision),
     FOREIGN KEY (survey_id, revision) REFERENCES revisions(survey_id, revision)
   );`,
];

export const SCHEMA_VERSION = MIGRATIONS.length;

export interface SurveySummary {
  id: string;
  name: string;
  createdAt: string;
  updatedAt: string;
  latestRevision: number;
  shareToken: string | null;
}

export interface RevisionSummary {
  revision: number;
  name: string;
  createdAt: string;
  /** Who stored it, as the request named them; null when not given. */
  author: string | null;
}

/** A shot gather stored with a revision: the SEG-2 file and the geometry the upload supplied. */
export interface GatherInput {
  shotId: string;
  seg2: Uint8Array;
  /** The query parameters of the upload (GatherOverrides), so a later reading gives the same geometry. */
  overrides: Record<string, number>;
}

export interface StoredGather extends GatherInput {
  /** The revision the upload made. */
  revision: number;
  createdAt: string;
}

/** What a write may record beside the survey: who, and the gather it came from. */
export interface RevisionExtras {
  author?: string | null;
  gather?: GatherInput;
}

export interface StoredRevision extends RevisionSummary {
  survey: Survey;
  interpretation: Interpretation;
}

export interface RowCounts {
  surveys: number;
  revisions: number;
  shareTokens: number;
  gathers: number;
}

/** Unguessable token: 32 random bytes (256 bits), base64url. */
export function newShareToken(): string {
  return randomBytes(32).toString('base64url');
}

/** Survey id: 12 random bytes (96 bits), base64url; not a secret, but not enumerable either. */
function newSurveyId(): string {
  return randomBytes(12).toString('base64url');
}

export const SURVEY_ID_PATTERN = /^[A-Za-z0-9_-]{1,64}$/;
export const SHARE_TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;

/** Name stored for listing: the survey's own, or a placeholder. */
function nameOf(survey: Survey): string {
  const name = typeof survey.name === 'string' ? survey.name.trim() : '';
  return name === '' ? 'Unnamed line' : name;
}

interface SurveyRow {
  id: string;
  name: string;
  created_at: string;
  updated_at: string;
  latest_revision: number;
  token: string | null;
}

function toSummary(row: SurveyRow): SurveySummary {
  return {
    id: row.id,
    name: row.name,
    createdAt: row.created_at,
    updatedAt: row.updated_at,
    latestRevision: row.latest_revision,
    shareToken: row.token,
  };
}

/**
 * What an opening failure means. SQLite says only "unable to open" (SQLITE_CANTOPEN) when a
 * WAL store's folder is read-only (it cannot make the -wal and -shm files), so the folder
 * itself is asked: one that cannot be written makes the failure a read-only one.
 */
function openFailure(dataDir: string, error: unknown): StoreFailure {
  const failure = storeFailureOf(error) ?? 'unavailable';
  if (failure !== 'unavailable') return failure;
  try {
    accessSync(dataDir, fsConstants.W_OK);
    return failure;
  } catch {
    return 'read-only';
  }
}

export class SurveyStore {
  private readonly db: Database.Database;
  private readonly now: () => Date;

  /** @param dataDir folder for the database file (created if missing), or ':memory:'. */
  constructor(dataDir: string, options: { now?: () => Date; maxMb?: number } = {}) {
    this.now = options.now ?? (() => new Date());
    if (dataDir === ':memory:') {
      this.db = new Database(':memory:');
      this.setUp(options.maxMb);
      return;
    }
    try {
      mkdirSync(dataDir, { recursive: true });
      this.db = new Database(join(dataDir, STORE_FILE_NAME));
    } catch (error) {
      throw new StoreUnavailableError(dataDir, openFailure(dataDir, error), error);
    }
    try {
      this.db.pragma('journal_mode = WAL');
      this.setUp(options.maxMb);
      // A store that opens but cannot be written (a read-only folder with the file in it)
      // is found now, not at a colleague's first save: one empty write transaction.
      this.db.exec('BEGIN IMMEDIATE; COMMIT;');
    } catch (error) {
      this.db.close();
      throw new StoreUnavailableError(dataDir, openFailure(dataDir, error), error);
    }
  }

  private setUp(maxMb?: number): void {
    // A cap on the file's pages: SQLite answers SQLITE_FULL past it, as on a full disk.
    if (maxMb !== undefined) this.db.pragma(`max_page_count = ${Math.max(1, Math.floor((maxMb * 1024 * 1024) / (this.db.pragma('page_size', { simple: true }) as number)))}`);
    this.db.pragma('foreign_keys = ON');
    this.db.pragma('busy_timeout = 5000');
    this.migrate();
  }

  private migrate(): void {
    const current = this.db.pragma('user_version', { simple: true }) as number;
    if (current > MIGRATIONS.length) {
      throw new Error(
        `The store's schema is version ${current}, newer than this program knows (${MIGRATIONS.length}); use a newer Arcline.`,
      );
    }
    for (let version = current; version < MIGRATIONS.length; version += 1) {
      this.db.transaction(() => {
        this.db.exec(MIGRATIONS[version]);
        this.db.pragma(`user_version = ${version + 1}`);
      })();
    }
  }

  schemaVersion(): number {
    return this.db.pragma('user_version', { simple: true }) as number;
  }

  journalMode(): string {
    return this.db.pragma('journal_mode', { simple: true }) as string;
  }

  close(): void {
    if (this.db.open) this.db.close();
  }

  countRows(): RowCounts {
    const count = (table: string): number =>
      (this.db.prepare(`SELECT COUNT(*) AS n FROM ${table}`).get() as { n: number }).n;
    return { surveys: count('surveys'), revisions: count('revisions'), shareTokens: count('share_tokens'), gathers: count('gathers') };
  }

  isEmpty(): boolean {
    return this.countRows().surveys === 0;
  }

  /**
   * Runs `write` in one transaction: every store write inside it (each a nested savepoint)
   * is kept together or, when `write` throws, none is (the demo seed: both lines or nothing).
   * `write` must be synchronous, as every SQLite transaction here is.
   */
  inOneTransaction<T>(write: () => T): T {
    return this.db.transaction(write)();
  }

  /** Stores a new survey as revision 1 with a fresh share token (and its gather, in the same transaction). */
  createSurvey(survey: Survey, interpretation: Interpretation, extras: RevisionExtras = {}): { summary: SurveySummary; revision: StoredRevision } {
    const id = newSurveyId();
    const token = newShareToken();
    const createdAt = this.now().toISOString();
    const name = nameOf(survey);
    this.db.transaction(() => {
      this.db
        .prepare('INSERT INTO surveys (id, name, created_at, updated_at, latest_revision) VALUES (?, ?, ?, ?, 1)')
        .run(id, name, createdAt, createdAt);
      this.insertRevision(id, 1, survey, interpretation, createdAt, extras);
      this.db.prepare('INSERT INTO share_tokens (token, survey_id, created_at) VALUES (?, ?, ?)').run(token, id, createdAt);
    })();
    return {
      summary: { id, name, createdAt, updatedAt: createdAt, latestRevision: 1, shareToken: token },
      revision: { revision: 1, name, createdAt, author: extras.author ?? null, survey, interpretation },
    };
  }

  /**
   * Adds the next revision of a stored survey (and its gather, in the same transaction);
   * null when the survey does not exist. With `expectLatest`, also null (nothing written)
   * when the latest revision is no longer that one: the caller built on it.
   */
  addRevision(id: string, survey: Survey, interpretation: Interpretation, extras: RevisionExtras = {}, expectLatest?: number): StoredRevision | null {
    const createdAt = this.now().toISOString();
    const name = nameOf(survey);
    return this.db.transaction((): StoredRevision | null => {
      const row = this.db.prepare('SELECT latest_revision FROM surveys WHERE id = ?').get(id) as
        | { latest_revision: number }
        | undefined;
      if (row === undefined) return null;
      if (expectLatest !== undefined && row.latest_revision !== expectLatest) return null;
      const revision = row.latest_revision + 1;
      this.insertRevision(id, revision, survey, interpretation, createdAt, extras);
      this.db
        .prepare('UPDATE surveys SET latest_revision = ?, name = ?, updated_at = ? WHERE id = ?')
        .run(revision, name, createdAt, id);
      return { revision, name, createdAt, author: extras.author ?? null, survey, interpretation };
    })();
  }

  private insertRevision(id: string, revision: number, survey: Survey, interpretation: Interpretation, createdAt: string, extras: RevisionExtras): void {
    this.db
      .prepare(
        `INSERT INTO revisions (survey_id, revision, name, survey_json, interpretation_json, created_at, author)
         VALUES (?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(id, revision, nameOf(survey), JSON.stringify(survey), JSON.stringify(interpretation), createdAt, extras.author ?? null);
    const gather = extras.gather;
    if (gather !== undefined) {
      this.db
        .prepare('INSERT INTO gathers (survey_id, shot_id, revision, seg2, overrides_json, created_at) VALUES (?, ?, ?, ?, ?, ?)')
        .run(id, gather.shotId, revision, Buffer.from(gather.seg2.buffer, gather.seg2.byteOffset, gather.seg2.byteLength), JSON.stringify(gather.overrides), createdAt);
    }
  }

  /** The latest gather uploaded for each shot id of a survey, without the bytes, by shot id. */
  listGathers(id: string): { shotId: string; revision: number; createdAt: string; bytes: number }[] {
    const rows = this.db
      .prepare(
        `SELECT shot_id, revision, created_at, length(seg2) AS bytes FROM gathers g
         WHERE survey_id = ? AND revision = (SELECT MAX(revision) FROM gathers h WHERE h.survey_id = g.survey_id AND h.shot_id = g.shot_id)
         ORDER BY shot_id`,
      )
      .all(id) as { shot_id: string; revision: number; created_at: string; bytes: number }[];
    return rows.map((r) => ({ shotId: r.shot_id, revision: r.revision, createdAt: r.created_at, bytes: r.bytes }));
  }

  /** The latest gather uploaded for a shot id (at or before `atRevision` when given); null when none. */
  getGather(id: string, shotId: string, atRevision?: number): StoredGather | null {
    const row = this.db
      .prepare(
        `SELECT shot_id, revision, seg2, overrides_json, created_at FROM gathers
         WHERE survey_id = ? AND shot_id = ? AND revision <= ? ORDER BY revision DESC LIMIT 1`,
      )
      .get(id, shotId, atRevision ?? Number.MAX_SAFE_INTEGER) as
      | { shot_id: string; revision: number; seg2: Buffer; overrides_json: string; created_at: string }
      | undefined;
    if (row === undefined) return null;
    return {
      shotId: row.shot_id,
      revision: row.revision,
      createdAt: row.created_at,
      seg2: new Uint8Array(row.seg2.buffer, row.seg2.byteOffset, row.seg2.byteLength),
      overrides: JSON.parse(row.overrides_json) as Record<string, number>,
    };
  }

  private static readonly SUMMARY_SELECT = `SELECT s.id, s.name, s.created_at, s.updated_at, s.latest_revision,
      (SELECT t.token FROM share_tokens t WHERE t.survey_id = s.id AND t.revoked_at IS NULL
        ORDER BY t.created_at DESC LIMIT 1) AS token
    FROM surveys s`;

  /** Every stored survey, newest first. */
  listSurveys(): SurveySummary[] {
    const rows = this.db
      .prepare(`${SurveyStore.SUMMARY_SELECT} ORDER BY s.created_at DESC, s.rowid DESC`)
      .all() as SurveyRow[];
    return rows.map(toSummary);
  }

  getSummary(id: string): SurveySummary | null {
    const row = this.db.prepare(`${SurveyStore.SUMMARY_SELECT} WHERE s.id = ?`).get(id) as SurveyRow | undefined;
    return row === undefined ? null : toSummary(row);
  }

  listRevisions(id: string): RevisionSummary[] {
    const rows = this.db
      .prepare('SELECT revision, name, created_at, author FROM revisions WHERE survey_id = ? ORDER BY revision')
      .all(id) as { revision: number; name: string; created_at: string; author: string | null }[];
    return rows.map((r) => ({ revision: r.revision, name: r.name, createdAt: r.created_at, author: r.author }));
  }

  /** One revision (the latest when `revision` is undefined); null when absent. */
  getRevision(id: string, revision?: number): StoredRevision | null {
    const row = (
      revision === undefined
        ? this.db
            .prepare(
              `SELECT r.* FROM revisions r JOIN surveys s ON s.id = r.survey_id
               WHERE r.survey_id = ? AND r.revision = s.latest_revision`,
            )
            .get(id)
        : this.db.prepare('SELECT * FROM revisions WHERE survey_id = ? AND revision = ?').get(id, revision)
    ) as
      | { revision: number; name: string; survey_json: string; interpretation_json: string; created_at: string; author: string | null }
      | undefined;
    if (row === undefined) return null;
    return {
      revision: row.revision,
      name: row.name,
      createdAt: row.created_at,
      author: row.author,
      survey: JSON.parse(row.survey_json) as Survey,
      interpretation: JSON.parse(row.interpretation_json) as Interpretation,
    };
  }

  /** Revokes any live token of the survey and issues a new one; null when the survey does not exist. */
  reissueShareToken(id: string): string | null {
    const token = newShareToken();
    const at = this.now().toISOString();
    return this.db.transaction((): string | null => {
      if (this.db.prepare('SELECT 1 FROM surveys WHERE id = ?').get(id) === undefined) return null;
      this.db.prepare('UPDATE share_tokens SET revoked_at = ? WHERE survey_id = ? AND revoked_at IS NULL').run(at, id);
      this.db.prepare('INSERT INTO share_tokens (token, survey_id, created_at) VALUES (?, ?, ?)').run(token, id, at);
      return token;
    })();
  }

  /** Revokes the survey's live token; false when the survey does not exist. */
  revokeShareToken(id: string): boolean {
    const at = this.now().toISOString();
    return this.db.transaction((): boolean => {
      if (this.db.prepare('SELECT 1 FROM surveys WHERE id = ?').get(id) === undefined) return false;
      this.db.prepare('UPDATE share_tokens SET revoked_at = ? WHERE survey_id = ? AND revoked_at IS NULL').run(at, id);
      return true;
    })();
  }

  /** The survey id a live token opens; null for unknown or revoked tokens. */
  surveyIdForToken(token: string): string | null {
    const row = this.db
      .prepare('SELECT survey_id FROM share_tokens WHERE token = ? AND revoked_at IS NULL')
      .get(token) as { survey_id: string } | undefined;
    return row === undefined ? null : row.survey_id;
  }
}
