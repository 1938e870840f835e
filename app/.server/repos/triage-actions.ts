import { bookVisit } from '../visits/book'
import { VisitRefusal } from '../visits/refusal'
import type { SiteBooking } from '~/domain/visit-forms'
import type { VisitTask } from '~/domain/vocabulary'
import { writeTx, type Db } from '../db'
import { writeAudit } from '../audit'
import { listsChanged } from '../list-query'

/** A triage write refused for a reason the lead can act on; the route answers with its status. */
export class Refusal extends Error {
  constructor(
    message: string,
    readonly status: 400 | 403 | 404 | 409 = 409,
    readonly extra: Record<string, unknown> = {},
  ) {
    super(message)
  }
}

export const BOOKING_KINDS = ['inspection', 'test', 'cleaning', 'repair'] as const
export type BookingKind = (typeof BOOKING_KINDS)[number]

/** The tasks a visit booked from the queue carries on each detector. */
export function tasksFor(kind: BookingKind): VisitTask[] {
  return kind === 'cleaning' ? ['visual', 'cleaning'] : kind === 'inspection' ? ['visual'] : ['visual', 'functional']
}

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
    if (!tech) throw new Refusal(`There is no active technician ${technicianId}; choose one from the list.`, 400)
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
 * day, technician, open visits for the same tasks). Each site takes its own day and technician when
 * given, else the common ones. All or nothing: one refusal books none.
 */
export function scheduleVisits(
  db: Db,
  actorId: number,
  ids: Ids,
  o: { date?: string; kind: BookingKind; technicianId: number | null; sites?: SiteBooking[]; today: string },
) {
  const tasks = tasksFor(o.kind)
  const result = writeTx(db, () => {
    const rows = detectorsById(db, ids)
    const bySite = new Map<number, number[]>()
    for (const r of rows) bySite.set(r.siteId, [...(bySite.get(r.siteId) ?? []), r.id])
    const given = new Map((o.sites ?? []).map((s) => [s.siteId, s]))
    const strangers = [...given.keys()].filter((siteId) => !bySite.has(siteId))
    if (strangers.length) throw new Refusal(`None of the selected detectors is at site ${strangers.join(', ')}.`, 400, { siteIds: strangers })
    const booked: Array<{ visitId: number; siteId: number; scheduledOn: string; technicianId: number | null }> = []
    try {
      for (const [siteId, detectorIds] of bySite) {
        const own = given.get(siteId)
        const scheduledOn = own?.scheduledOn ?? o.date
        if (!scheduledOn) throw new Refusal(`Pick a day for the visit to site ${siteId}.`, 400, { siteIds: [siteId] })
        const technicianId = own ? own.technicianId : o.technicianId
        const { visitId } = bookVisit(db, actorId, { siteId, kind: o.kind, scheduledOn, technicianId, detectors: detectorIds.map((detectorId) => ({ detectorId, tasks })) }, o.today)
        booked.push({ visitId, siteId, scheduledOn, technicianId })
      }
    } catch (error) {
      if (error instanceof VisitRefusal) throw new Refusal(error.message, error.status, error.extra)
      throw error
    }
    return { visits: bySite.size, detectors: rows.length, booked }
  })
  listsChanged()
  return result
}
