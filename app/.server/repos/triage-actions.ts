import { calendarFor } from '~/domain/calendar'
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
 * Books one visit per site for the selected detectors on a working day of each site's region.
 * Refuses the whole request (nothing written) if any site cannot take that date.
 */
export function scheduleVisits(db: Db, actorId: number, ids: Ids, o: { date: string; kind: 'inspection' | 'test' | 'cleaning' | 'repair'; technicianId: number | null; today: string }) {
  if (o.date < o.today) throw new Refusal('Pick today or a later date.')
  const q = db.$client
  const result = writeTx(db, () => {
    if (o.technicianId !== null && !q.prepare("select 1 from users where id = ? and role = 'technician' and active = 1").get(o.technicianId)) {
      throw new Refusal('Choose an active technician, or leave the visit unassigned.')
    }
    const rows = detectorsById(db, ids)
    const bySite = new Map<number, number[]>()
    for (const r of rows) bySite.set(r.siteId, [...(bySite.get(r.siteId) ?? []), r.id])
    const regions = q.prepare(`select id, name, region from sites where id in (${[...bySite.keys()].map(() => '?').join(',')})`).all(...bySite.keys()) as Array<{ id: number; name: string; region: string }>
    for (const s of regions) {
      const cal = calendarFor(s.region)
      if (!cal.isWorkingDay(o.date)) {
        const why = cal.holidayName(o.date) ?? 'a weekend day'
        throw new Refusal(`${o.date} is not a working day at ${s.name} (${why}); the next one is ${cal.nextWorkingDay(o.date)}.`)
      }
    }
    const insVisit = q.prepare("insert into visits (site_id, kind, scheduled_on, technician_id, status, created_by) values (?, ?, ?, ?, 'planned', ?)")
    const insItem = q.prepare("insert or ignore into visit_detectors (visit_id, detector_id, tasks, result) values (?, ?, ?, 'pending')")
    const tasks = o.kind === 'cleaning' ? 'visual,cleaning' : o.kind === 'inspection' ? 'visual' : 'visual,functional'
    const visitIds: number[] = []
    for (const [siteId, detectorIds] of bySite) {
      const visitId = Number(insVisit.run(siteId, o.kind, o.date, o.technicianId, actorId).lastInsertRowid)
      for (const d of detectorIds) insItem.run(visitId, d, tasks)
      writeAudit(db, { actorId, action: 'visit.schedule', entity: 'visit', entityId: visitId, after: { siteId, date: o.date, kind: o.kind, technicianId: o.technicianId, detectorIds } })
      visitIds.push(visitId)
    }
    return { visits: visitIds.length, detectors: rows.length }
  })
  listsChanged()
  return result
}
