import type Database from 'better-sqlite3'
import type { Db } from './db'

export interface AuditEntry {
  actorId: number | null
  action: string
  entity: string
  entityId?: number | string | null
  before?: unknown
  after?: unknown
  /** When it happened (UTC ISO); left out, the database stamps the moment of writing. */
  at?: string
}

/** Appends to the audit log; call inside the same transaction as the change it records. */
export function writeAudit(db: Db, e: AuditEntry) {
  writeAuditRow(db.$client, e)
}

/** As `writeAudit`, on the bare connection (the seed writes the history's entries this way). */
export function writeAuditRow(sqlite: Database.Database, e: AuditEntry) {
  const values = [
    e.actorId,
    e.action,
    e.entity,
    e.entityId == null ? null : String(e.entityId),
    e.before === undefined ? null : JSON.stringify(e.before),
    e.after === undefined ? null : JSON.stringify(e.after),
  ]
  if (e.at === undefined) {
    sqlite.prepare('insert into audit_log (actor_id, action, entity, entity_id, before, after) values (?, ?, ?, ?, ?, ?)').run(...values)
  } else {
    sqlite.prepare('insert into audit_log (actor_id, action, entity, entity_id, before, after, created_at) values (?, ?, ?, ?, ?, ?, ?)').run(...values, e.at)
  }
}
