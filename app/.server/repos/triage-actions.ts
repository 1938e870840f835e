import { bookVisit } from '../visits/book'
import { VisitRefusal } from '../visits/refusal'
import type { VisitTask } from '~/domain/vocabulary'
import { writeTx, type Db } from '../db'
import { writeAudit } from '../audit'
import { listsChanged } from '../list-query'

export class Refusal extends Error {}

type Ids = number[]

function detectorsById(db: Db, ids: Ids) {
  const rows = db.$client
    .prepare(`select id, site_id as siteId, tag, assigned_to as assignedTo, acknowledged_at as acknowledgedAt from detectors where id in (${ids.map(() => '?').join(',')})`)
    .all(...ids) as Array<{ id: number; siteId: number; tag: string; assignedTo: number | null; acknowledgedAt: string | null }>
  if (rows.length !== ids.length) throw new Refusal(`${ids.length - rows.length} of the selected detectors no longer exist; reload and try again.`)
  return rows
}

/** Marks detectors as seen: they leave the open queue. One transaction, one audit entry per detector. */
export function acknowledge(db: Db, actorId: number, ids: Ids, note: string | null) {
  const q = db.$client
  const at = new Date().toISOString()
  const n = writeTx(db, () => {
    const rows = detectorsById(db, ids)
    const update = q.prepare('update detectors set acknowledged_at = ?, acknowledged_by = ?, version = version + 1 where id = ?')
    for (const r of rows) {
      update.run(at, actorId, r.id)
      writeAudit(db, { actorId, action: 'triage.acknowledge', entity: 'detector', entityId: r.id, before: { acknowledgedAt: r.acknowledgedAt }, after: { acknowledgedAt: at, note } })
    }
    return rows.length
  })
  listsChanged()
  return n
}

export function assign(db: Db, actorId: number, ids: Ids, technicianId: number) {
  const q = db.$client
  const n = writeTx(db, () => {
    const tech = q.prepare("select name from users where id = ? and role = 'technician' and active = 1").get(technicianId) as { name: string } | undefined
    if (!tech) throw new Refusal('Choose an active technician.')
    const rows = detectorsById(db, ids)
    const update = q.prepare('update detectors set assigned_to = ?, version = version + 1 where id = ?')
    for (const r of rows) {
      update.run(technicianId, r.id)
      writeAudit(db, { actorId, action: 'triage.assign', entity: 'detector', entityId: r.id, before: { assignedTo: r.assignedTo }, after: { assignedTo: technicianId } })
    }
    return { count: rows.length, technician: tech.name }
  })
  listsChanged()
  return n
}

/**
 * Books one visit per site for the selected detectors, each through the one booking path (working
 * day, technician, open visits for the same tasks). All or nothing: one refusal books none.
 */
export function scheduleVisits(db: Db, actorId: number, ids: Ids, o: { date: string; kind: 'inspection' | 'test' | 'cleaning' | 'repair'; technicianId: number | null; today: string }) {
  const tasks: VisitTask[] = o.kind === 'cleaning' ? ['visual', 'cleaning'] : o.kind === 'inspection' ? ['visual'] : ['visual', 'functional']
  const result = writeTx(db, () => {
    const rows = detectorsById(db, ids)
    const bySite = new Map<number, number[]>()
    for (const r of rows) bySite.set(r.siteId, [...(bySite.get(r.siteId) ?? []), r.id])
    try {
      for (const [siteId, detectorIds] of bySite) {
        bookVisit(db, actorId, { siteId, kind: o.kind, scheduledOn: o.date, technicianId: o.technicianId, detectors: detectorIds.map((detectorId) => ({ detectorId, tasks })) }, o.today)
      }
    } catch (error) {
      if (error instanceof VisitRefusal) throw new Refusal(error.message)
      throw error
    }
    return { visits: bySite.size, detectors: rows.length }
  })
  listsChanged()
  return result
}
