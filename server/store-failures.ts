/**
 * What a store failure means to the person running the service. SQLite (through
 * better-sqlite3) and the file system report a full disk, a read-only or unwritable data
 * folder and a damaged database file with codes; these become a clear message at start
 * (StoreUnavailableError, printed by main.ts, exit 1) or a coded answer to a write
 * (`store_full` 507, `store_read_only` 503, `store_unavailable` 503), never a 500. SQLite
 * rolls back the transaction that failed, so nothing half-written stays (store.ts runs
 * every write in one transaction).
 */

export type StoreFailure = 'full' | 'read-only' | 'unavailable';

/** The kind of a store failure from an error's code, or null when it is not one. */
export function storeFailureOf(error: unknown): StoreFailure | null {
  const code = (error as { code?: unknown } | null)?.code;
  if (typeof code !== 'string') return null;
  if (code === 'SQLITE_FULL' || code === 'ENOSPC' || code === 'EDQUOT') return 'full';
  if (code.startsWith('SQLITE_READONLY') || code === 'EROFS' || code === 'EACCES' || code === 'EPERM' || code === 'SQLITE_PERM') return 'read-only';
  if (code.startsWith('SQLITE_IOERR') || code.startsWith('SQLITE_CANTOPEN') || code === 'SQLITE_CORRUPT' || code === 'SQLITE_NOTADB') return 'unavailable';
  return null;
}

/** The store cannot be opened; the message says what to do. */
export class StoreUnavailableError extends Error {
  constructor(dataDir: string, failure: StoreFailure, cause: unknown) {
    const detail = cause instanceof Error ? `${(cause as { code?: string }).code ?? ''} ${cause.message}`.trim() : String(cause);
    const what =
      failure === 'full'
        ? `The data folder ${dataDir} is full: free space on its disk, or set DATA_DIR to a folder with room.`
        : failure === 'read-only'
          ? `The data folder ${dataDir} cannot be written (read-only, or the service's user lacks permission): give that user write access, or set DATA_DIR to a writable folder.`
          : `The store in ${dataDir} cannot be opened (the disk failed or the file is damaged): restore it from a backup, or set DATA_DIR to another folder.`;
    super(`${what} (${detail})`, { cause });
    this.name = 'StoreUnavailableError';
  }
}
