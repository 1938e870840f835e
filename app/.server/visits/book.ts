import type { NewVisit } from '~/domain/visit-forms'
import { OPEN_VISIT_STATUSES, type VisitTask } from '~/domain/vocabulary'
import { writeAudit } from '../audit'
import { loadCompanyCalendar } from '../bulk/calendar'
import { writeTx, type Db } from '../db'
import { listsChanged } from '../list-query'
import { VisitRefusal } from './refusal'

export interface Conflict {
  detectorId: number
  visitId: number
  task: VisitTask
}

const placeholders = (n: number) => Array.from({ length: n }, () => '?').join(',')

/** Refuses a window that ends before it starts; both ends are 'HH:MM' in the site's time zone. */
export function checkWindow(from: string | undefined, until: string | undefined) {
  if (from && until && until <= from) throw new VisitRefusal(400, `The window ends (${until}) before it starts (${from}).`)
}

/** Refuses a day the company does not work at the site: weekends, observed holidays, closed days. */
export function checkWorkingDay(db: Db, site: { name: string; region: string }, date: string) {
  const company = loadCompanyCalendar(db)
  const why = company.dayOff(site.region, date)
  if (why !== null) {
    throw new VisitRefusal(400, `${date} is not a working day at ${site.name} (${why}); the next one is ${company.forRegion(site.region).nextWorkingDay(date)}.`)
  }
}

export function checkTechnician(db: Db, technicianId: number | null | undefined) {
  if (technicianId == null) return
  if (!db.$client.prepare("select 1 from users where id = ? and role = 'technician' and active = 1").get(technicianId)) {
    throw new VisitRefusal(400, 'Choose an active technician, or leave the visit unassigned.')
  }
}

/**
 * Books a visit at a site for some of its detectors, each with the tasks to do. One transaction: a
 * detector that already has an open visit for one of the same tasks refuses the whole booking (409,
 * the conflicts listed), so nobody is sent twice for the same work.
 */
export function bookVisit(db: Db, actorId: number, input: NewVisit, today: string): { visitId: number } {
  if (input.scheduledOn < today) throw new VisitRefusal(400, 'Pick today or a later date.')
  checkWindow(input.windowFrom, input.windowUntil)
  // The same detector named twice: one row with every task asked for.
  const wanted = new Map<number, Set<VisitTask>>()
  for (const d of input.detectors) wanted.set(d.detectorId, new Set([...(wanted.get(d.detectorId) ?? []), ...d.tasks]))
  const ids = [...wanted.keys()]
  const q = db.$client
  const visitId = writeTx(db, () => {
    const site = q.prepare('select id, name, region from sites where id = ?').get(input.siteId) as { id: number; name: string; region: string } | undefined
    if (!site) throw new VisitRefusal(400, `There is no site ${input.siteId}.`)
    const found = q.prepare(`select id, site_id as siteId from detectors where id in (${placeholders(ids.length)})`).all(...ids) as Array<{ id: number; siteId: number }>
    const atSite = new Set(found.filter((d) => d.siteId === site.id).map((d) => d.id))
    const strangers = ids.filter((id) => !atSite.has(id))
    if (strangers.length) {
      throw new VisitRefusal(400, `Not detectors at ${site.name}: ${strangers.join(', ')}. Book each site's detectors on its own visit.`, { detectorIds: strangers })
    }
    checkWorkingDay(db, site, input.scheduledOn)
    checkTechnician(db, input.technicianId)

    const open = q
      .prepare(
        `select vd.detector_id as detectorId, vd.visit_id as visitId, vd.tasks from visit_detectors vd join visits v on v.id = vd.visit_id
         where vd.detector_id in (${placeholders(ids.length)}) and v.status in (${placeholders(OPEN_VISIT_STATUSES.length)})
         order by vd.detector_id, vd.visit_id`,
      )
      .all(...ids, ...OPEN_VISIT_STATUSES) as Array<{ detectorId: number; visitId: number; tasks: string }>
    const conflicts: Conflict[] = []
    for (const o of open) {
      for (const task of o.tasks.split(',')) {
        if (wanted.get(o.detectorId)?.has(task as VisitTask)) conflicts.push({ detectorId: o.detectorId, visitId: o.visitId, task: task as VisitTask })
      }
    }
    if (conflicts.length) {
      const visitsNamed = [...new Set(conflicts.map((c) => c.visitId))].join(', ')
      throw new VisitRefusal(409, `Already booked: ${conflicts.length} task${conflicts.length === 1 ? '' : 's'} on open visit${visitsNamed.includes(',') ? 's' : ''} ${visitsNamed}. Change that visit, or leave those tasks out.`, { conflicts })
    }

    const id = Number(
      q
        .prepare("insert into visits (site_id, kind, scheduled_on, window_from, window_until, technician_id, status, notes, created_by) values (?, ?, ?, ?, ?, ?, 'planned', ?, ?)")
        .run(site.id, input.kind, input.scheduledOn, input.windowFrom ?? null, input.windowUntil ?? null, input.technicianId ?? null, input.notes || null, actorId).lastInsertRowid,
    )
    const insert = q.prepare("insert into visit_detectors (visit_id, detector_id, tasks, result) values (?, ?, ?, 'pending')")
    for (const [detectorId, tasks] of wanted) insert.run(id, detectorId, [...tasks].join(','))
    writeAudit(db, {
      actorId,
      action: 'visit.book',
      entity: 'visit',
      entityId: id,
      after: { siteId: site.id, kind: input.kind, scheduledOn: input.scheduledOn, window: [input.windowFrom ?? null, input.windowUntil ?? null], technicianId: input.technicianId ?? null, detectors: [...wanted].map(([d, t]) => ({ detectorId: d, tasks: [...t] })) },
    })
    return id
  })
  listsChanged()
  return { visitId }
}
