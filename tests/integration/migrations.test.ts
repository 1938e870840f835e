import Database from 'better-sqlite3'
import { afterEach, describe, expect, it } from 'vitest'
import { createDb } from '~/.server/db'
import { tempDbPath } from '#tests/setup/temp-db'

describe('migrations', () => {
  let cleanup = () => {}
  afterEach(() => cleanup())

  it('apply to a fresh file, set the pragmas and are idempotent', () => {
    const tmp = tempDbPath()
    cleanup = tmp.cleanup
    const first = createDb(tmp.path)
    const tables = () =>
      (first.$client.prepare("select name from sqlite_master where type in ('table','index','trigger') order by name").all() as Array<{ name: string }>).map((r) => r.name)
    const before = tables()
    expect(before).toEqual(expect.arrayContaining(['detectors', 'events', 'sites', 'audit_log', 'email_outbox', 'search_index', 'api_tokens', 'sessions', 'events_detector_idx']))
    expect(first.$client.pragma('journal_mode', { simple: true })).toBe('wal')
    expect(first.$client.pragma('foreign_keys', { simple: true })).toBe(1)
    expect(first.$client.pragma('busy_timeout', { simple: true })).toBe(5000)
    first.$client.close()

    // Opening again runs the migrator again: nothing changes, nothing fails.
    const again = createDb(tmp.path)
    const raw = new Database(tmp.path, { readonly: true })
    const applied = raw.prepare('select count(*) as n from __drizzle_migrations').get() as { n: number }
    expect(applied.n).toBe(19)
    expect((raw.prepare("select name from sqlite_master where type in ('table','index','trigger') order by name").all() as Array<{ name: string }>).map((r) => r.name)).toEqual(before)
    raw.close()
    again.$client.close()
  })

  it('keeps row totals and the search index in step with writes', () => {
    const tmp = tempDbPath()
    cleanup = tmp.cleanup
    const db = createDb(tmp.path)
    const q = db.$client
    q.prepare("insert into customers (id, name, kind) values (1, 'Test Diner Group', 'restaurant')").run()
    q.prepare("insert into sites (id, customer_id, name, street, city, region, postal_code, time_zone, jurisdiction, ahj_name, code_basis) values (1, 1, 'Main Kitchen', '12 Quayside Road', 'Lowmoor', 'US-OR', '97000', 'America/Los_Angeles', 'City of Lowmoor', 'Lowmoor Fire', 'imc')").run()
    const rows = (name: string) => (q.prepare('select rows from table_counts where name = ?').get(name) as { rows: number }).rows
    expect(rows('customers')).toBe(1)
    expect(rows('sites')).toBe(1)
    const hit = q.prepare("select kind, ref_id from search_index where search_index match 'quaysi*'").all()
    expect(hit).toEqual([{ kind: 'site', ref_id: 1 }])
    q.prepare("update sites set street = '9 Harbour Lane' where id = 1").run()
    expect(q.prepare("select count(*) as n from search_index where search_index match 'quaysi*'").get()).toEqual({ n: 0 })
    expect(q.prepare("select count(*) as n from search_index where search_index match 'harbour'").get()).toEqual({ n: 1 })
    q.prepare('delete from sites where id = 1').run()
    expect(rows('sites')).toBe(0)
    expect(q.prepare("select count(*) as n from search_index where kind = 'site'").get()).toEqual({ n: 0 })
    q.close()
  })
})
