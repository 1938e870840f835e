import { asc, count, eq, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import type { Db } from '../db'
import { customers, detectors, monitoringCompanies, notifications, sites, units, users, visitDetectors, visits } from '../schema'
import { perDb } from './statements'

const DETECTORS_CAP = 500
const NOTIFICATIONS_CAP = 50

const id = sql.placeholder('id')
const detectorsOfVisit = eq(visitDetectors.visitId, id)
const notificationsOfVisit = eq(notifications.visitId, id)

const technician = alias(users, 'technician')
const creator = alias(users, 'creator')

const statements = perDb((db: Db) => ({
  visit: db
    .select({
      visit: {
        id: visits.id,
        kind: visits.kind,
        scheduledOn: visits.scheduledOn,
        status: visits.status,
        notes: visits.notes,
        version: visits.version,
        createdAt: visits.createdAt,
        createdBy: creator.name,
      },
      site: {
        id: sites.id,
        name: sites.name,
        street: sites.street,
        city: sites.city,
        region: sites.region,
        timeZone: sites.timeZone,
        accessNotes: sites.accessNotes,
        monitoringAccount: sites.monitoringAccount,
      },
      customer: { id: customers.id, name: customers.name },
      monitoring: {
        name: monitoringCompanies.name,
        phone: monitoringCompanies.phone,
        notifyMethod: monitoringCompanies.notifyMethod,
        notifyLeadMinutes: monitoringCompanies.notifyLeadMinutes,
      },
      technician: { id: technician.id, name: technician.name, email: technician.email },
    })
    .from(visits)
    .innerJoin(sites, eq(sites.id, visits.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .leftJoin(technician, eq(technician.id, visits.technicianId))
    .leftJoin(creator, eq(creator.id, visits.createdBy))
    .where(eq(visits.id, id))
    .prepare(),
  detectors: db
    .select({
      id: detectors.id,
      tag: detectors.tag,
      unitId: detectors.unitId,
      unit: units.tag,
      position: detectors.position,
      state: detectors.state,
      due: detectors.dueStatus,
      nextDueOn: detectors.nextDueOn,
      risk: detectors.riskScore,
      tasks: visitDetectors.tasks,
      result: visitDetectors.result,
      notes: visitDetectors.notes,
      completedAt: visitDetectors.completedAt,
    })
    .from(visitDetectors)
    .innerJoin(detectors, eq(detectors.id, visitDetectors.detectorId))
    .innerJoin(units, eq(units.id, detectors.unitId))
    .where(detectorsOfVisit)
    .orderBy(asc(detectors.tag), asc(detectors.id))
    .limit(DETECTORS_CAP)
    .prepare(),
  detectorCount: db.select({ n: count() }).from(visitDetectors).where(detectorsOfVisit).prepare(),
  notifications: db
    .select({
      id: notifications.id,
      notifiedAt: notifications.notifiedAt,
      notifiedBy: users.name,
      method: notifications.method,
      spokeWith: notifications.spokeWith,
      confirmation: notifications.confirmation,
      inTestFrom: notifications.inTestFrom,
      inTestUntil: notifications.inTestUntil,
      siteContactTold: notifications.siteContactTold,
      clearedAt: notifications.clearedAt,
    })
    .from(notifications)
    .leftJoin(users, eq(users.id, notifications.notifiedBy))
    .where(notificationsOfVisit)
    .orderBy(asc(notifications.notifiedAt), asc(notifications.id))
    .limit(NOTIFICATIONS_CAP)
    .prepare(),
  notificationCount: db.select({ n: count() }).from(notifications).where(notificationsOfVisit).prepare(),
}))

/**
 * A visit as `/api/visits/:id` shows it: the visit, its site, customer and monitoring company, the
 * technician, the detectors on it with their tasks, and the notices given for it.
 */
export function visitRecord(db: Db, visitId: number) {
  const s = statements(db)
  const head = s.visit.get({ id: visitId })
  if (!head) return null
  const at = { id: visitId }
  return {
    ...head,
    detectors: {
      rows: s.detectors.all(at).map((d) => ({ ...d, tasks: d.tasks.split(',').filter(Boolean) })),
      total: s.detectorCount.get(at)!.n,
    },
    notifications: { rows: s.notifications.all(at), total: s.notificationCount.get(at)!.n },
  }
}
