import { createHash } from 'node:crypto'
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, utimesSync } from 'node:fs'
import { dirname, join, relative } from 'node:path'
import { createDb } from '~/.server/db'
import { seed, type Scale } from '~/.server/seed/generate'
import { PREBUILT_DIR_ENV, TEST_TODAY } from './temp-db'

const CACHE_ROOT = 'tests/.db'

// Everything the seeded file can depend on: the modules the generator and createDb import, followed
// through their relative and `~/` imports (so a rewritten generator is tracked whatever it calls),
// the migrations, the SQLite driver version and the fixed test day. A change to any of them makes a
// new key, so a cached file is never stale.
const ROOTS = ['app/.server/seed/generate.ts', 'app/.server/db.ts']
const ALSO = ['drizzle', 'package-lock.json', 'tests/setup/temp-db.ts', 'tests/setup/prebuilt-db.ts']

function filesUnder(path: string): string[] {
  if (!existsSync(path)) return []
  if (statSync(path).isFile()) return [path]
  return readdirSync(path, { recursive: true, encoding: 'utf8' })
    .map((f) => join(path, f))
    .filter((f) => statSync(f).isFile())
}

function resolveImport(from: string, spec: string): string | null {
  const base = spec.startsWith('~/') ? join('app', spec.slice(2)) : join(dirname(from), spec)
  return [base, `${base}.ts`, `${base}.tsx`, join(base, 'index.ts')].find((f) => existsSync(f) && statSync(f).isFile()) ?? null
}

function importClosure(roots: string[]): string[] {
  const seen = new Set<string>()
  const queue = [...roots]
  while (queue.length) {
    const file = queue.pop()!
    if (seen.has(file)) continue
    seen.add(file)
    for (const [, spec] of readFileSync(file, 'utf8').matchAll(/(?:from|import)\s*['"]((?:\.{1,2}|~)\/[^'"]+)['"]/g)) {
      const next = resolveImport(file, spec)
      if (next) queue.push(next)
    }
  }
  return [...seen]
}

function inputsKey(): string {
  const hash = createHash('sha256').update(TEST_TODAY)
  const files = [...new Set([...importClosure(ROOTS), ...ALSO.flatMap(filesUnder)])].sort()
  for (const file of files) hash.update(`\0${relative('.', file)}\0`).update(readFileSync(file))
  return hash.digest('hex').slice(0, 16)
}

/** Seeds one scale into a private file, folds the WAL into it and closes it, then moves it into place. */
function build(target: string, scale: Scale) {
  const scratch = `${target}.${process.pid}.tmp`
  const db = createDb(scratch)
  seed(db.$client, scale, TEST_TODAY)
  // As a fresh start does: the planner's statistics from the data as loaded.
  db.$client.exec('ANALYZE')
  db.$client.pragma('wal_checkpoint(TRUNCATE)')
  db.$client.close()
  for (const suffix of ['-wal', '-shm']) rmSync(scratch + suffix, { force: true })
  // rename is atomic, so a run started alongside sees either no file or a whole one.
  renameSync(scratch, target)
}

/**
 * Makes sure a seeded, migrated database for each scale sits in tests/.db/<key>/ and tells the test
 * workers where (through the environment, which they inherit). Folders for other keys unused for
 * half an hour are removed; a run in progress never needs one that old.
 */
export function prebuildDatabases(scales: Scale[]) {
  const key = inputsKey()
  const dir = join(CACHE_ROOT, key)
  mkdirSync(dir, { recursive: true })
  // Marks the folder as in use, so a run with another key leaves it alone.
  utimesSync(dir, new Date(), new Date())
  for (const scale of scales) {
    const target = join(dir, `${scale}.db`)
    if (existsSync(target)) continue
    const started = Date.now()
    build(target, scale)
    console.log(`seeded the ${scale} test database in ${((Date.now() - started) / 1000).toFixed(1)} s (tests/.db/${key})`)
  }
  for (const other of readdirSync(CACHE_ROOT)) {
    const path = join(CACHE_ROOT, other)
    if (other !== key && Date.now() - statSync(path).mtimeMs > 1_800_000) rmSync(path, { recursive: true, force: true })
  }
  process.env[PREBUILT_DIR_ENV] = join(process.cwd(), dir)
}
