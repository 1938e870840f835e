import type Database from 'better-sqlite3'
import { closeSync, existsSync, fsyncSync, openSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs'
import { basename, dirname, join } from 'node:path'
import type { IsoDate } from '~/domain/dates'
import { createDb } from '../db'
import { seed, type Scale, type SeedCounts } from './generate'

// Files SQLite keeps beside a database while it is open (or after a crash).
const SIDE_FILES = ['-wal', '-shm', '-journal']
// A temp seed whose process still lives but has not written for this long was left behind (its pid
// was reused, as happens in containers that restart with the same pids).
const ABANDONED_MS = 10 * 60_000

/**
 * True when the database holds anything someone entered. Nothing can be entered without a user to
 * sign in as (the console, tokens and audit all hang off users), and the demo's records hang off
 * customers, so those two tables decide. Counting every table would not do: migrations fill
 * bookkeeping tables (kept totals, the search index's internals) and the server notes its own state.
 */
export function holdsData(sqlite: Database.Database): boolean {
  return ['users', 'customers'].some((table) => sqlite.prepare(`select 1 from ${table} limit 1`).get() !== undefined)
}

const seedPrefix = (path: string) => `${basename(path)}.seeding-`

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0)
    return true
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM'
  }
}

function removeWithSideFiles(file: string) {
  for (const suffix of ['', ...SIDE_FILES]) rmSync(file + suffix, { force: true })
}

/** Deletes temp seeds left beside `path` by runs that were interrupted; returns their names. */
export function removeStaleSeeds(path: string): string[] {
  const dir = dirname(path)
  if (!existsSync(dir)) return []
  const prefix = seedPrefix(path)
  const removed: string[] = []
  for (const name of readdirSync(dir)) {
    const match = name.startsWith(prefix) ? /^(\d+)$/.exec(name.slice(prefix.length)) : null
    if (!match) continue
    const pid = Number(match[1])
    const file = join(dir, name)
    const touched = Math.max(...['', '-wal'].map((s) => (existsSync(file + s) ? statSync(file + s).mtimeMs : 0)))
    if (pid === process.pid || !alive(pid) || Date.now() - touched > ABANDONED_MS) {
      removeWithSideFiles(file)
      removed.push(name)
    }
  }
  return removed
}

function fsyncPath(path: string) {
  const fd = openSync(path, 'r')
  try {
    fsyncSync(fd)
  } finally {
    closeSync(fd)
  }
}

export type FreshSeed = { seeded: false } | { seeded: true; counts: SeedCounts; seconds: number; removedStale: string[] }

/**
 * Seeds `scale` into the database at `path` all or nothing. The data is written into a temp file
 * beside it (`<path>.seeding-<pid>`, migrated by `createDb`), which is closed, synced and renamed
 * over `path` only when complete; a run killed at any moment leaves `path` as it was, and the next
 * run removes the temp file and starts again. Does nothing when `path` already holds data, unless
 * `replace` is set.
 */
export function seedFreshDatabase(path: string, scale: Scale, today: IsoDate, o: { replace?: boolean; log?: (line: string) => void } = {}): FreshSeed {
  if (path === ':memory:') throw new Error('Seed a database file, not :memory:.')
  const removedStale = removeStaleSeeds(path)
  if (existsSync(path) && !o.replace) {
    // Opened the usual way so a crash's WAL is recovered and migrations run before it is judged.
    const existing = createDb(path)
    const full = holdsData(existing.$client)
    existing.$client.close()
    if (full) return { seeded: false }
  }

  o.log?.(`Seeding the ${scale} scenario into ${path} …`)
  const started = performance.now()
  const temp = `${path}.seeding-${process.pid}`
  removeWithSideFiles(temp)
  const db = createDb(temp)
  let counts: SeedCounts
  try {
    counts = seed(db.$client, scale, today)
    // Statistics for the planner from the data as loaded: the migrations' own ANALYZE saw empty tables.
    db.$client.exec('ANALYZE')
    // Everything into the main file, so the file alone is the whole database when it is renamed.
    db.$client.pragma('wal_checkpoint(TRUNCATE)')
  } catch (error) {
    db.$client.close()
    removeWithSideFiles(temp)
    throw error
  }
  db.$client.close()
  if (existsSync(`${temp}-wal`)) throw new Error(`${temp} still has a write-ahead log after closing; not using it.`)
  fsyncPath(temp)

  // The target holds no data (or is being replaced): a log or shared-memory file of its own would be
  // read as belonging to the new file after the rename, so they go first.
  for (const suffix of SIDE_FILES) rmSync(path + suffix, { force: true })
  renameSync(temp, path)
  fsyncPath(dirname(path))
  for (const suffix of SIDE_FILES) rmSync(temp + suffix, { force: true })
  return { seeded: true, counts, seconds: (performance.now() - started) / 1000, removedStale }
}
