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
  try {
    sqlite.pragma('journal_mode = WAL')
    sqlite.pragma('foreign_keys = ON')
    sqlite.pragma('busy_timeout = 5000')
    // WAL makes NORMAL durable against application crashes; only power loss can drop the last commit.
    sqlite.pragma('synchronous = NORMAL')
    const db = drizzle(sqlite, { schema }) as Db
    if (runMigrations) migrate(db, { migrationsFolder })
    return db
  } catch (error) {
    sqlite.close() // a file that cannot be set up is tried again later; no handle is left behind
    throw error
  }
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

/**
 * Runs `fn` with SQLite's busy wait off: a statement that needs the write lock while another
 * connection (the background worker applying a bulk change) holds it throws SQLITE_BUSY at once,
 * instead of holding up every request on this thread for as long as SQLite waits.
 */
export function withoutWaiting<T>(sqlite: Database.Database, fn: () => T): T {
  const wait = sqlite.pragma('busy_timeout', { simple: true }) as number
  sqlite.pragma('busy_timeout = 0')
  try {
    return fn()
  } finally {
    sqlite.pragma(`busy_timeout = ${wait}`)
  }
}

export const isBusy = (error: unknown) => ((error as { code?: string }).code ?? '').startsWith('SQLITE_BUSY')

/** Runs a write that may be skipped (an activity mark) only if the write lock is free now; says whether it ran. */
export function writeIfFree(sqlite: Database.Database, fn: () => void): boolean {
  try {
    withoutWaiting(sqlite, fn)
    return true
  } catch (error) {
    if (isBusy(error)) return false
    throw error
  }
}

/**
 * What is wrong with the database, in words an operator can act on, when `error` is SQLite saying it
 * cannot be opened or written (read-only, disk full, not there, lock held); null for any other error.
 */
export function databaseProblem(error: unknown): string | null {
  const code = String((error as { code?: unknown } | null)?.code ?? '')
  if (error instanceof DatabaseUnavailable) return error.problem
  if (code.startsWith('SQLITE_READONLY')) return 'The database is read-only: check the owner and permissions of the file and its folder, and that the disk is mounted for writing.'
  if (code === 'SQLITE_FULL' || code === 'SQLITE_IOERR_WRITE') return 'The disk holding the database is full: free space, then try again.'
  if (code.startsWith('SQLITE_CANTOPEN')) return 'The database file cannot be opened: check DATABASE_PATH and the permissions of its folder.'
  if (code.startsWith('SQLITE_BUSY')) return 'Another writer is holding the database lock.'
  return null
}

/** The database could not be opened; said once in the log, answered 503 to requests until it can. */
export class DatabaseUnavailable extends Error {
  constructor(readonly problem: string, options?: { cause: unknown }) {
    super(problem, options)
    this.name = 'DatabaseUnavailable'
  }
}

let lastOpenProblem: string | null = null

/**
 * The process-wide database, opened on first use (dev-safe: survives module reloads). A database
 * that cannot be opened (read-only, disk full) is tried again on the next call, so the server
 * carries on once it is fixed instead of exiting and being restarted in a loop.
 */
export function getDb(): Db {
  if (globalForDb.__ductkeeperDb) return globalForDb.__ductkeeperDb
  const path = process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
  try {
    globalForDb.__ductkeeperDb = createDb(path)
    if (lastOpenProblem) console.warn(`The database at ${path} opens again.`)
    lastOpenProblem = null
    return globalForDb.__ductkeeperDb
  } catch (error) {
    const problem = databaseProblem(error)
    if (!problem) throw error
    if (problem !== lastOpenProblem) console.error(`The database at ${path} cannot be used: ${problem} (${String((error as { code?: unknown }).code)})`)
    lastOpenProblem = problem
    throw new DatabaseUnavailable(problem, { cause: error })
  }
}
