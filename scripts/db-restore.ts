// npm run db:restore -- --from backup.db [--db path]
// Puts a backup in place of the database. Stop the server first: the running process keeps the old
// file open. The backup is checked before anything is replaced; the current file is kept beside it as
// <name>.before-restore-<time>.db, so a restore can itself be undone.
import { chmodSync, copyFileSync, existsSync, renameSync, rmSync } from 'node:fs'
import { parseArgs } from 'node:util'
import Database from 'better-sqlite3'

const { values } = parseArgs({ options: { db: { type: 'string' }, from: { type: 'string' } } })
const path = values.db ?? process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
if (!values.from || !existsSync(values.from)) {
  console.error('Give the backup to restore: npm run db:restore -- --from <file>')
  process.exit(2)
}
const backup = new Database(values.from, { readonly: true, fileMustExist: true })
const integrity = backup.pragma('integrity_check', { simple: true })
backup.close()
if (integrity !== 'ok') {
  console.error(`${values.from} failed its integrity check (${String(integrity)}); nothing was replaced.`)
  process.exit(1)
}

// Copied next to the target first, then renamed over it: the database is never half written.
const incoming = `${path}.restoring`
copyFileSync(values.from, incoming)
chmodSync(incoming, 0o600)
if (existsSync(path)) {
  // Folds the old file's WAL into it, so the kept copy is whole on its own.
  const current = new Database(path)
  current.pragma('wal_checkpoint(TRUNCATE)')
  current.close()
  renameSync(path, `${path.replace(/\.db$/, '')}.before-restore-${new Date().toISOString().replace(/[:.]/g, '-')}.db`)
}
for (const stale of [`${path}-wal`, `${path}-shm`]) rmSync(stale, { force: true })
renameSync(incoming, path)
console.log(`Restored ${values.from} to ${path}.`)
