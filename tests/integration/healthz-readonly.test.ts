import Database from 'better-sqlite3'
import { drizzle } from 'drizzle-orm/better-sqlite3'
import { afterAll, describe, expect, it } from 'vitest'
import { loader } from '~/routes/healthz'
import { createDb } from '~/.server/db'
import { tempDbPath } from '#tests/setup/temp-db'

const holder = globalThis as unknown as { __ductkeeperDb?: unknown }
const file = tempDbPath()
afterAll(() => {
  delete holder.__ductkeeperDb
  file.cleanup()
})

describe('/healthz', () => {
  it('answers 503 with a plain reason when the database can be read but not written', async () => {
    createDb(file.path).$client.close()
    holder.__ductkeeperDb = drizzle(new Database(file.path, { readonly: true }))
    const res = await loader()
    expect(res.status).toBe(503)
    expect(res.headers.get('cache-control')).toBe('no-store')
    expect(await res.json()).toMatchObject({ ok: false, error: 'The database is read-only.' })
  })

  /** Runs `fn` with the app's database on a fresh file and another connection holding its write lock. */
  async function withLockHeld(fn: (other: Database.Database) => Promise<void>) {
    const path = tempDbPath()
    holder.__ductkeeperDb = createDb(path.path)
    // Another connection (as the background worker applying a bulk change) holds the write lock.
    const other = new Database(path.path)
    other.exec('begin immediate')
    try {
      await fn(other)
    } finally {
      if (other.inTransaction) other.exec('rollback')
      other.close()
      ;(holder.__ductkeeperDb as { $client: Database.Database }).$client.close()
      delete holder.__ductkeeperDb
      path.cleanup()
    }
  }

  it("waits for another connection's write lock without holding up this thread, then answers up", () =>
    withLockHeld(async (other) => {
      const started = performance.now()
      const answer = loader()
      // The thread stays free: a timer set now fires on time, not after SQLite's busy wait.
      const tick = await new Promise<number>((resolve) => setTimeout(() => resolve(performance.now() - started), 20))
      expect(tick).toBeLessThan(200)
      setTimeout(() => other.exec('rollback'), 150)
      const res = await answer
      expect(res.status).toBe(200)
      expect(performance.now() - started).toBeGreaterThanOrEqual(140)
    }))

  it('answers 503 when another connection has held the write lock for over a second', () =>
    withLockHeld(async () => {
      const res = await loader()
      expect(res.status).toBe(503)
      expect(await res.json()).toMatchObject({ ok: false, code: 'SQLITE_BUSY' })
    }))
})
