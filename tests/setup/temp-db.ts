import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { createDb, type Db } from '~/.server/db'
import { seed, type Scale } from '~/.server/seed/generate'

// A fixed calendar day so seeded data, due dates and statuses are the same on every run.
export const TEST_TODAY = '2026-06-15'

export function tempDbPath(): { path: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-test-'))
  return { path: join(dir, 'test.db'), cleanup: () => rmSync(dir, { recursive: true, force: true }) }
}

/** A migrated, seeded database in a temp folder. */
export function seededDb(scale: Scale = 'small'): { db: Db; path: string; cleanup: () => void } {
  const { path, cleanup } = tempDbPath()
  const db = createDb(path)
  seed(db.$client, scale, TEST_TODAY)
  return {
    db,
    path,
    cleanup: () => {
      db.$client.close()
      cleanup()
    },
  }
}
