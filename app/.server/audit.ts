import type { Db } from './db'

export interface AuditEntry {
  actorId: number | null
  action: string
  entity: string
  entityId?: number | string | null
  before?: unknown
  after?: unknown
}

/** Appends to the audit log; call inside the same transaction as the change it records. */
export function writeAudit(db: Db, e: AuditEntry) {
  db.$client
    .prepare('insert into audit_log (actor_id, action, entity, entity_id, before, after) values (?, ?, ?, ?, ?, ?)')
    .run(
      e.actorId,
      e.action,
      e.entity,
      e.entityId == null ? null : String(e.entityId),
      e.before === undefined ? null : JSON.stringify(e.before),
      e.after === undefined ? null : JSON.stringify(e.after),
    )
}
