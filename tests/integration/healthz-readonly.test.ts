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
    const res = loader()
    expect(res.status).toBe(503)
    expect(res.headers.get('cache-control')).toBe('no-store')
    expect(await res.json()).toMatchObject({ ok: false, error: 'The database is read-only.' })
  })
})
