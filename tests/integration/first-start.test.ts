import Database from 'better-sqlite3'
import { spawn } from 'node:child_process'
import { existsSync, readdirSync, writeFileSync } from 'node:fs'
import { dirname } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { createDb } from '~/.server/db'
import { holdsData, seedFreshDatabase } from '~/.server/seed/fresh'
import { tempDbPath, TEST_TODAY } from '#tests/setup/temp-db'

// The seed's count names and the tables they count.
const TABLE_OF = {
  customers: 'customers',
  sites: 'sites',
  units: 'units',
  detectors: 'detectors',
  events: 'events',
  readings: 'readings',
  visits: 'visits',
  results: 'task_results',
  notifications: 'notifications',
} as const

const schemaOf = (q: Database.Database) =>
  q.prepare("select type, name, tbl_name as tbl, sql from sqlite_master where name not like 'sqlite_stat%' order by type, name").all()

const seedingFiles = (path: string) => readdirSync(dirname(path)).filter((f) => f.includes('.seeding-'))

/**
 * Runs the real seeding script in its own process (node with tsx's loader: one process, so the kill
 * lands on the seeder itself) and SIGKILLs it `afterMs` after its temp file appears.
 */
async function seedAndKill(path: string, afterMs: number): Promise<{ killedAtMs: number; exit: string }> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/seed.ts', '--scale', 'demo', '--today', TEST_TODAY], {
    env: { ...process.env, DATABASE_PATH: path },
    stdio: ['ignore', 'ignore', 'pipe'],
  })
  let stderr = ''
  child.stderr.on('data', (d) => (stderr += d))
  const exited = new Promise<string>((resolve) => child.once('exit', (code, signal) => resolve(signal ?? `code ${code}`)))
  const started = Date.now()
  // Its own temp file: an earlier run's may still lie beside the target until this one clears it.
  const temp = `${path}.seeding-${child.pid}`
  while (!existsSync(temp)) {
    if (child.exitCode !== null) throw new Error(`the seeder exited before writing: code ${child.exitCode}\n${stderr}`)
    if (Date.now() - started > 20_000) throw new Error('no temp seed file appeared in 20 s')
    await new Promise((r) => setTimeout(r, 10))
  }
  await new Promise((r) => setTimeout(r, afterMs))
  const killedAtMs = Date.now() - started
  child.kill('SIGKILL')
  return { killedAtMs, exit: await exited }
}

describe('first start', () => {
  const made: Array<() => void> = []
  afterAll(() => made.forEach((c) => c()))

  it('survives being killed at any point of the first seed and comes up complete next time', async () => {
    const { path, cleanup } = tempDbPath()
    made.push(cleanup)
    // As a first start finds it after `db:migrate`: migrated, empty.
    createDb(path).$client.close()

    for (const afterMs of [0, 300, 3_000]) {
      const { exit, killedAtMs } = await seedAndKill(path, afterMs)
      expect(exit, `killed ${afterMs} ms in`).toBe('SIGKILL')
      console.info(`seeder killed ${killedAtMs} ms after it was started (${afterMs} ms after its temp file appeared)`)
      // Killed mid-seed: the half-written data is only ever in the temp file; the target is untouched.
      expect(seedingFiles(path).length).toBeGreaterThan(0)
      const target = createDb(path)
      expect(holdsData(target.$client), `target after a kill ${afterMs} ms in`).toBe(false)
      target.$client.close()
    }

    const fresh = seedFreshDatabase(path, 'demo', TEST_TODAY)
    expect(fresh.seeded).toBe(true)
    if (!fresh.seeded) return
    console.info(`then seeded in ${fresh.seconds.toFixed(1)} s, removing ${fresh.removedStale.join(', ')}`)
    // The interrupted runs' temp files (and their -wal/-shm) are gone.
    expect(fresh.removedStale.length).toBeGreaterThan(0)
    expect(seedingFiles(path)).toEqual([])
    expect(existsSync(`${path}-wal`)).toBe(false)

    const q = new Database(path, { readonly: true })
    made.push(() => q.close())
    expect(fresh.counts.customers).toBeGreaterThan(0)
    expect(fresh.counts.detectors).toBe(10_500)
    for (const [key, table] of Object.entries(TABLE_OF)) {
      const { n } = q.prepare(`select count(*) as n from ${table}`).get() as { n: number }
      expect(n, table).toBe(fresh.counts[key as keyof typeof TABLE_OF])
    }
    // The kept totals agree with the rows, so the count triggers were rebuilt.
    const kept = q.prepare('select name, rows from table_counts').all() as Array<{ name: string; rows: number }>
    for (const { name, rows } of kept) expect(rows, name).toBe((q.prepare(`select count(*) as n from "${name}"`).get() as { n: number }).n)
    // Every table, index, trigger and view a freshly migrated database has, with the same SQL.
    const reference = tempDbPath()
    made.push(reference.cleanup)
    const migrated = createDb(reference.path)
    expect(schemaOf(q)).toEqual(schemaOf(migrated.$client))
    expect((schemaOf(q) as Array<{ type: string }>).filter((r) => r.type === 'index').length).toBeGreaterThan(10)
    migrated.$client.close()
    expect(q.pragma('integrity_check', { simple: true })).toBe('ok')
    expect(q.pragma('foreign_key_check')).toEqual([])
  }, 180_000)

  it('leaves a database that holds data alone, even one with users but no customers yet', () => {
    const { path, cleanup } = tempDbPath()
    made.push(cleanup)
    const db = createDb(path)
    db.$client.prepare("insert into roles (key, label, description) values ('admin', 'Administrator', 'Runs the install')").run()
    db.$client.prepare("insert into users (email, name, role, active) values ('first@example.test', 'First Admin', 'admin', 1)").run()
    db.$client.close()
    writeFileSync(`${path}.seeding-999999999`, 'left by a run that was killed')
    expect(seedFreshDatabase(path, 'small', TEST_TODAY)).toEqual({ seeded: false })
    // The stale temp file is cleared on the way, and the one user is still the only row.
    expect(seedingFiles(path)).toEqual([])
    const q = new Database(path, { readonly: true })
    expect(q.prepare('select email from users').all()).toEqual([{ email: 'first@example.test' }])
    expect((q.prepare('select count(*) as n from customers').get() as { n: number }).n).toBe(0)
    q.close()
  })

  it('replaces a database on request in one step', () => {
    const { path, cleanup } = tempDbPath()
    made.push(cleanup)
    const first = seedFreshDatabase(path, 'small', TEST_TODAY)
    expect(first.seeded).toBe(true)
    const db = createDb(path)
    db.$client.prepare("insert into users (email, name, role, active) values ('marker@example.test', 'Marker', 'office', 1)").run()
    db.$client.close()
    const again = seedFreshDatabase(path, 'small', TEST_TODAY, { replace: true })
    expect(again.seeded).toBe(true)
    const q = new Database(path, { readonly: true })
    expect((q.prepare('select count(*) as n from detectors').get() as { n: number }).n).toBe(200)
    expect(q.prepare("select 1 from users where email = 'marker@example.test'").get()).toBeUndefined()
    q.close()
  })
})
