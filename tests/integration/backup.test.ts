import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterAll, describe, expect, it } from 'vitest'
import { createDb } from '~/.server/db'
import { seededDb } from '#tests/setup/temp-db'

const run = (script: string, args: string[]) => spawnSync('node_modules/.bin/tsx', [`scripts/${script}.ts`, ...args], { encoding: 'utf8' })

/** Every table's rows, sorted (some FTS tables have no rowid), as one comparable value. */
function everyRow(path: string) {
  const db = new Database(path, { readonly: true })
  const tables = db.prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' order by name").pluck().all() as string[]
  const rows = Object.fromEntries(tables.map((t) => [t, (db.prepare(`select * from "${t}"`).raw().all() as unknown[]).map((r) => JSON.stringify(r)).sort()]))
  db.close()
  return rows
}

describe('backup and restore', () => {
  const data = seededDb('small', { fresh: true })
  const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-backup-'))
  afterAll(() => {
    data.cleanup()
    rmSync(dir, { recursive: true, force: true })
  })

  it('copies a database that is being written to, and restores it row for row', () => {
    // A write the backup must carry: still in the WAL, not yet in the main file.
    data.db.$client.prepare("insert into closed_days (day, label) values ('2026-12-24', 'Company day')").run()
    const expected = everyRow(data.path)
    const backup = join(dir, 'copy.db')
    const made = run('db-backup', ['--db', data.path, '--to', backup])
    expect(made.status, made.stderr).toBe(0)
    expect(made.stdout).toMatch(/integrity ok/)
    expect(statSync(backup).mode & 0o777).toBe(0o600)

    // Later work, which the restore takes back.
    data.db.$client.prepare("delete from closed_days where day = '2026-12-24'").run()
    data.db.$client.close()
    const restored = run('db-restore', ['--from', backup, '--db', data.path])
    expect(restored.status, restored.stderr).toBe(0)
    expect(everyRow(data.path)).toEqual(expected)
    // The file it replaced is kept beside it.
    expect(readdirSync(join(data.path, '..')).some((f) => f.includes('.before-restore-'))).toBe(true)
  })

  it('refuses a backup that is not a sound database, and replaces nothing', () => {
    const bad = join(dir, 'bad.db')
    spawnSync('sh', ['-c', `head -c 8192 /dev/urandom > ${bad}`])
    const target = join(dir, 'target.db')
    createDb(target).$client.close()
    const before = statSync(target).mtimeMs
    const restored = run('db-restore', ['--from', bad, '--db', target])
    expect(restored.status).not.toBe(0)
    expect(restored.stderr).toMatch(/not a database|integrity|malformed/i)
    expect(statSync(target).mtimeMs).toBe(before)
    expect(existsSync(`${target}.restoring`)).toBe(false)
  })

  it('creates the database and its WAL readable by their owner only', () => {
    const path = join(dir, 'fresh', 'new.db')
    const db = createDb(path)
    db.$client.prepare("insert into closed_days (day, label) values ('2027-01-04', 'Stocktake')").run()
    for (const file of [path, `${path}-wal`]) expect(statSync(file).mode & 0o777, file).toBe(0o600)
    expect(statSync(join(dir, 'fresh')).mode & 0o777).toBe(0o700)
    db.$client.close()
  })
})
