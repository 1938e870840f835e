import { copyFileSync, existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { createDb, type Db } from '~/.server/db'
import { seed, type Scale } from '~/.server/seed/generate'

// A fixed calendar day so seeded data, due dates and statuses are the same on every run.
export const TEST_TODAY = '2026-06-15'

/** Where the vitest global setup left the prebuilt databases; unset outside vitest (e.g. the bench). */
export const PREBUILT_DIR_ENV = 'DUCTKEEPER_TEST_DB_DIR'

export function tempDbPath(): { path: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-test-'))
  return { path: join(dir, 'test.db'), cleanup: () => rmSync(dir, { recursive: true, force: true }) }
}

function prebuilt(scale: Scale): string | null {
  const dir = process.env[PREBUILT_DIR_ENV]
  const file = dir ? join(dir, `${scale}.db`) : null
  return file && existsSync(file) ? file : null
}

/**
 * A migrated, seeded database in a temp folder, the test's own to change. It is a copy of the file
 * the global setup seeded for this scale when there is one; `fresh` (or no such file) seeds anew.
 */
export function seededDb(scale: Scale = 'small', o: { fresh?: boolean } = {}): { db: Db; path: string; cleanup: () => void } {
  const { path, cleanup } = tempDbPath()
  const source = o.fresh ? null : prebuilt(scale)
  if (source) copyFileSync(source, path)
  const db = createDb(path)
  if (!source) seed(db.$client, scale, TEST_TODAY)
  return {
    db,
    path,
    cleanup: () => {
      db.$client.close()
      cleanup()
    },
  }
}
