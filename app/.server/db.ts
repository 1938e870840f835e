import Database from 'better-sqlite3'
import { drizzle, type BetterSQLite3Database } from 'drizzle-orm/better-sqlite3'
import { migrate } from 'drizzle-orm/better-sqlite3/migrator'
import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import * as schema from './schema'

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database }

const migrationsFolder = resolve(process.env.MIGRATIONS_PATH ?? 'drizzle')

/** Opens (creating if needed) the SQLite file, sets the pragmas the app relies on, and migrates. */
export function createDb(path: string, { runMigrations = true } = {}): Db {
  if (path !== ':memory:') ownerOnly(path)
  const sqlite = new Database(path)
  sqlite.pragma('journal_mode = WAL')
  sqlite.pragma('foreign_keys = ON')
  sqlite.pragma('busy_timeout = 5000')
  // WAL makes NORMAL durable against application crashes; only power loss can drop the last commit.
  sqlite.pragma('synchronous = NORMAL')
  const db = drizzle(sqlite, { schema }) as Db
  if (runMigrations) migrate(db, { migrationsFolder })
  return db
}

/**
 * The records are the customers' and the people's: the database is created readable and writable by
 * the server's own account only, and SQLite gives its WAL and shared-memory files the database file's
 * mode. An existing file keeps an owner-only mode too (a copy may have arrived with a looser one).
 */
function ownerOnly(path: string) {
  mkdirSync(dirname(path), { recursive: true, mode: 0o700 })
  if (!existsSync(path)) closeSync(openSync(path, 'a', 0o600))
  for (const file of [path, `${path}-wal`, `${path}-shm`]) {
    try {
      chmodSync(file, 0o600)
    } catch {
      // Not there yet, or not ours to change: SQLite reports a file it cannot open.
    }
  }
}

/**
 * Runs `fn` in a write transaction that takes the write lock at BEGIN (IMMEDIATE). A deferred
 * transaction that reads first and writes later cannot wait for a lock another writer holds: SQLite
 * answers "database is locked" at once, because its snapshot may be stale. IMMEDIATE waits up to the
 * busy timeout instead. Nested calls become savepoints of the outer transaction.
 */
export function writeTx<T>(db: Db | Database.Database, fn: () => T): T {
  const sqlite = '$client' in db ? db.$client : db
  return sqlite.transaction(fn).immediate()
}

const globalForDb = globalThis as unknown as { __ductkeeperDb?: Db }

/** The process-wide database, opened on first use (dev-safe: survives module reloads). */
export function getDb(): Db {
  globalForDb.__ductkeeperDb ??= createDb(process.env.DATABASE_PATH ?? 'data/ductkeeper.db')
  return globalForDb.__ductkeeperDb
}
