import { statfsSync } from 'node:fs'
import { dirname } from 'node:path'
import type { RouteAccess } from '~/domain/permissions'
import { databaseProblem, getDb, isBusy, withoutWaiting } from '~/.server/db'
import { offloadBusy } from '~/.server/offload'

export const handle = { access: { loader: 'public' } satisfies RouteAccess }

// How long the probe waits for another writer's lock. Short: a health check that hangs for the full
// busy timeout is as bad as none, and a lock held this long already means writes are stalling.
const PROBE_WAIT_MS = 1_000

const noStore = { 'Cache-Control': 'no-store' }

// Below this a write that grows the WAL by a few pages (a bulk change, an import) can fail midway
// (it is rolled back whole, but refused). A megabyte is a few hundred pages.
const MIN_FREE_BYTES = 1024 * 1024

function freeBytes(path: string): number | null {
  if (!path || path === ':memory:') return null
  try {
    const s = statfsSync(dirname(path))
    return s.bavail * s.bsize
  } catch {
    return null
  }
}

/** Takes the write lock without waiting for it: SQLITE_BUSY at once if another connection holds it. */
function probeOnce(sqlite: ReturnType<typeof getDb>['$client']) {
  withoutWaiting(sqlite, () => {
    sqlite.exec('begin immediate')
    try {
      const version = sqlite.pragma('user_version', { simple: true }) as number
      sqlite.pragma(`user_version = ${version}`)
    } finally {
      sqlite.exec('rollback')
    }
  })
}

/**
 * Up means writable, not just readable: the probe takes the write lock and rewrites the header's
 * user_version to itself, then rolls back, so nothing is ever changed. While another connection holds
 * the lock, the probe tries again every few ms between other requests, never blocking the thread in
 * SQLite's own busy wait; while that connection is the background worker's, at work, it answers up.
 */
export async function loader() {
  let sqlite: ReturnType<typeof getDb>['$client']
  try {
    sqlite = getDb().$client
  } catch (error) {
    return Response.json({ ok: false, error: databaseProblem(error) ?? 'The database could not be opened.' }, { status: 503, headers: noStore })
  }
  const deadline = performance.now() + PROBE_WAIT_MS
  try {
    for (;;) {
      try {
        probeOnce(sqlite)
        break
      } catch (error) {
        if (!isBusy(error)) throw error
        // The background worker writing a bulk change holds the lock for as long as that takes: the
        // database is being written, so it is up. A lock held with no such job running is a stall.
        if (offloadBusy()) break
        if (performance.now() > deadline) throw error
        await new Promise((resolve) => setTimeout(resolve, 5))
      }
    }
    // The probe writes nothing to the disk, so a full disk is seen from the folder's free space.
    const free = freeBytes(sqlite.name)
    if (free !== null && free < MIN_FREE_BYTES) {
      return Response.json({ ok: false, error: 'The disk holding the database is full.', code: 'SQLITE_FULL' }, { status: 503, headers: noStore })
    }
    return Response.json({ ok: true }, { headers: noStore })
  } catch (error) {
    const code = (error as { code?: string }).code ?? ''
    const reason = code.startsWith('SQLITE_BUSY')
      ? `Another writer has held the database lock for over ${PROBE_WAIT_MS / 1000} s.`
      : code.startsWith('SQLITE_READONLY')
        ? 'The database is read-only.'
        : code === 'SQLITE_FULL'
          ? 'The disk holding the database is full.'
          : 'The database cannot be written.'
    return Response.json({ ok: false, error: reason, code: code || undefined }, { status: 503, headers: noStore })
  }
}
