import { createHash } from 'node:crypto'
import type { VISIT_KINDS, VisitTask } from '~/domain/vocabulary'
import type { Db } from '../db'
import type { BulkChange, Fields } from './action'
import type { ChangedRecord } from './runner'

/** A visit a bulk change books, with the work it carries on each detector. */
export interface VisitCreate {
  siteId: number
  kind: (typeof VISIT_KINDS)[number]
  scheduledOn: string
  technicianId: number | null
  notes: string | null
  detectors: Array<{ detectorId: number; tasks: VisitTask[] }>
}

// 48 bits: unique enough across one plan, and short enough for the digits-only ids the API takes back.
const hash48 = (text: string) => Number.parseInt(createHash('sha256').update(text).digest('hex').slice(0, 12), 16) || 1

/**
 * A change that books a new visit. Its `id` names the visit's place in the plan (site, day,
 * technician, kind) and its `version` fingerprints everything the visit would hold, so an apply
 * whose fresh plan differs from the preview refuses it like a record changed since.
 */
export function createChange(label: string, create: VisitCreate, shown: Fields): BulkChange {
  const place = `${create.siteId}|${create.scheduledOn}|${create.technicianId ?? ''}|${create.kind}`
  return { entity: 'visit', id: hash48(place), label, from: {}, to: shown, version: hash48(JSON.stringify(create)), create }
}

/** Inserts the visit and its detectors (inside the runner's transaction); the record undo keeps. */
export function insertVisit(db: Db, c: BulkChange & { create: VisitCreate }, actorId: number): ChangedRecord {
  const v = c.create
  const q = db.$client
  const id = Number(
    q
      .prepare("insert into visits (site_id, kind, scheduled_on, technician_id, status, notes, created_by) values (?, ?, ?, ?, 'planned', ?, ?)")
      .run(v.siteId, v.kind, v.scheduledOn, v.technicianId, v.notes, actorId).lastInsertRowid,
  )
  const item = q.prepare("insert into visit_detectors (visit_id, detector_id, tasks, result) values (?, ?, ?, 'pending')")
  for (const d of v.detectors) item.run(id, d.detectorId, d.tasks.join(','))
  return { entity: 'visit', id, label: `Visit ${id} · ${c.label}`, before: {}, after: c.to, version: 1, created: true }
}

/**
 * Created visits that work has reached since: no longer planned, a notice logged, a result, reading,
 * photo or message recorded. Undo leaves all of those alone and says which.
 */
export function workStarted(db: Db, records: readonly ChangedRecord[]): ChangedRecord[] {
  const created = records.filter((r) => r.created)
  if (created.length === 0) return []
  const touched = new Set<number>()
  const q = db.$client
  for (let i = 0; i < created.length; i += 4_000) {
    const chunk = created.slice(i, i + 4_000).map((r) => r.id)
    const marks = chunk.map(() => '?').join(',')
    // Raw SQL: one pass over every table that can point at a visit (7 × 4,000 values, under the bind limit).
    const rows = q
      .prepare(
        `select id from visits where id in (${marks}) and status <> 'planned'
         union select visit_id from visit_detectors where visit_id in (${marks}) and result <> 'pending'
         union select visit_id from task_results where visit_id in (${marks})
         union select visit_id from readings where visit_id in (${marks})
         union select visit_id from notifications where visit_id in (${marks})
         union select visit_id from attachments where visit_id in (${marks})
         union select visit_id from email_outbox where visit_id in (${marks})`,
      )
      .all(...chunk, ...chunk, ...chunk, ...chunk, ...chunk, ...chunk, ...chunk) as Array<{ id: number }>
    for (const r of rows) touched.add(r.id)
  }
  return created.filter((r) => touched.has(r.id))
}

/** Removes a visit a bulk change created, if it is still as created; false when it has moved on. */
export function removeVisit(db: Db, r: ChangedRecord): boolean {
  return db.$client.prepare("delete from visits where id = ? and version = ? and status = 'planned'").run(r.id, r.version).changes === 1
}
