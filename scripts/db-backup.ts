// npm run db:backup [-- --db path] [--to file]
// A consistent copy of the database while the server keeps serving, through SQLite's online backup:
// pages are copied in steps and a write during the copy restarts only what it touched. The copy is
// checked (integrity_check) before it is reported, and is readable by its owner only.
import { chmodSync, existsSync } from 'node:fs'
import { parseArgs } from 'node:util'
import Database from 'better-sqlite3'

const { values } = parseArgs({ options: { db: { type: 'string' }, to: { type: 'string' } } })
const path = values.db ?? process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
if (!existsSync(path)) {
  console.error(`No database at ${path}.`)
  process.exit(2)
}
const stamp = new Date().toISOString().replace(/[:.]/g, '-')
const to = values.to ?? path.replace(/\.db$/, '') + `-backup-${stamp}.db`
if (existsSync(to)) {
  console.error(`${to} already exists; choose another name with --to.`)
  process.exit(2)
}

const source = new Database(path, { fileMustExist: true })
source.pragma('busy_timeout = 5000')
const started = performance.now()
await source.backup(to)
source.close()
chmodSync(to, 0o600)
const copy = new Database(to, { readonly: true })
const integrity = copy.pragma('integrity_check', { simple: true })
const migrations = (copy.prepare('select count(*) as n from __drizzle_migrations').get() as { n: number }).n
copy.close()
if (integrity !== 'ok') {
  console.error(`The copy at ${to} failed its integrity check: ${String(integrity)}`)
  process.exit(1)
}
console.log(`Backed up ${path} to ${to} in ${((performance.now() - started) / 1000).toFixed(1)} s (${migrations} migrations, integrity ok).`)
