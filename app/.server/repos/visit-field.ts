// What the visit screens need beyond `visitRecord`: each detector's recorded loop, unit input style and
// listing (for the live checks on the phone form), the site's delay policy, and a technician's visits
// for a run of days. Read-only; the writes go through `POST /api/visits/:visitId`.
import { and, asc, between, eq, inArray, sql } from 'drizzle-orm'
import type { Db } from '../db'
import { arrangementColumns, arrangementOf } from '../derivation'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import { detectorModels, detectors, monitoringCompanies, sites, units, users, visitDetectors, visits } from '../schema'
import { perDb } from './statements'

const id = sql.placeholder('id')
const MY_DAY_CAP = 200

const statements = perDb((db: Db) => ({
  visit: db
    .select({ delayPolicySeconds: sites.delayPolicySeconds, postalCode: sites.postalCode })
    .from(visits)
    .innerJoin(sites, eq(sites.id, visits.siteId))
    .where(eq(visits.id, id))
    .prepare(),
  detectors: db
    .select({
      id: detectors.id,
      ...arrangementColumns,
      shutdownInput: units.shutdownInput,
      testStation: detectors.testStation,
      headsFitted: detectors.headsFitted,
      delaySeconds: detectors.delaySeconds,
      velocityMinFpm: detectors.velocityMinFpm,
      velocityMaxFpm: detectors.velocityMaxFpm,
      pressureMinInWc: detectors.pressureMinInWc,
      pressureMaxInWc: detectors.pressureMaxInWc,
    })
    .from(visitDetectors)
    .innerJoin(detectors, eq(detectors.id, visitDetectors.detectorId))
    .innerJoin(detectorModels, eq(detectorModels.id, detectors.modelId))
    .innerJoin(units, eq(units.id, detectors.unitId))
    .where(eq(visitDetectors.visitId, id))
    .prepare(),
}))

/** The visit-page extras, keyed so the page can join them onto `visitRecord`'s detectors. */
export function visitFieldData(db: Db, visitId: number) {
  const s = statements(db)
  const at = { id: visitId }
  const head = s.visit.get(at)
  if (!head) return null
  const detectorRows = s.detectors.all(at).map((d) => ({
    id: d.id,
    arrangement: arrangementOf(d),
    shutdownInput: d.shutdownInput,
    testStation: d.testStation,
    headsFitted: d.headsFitted,
    delaySeconds: d.delaySeconds,
    velocity: { min: d.velocityMinFpm, max: d.velocityMaxFpm },
    pressure: { min: d.pressureMinInWc, max: d.pressureMaxInWc },
  }))
  return {
    ...head,
    detectors: Object.fromEntries(detectorRows.map((d) => [d.id, d])),
  }
}

/**
 * A technician's visits from `from` to `to` (inclusive), soonest first, each with its site, access
 * notes, monitoring company and the detectors' tasks: what /my-day lists.
 */
export function technicianVisits(db: Db, technicianId: number, from: string, to: string) {
  const rows = db
    .select({
      id: visits.id,
      kind: visits.kind,
      status: visits.status,
      scheduledOn: visits.scheduledOn,
      windowFrom: visits.windowFrom,
      windowUntil: visits.windowUntil,
      notes: visits.notes,
      site: { id: sites.id, name: sites.name, street: sites.street, city: sites.city, postalCode: sites.postalCode, accessNotes: sites.accessNotes, monitoringAccount: sites.monitoringAccount },
      monitoring: { name: monitoringCompanies.name, phone: monitoringCompanies.phone, email: monitoringCompanies.email, notifyMethod: monitoringCompanies.notifyMethod, notifyLeadMinutes: monitoringCompanies.notifyLeadMinutes },
    })
    .from(visits)
    .innerJoin(sites, eq(sites.id, visits.siteId))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .where(and(eq(visits.technicianId, technicianId), between(visits.scheduledOn, from, to), inArray(visits.status, ['planned', 'notified', 'in-progress', 'done'])))
    .orderBy(asc(visits.scheduledOn), asc(visits.windowFrom), asc(visits.id))
    .limit(MY_DAY_CAP)
    .all()
  if (rows.length === 0) return []
  const tasks = db
    .select({ visitId: visitDetectors.visitId, tasks: visitDetectors.tasks })
    .from(visitDetectors)
    .where(inArray(visitDetectors.visitId, rows.map((r) => r.id)))
    .all()
  const byVisit = new Map<number, { detectors: number; tasks: Map<string, number> }>()
  for (const t of tasks) {
    const v = byVisit.get(t.visitId) ?? { detectors: 0, tasks: new Map<string, number>() }
    v.detectors += 1
    for (const task of t.tasks.split(',').filter(Boolean)) v.tasks.set(task, (v.tasks.get(task) ?? 0) + 1)
    byVisit.set(t.visitId, v)
  }
  return rows.map((r) => {
    const v = byVisit.get(r.id)
    return { ...r, detectors: v?.detectors ?? 0, tasks: [...(v?.tasks ?? new Map<string, number>())].map(([task, n]) => ({ task, n })) }
  })
}

/** The visits still open for a detector (planned, notified or under way), soonest first: its page lists them. */
export function openVisitsOfDetector(db: Db, detectorId: number) {
  return db
    .select({ id: visits.id, kind: visits.kind, status: visits.status, scheduledOn: visits.scheduledOn, tasks: visitDetectors.tasks, technician: users.name })
    .from(visitDetectors)
    .innerJoin(visits, eq(visits.id, visitDetectors.visitId))
    .leftJoin(users, eq(users.id, visits.technicianId))
    .where(and(eq(visitDetectors.detectorId, detectorId), inArray(visits.status, OPEN_VISIT_STATUSES)))
    .orderBy(asc(visits.scheduledOn), asc(visits.id))
    .limit(20)
    .all()
    .map((v) => ({ ...v, tasks: v.tasks.split(',').filter(Boolean) }))
}
