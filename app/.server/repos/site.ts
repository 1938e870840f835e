import { noticeColumns } from './notice-columns'
import { and, asc, count, desc, eq, gte, inArray, sql } from 'drizzle-orm'
import type { IsoDate } from '~/domain/dates'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import type { Db } from '../db'
import { customers, detectors, events, monitoringCompanies, notifications, sites, units, users, visitDetectors, visits } from '../schema'
import { byTag, perDb } from './statements'

// Related rows are capped so one unusually large site cannot turn into a huge page; each list comes
// with its total, counted with the same filter, so the page can say "showing 20 of N".
const UNITS_CAP = 200
const DETECTORS_CAP = 500
const VISITS_CAP = 20
const NOTIFICATIONS_CAP = 20
const EVENTS_CAP = 50

const id = sql.placeholder('id')
const today = sql.placeholder('today')

// One filter per list: its rows and its total are read with the same condition.
const unitsOfSite = eq(units.siteId, id)
const detectorsOfSite = eq(detectors.siteId, id)
const visitsToCome = and(eq(visits.siteId, id), gte(visits.scheduledOn, today), inArray(visits.status, [...OPEN_VISIT_STATUSES]))
const notificationsOfSite = eq(notifications.siteId, id)
const eventsOfSite = eq(events.siteId, id)

const statements = perDb((db: Db) => ({
  site: db
    .select({
      site: {
        id: sites.id,
        name: sites.name,
        street: sites.street,
        city: sites.city,
        region: sites.region,
        postalCode: sites.postalCode,
        timeZone: sites.timeZone,
        jurisdiction: sites.jurisdiction,
        ahjName: sites.ahjName,
        ahjContact: sites.ahjContact,
        codeBasis: sites.codeBasis,
        monitoringAccount: sites.monitoringAccount,
        delayPolicySeconds: sites.delayPolicySeconds,
        keepsNuisanceRecords: sites.keepsNuisanceRecords,
        accessNotes: sites.accessNotes,
      },
      customer: { id: customers.id, name: customers.name, kind: customers.kind },
      monitoring: {
        id: monitoringCompanies.id,
        name: monitoringCompanies.name,
        phone: monitoringCompanies.phone,
        email: monitoringCompanies.email,
        notifyMethod: monitoringCompanies.notifyMethod,
        notifyLeadMinutes: monitoringCompanies.notifyLeadMinutes,
        hours: monitoringCompanies.hours,
        notes: monitoringCompanies.notes,
      },
    })
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .where(eq(sites.id, id))
    .prepare(),
  units: db
    .select({
      id: units.id,
      tag: units.tag,
      kind: units.kind,
      location: units.location,
      shutdownInput: units.shutdownInput,
      supplyCfm: units.supplyCfm,
      returnCfm: units.returnCfm,
      detectors: db.$count(detectors, eq(detectors.unitId, units.id)),
    })
    .from(units)
    .where(unitsOfSite)
    .orderBy(asc(units.tag), asc(units.id))
    .limit(UNITS_CAP)
    .prepare(),
  unitCount: db.select({ n: count() }).from(units).where(unitsOfSite).prepare(),
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
    })
    .from(detectors)
    .innerJoin(units, eq(units.id, detectors.unitId))
    .where(detectorsOfSite)
    .orderBy(asc(detectors.tag), asc(detectors.id))
    .limit(DETECTORS_CAP)
    .prepare(),
  detectorCount: db.select({ n: count() }).from(detectors).where(detectorsOfSite).prepare(),
  visits: db
    .select({
      id: visits.id,
      scheduledOn: visits.scheduledOn,
      kind: visits.kind,
      status: visits.status,
      technicianId: visits.technicianId,
      technician: users.name,
      detectors: db.$count(visitDetectors, eq(visitDetectors.visitId, visits.id)),
    })
    .from(visits)
    .leftJoin(users, eq(users.id, visits.technicianId))
    .where(visitsToCome)
    .orderBy(asc(visits.scheduledOn), asc(visits.id))
    .limit(VISITS_CAP)
    .prepare(),
  visitCount: db.select({ n: count() }).from(visits).where(visitsToCome).prepare(),
  notifications: db
    .select({
      visitId: notifications.visitId,
      ...noticeColumns,
      notifiedBy: users.name,
      monitoring: monitoringCompanies.name,
    })
    .from(notifications)
    .leftJoin(users, eq(users.id, notifications.notifiedBy))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, notifications.monitoringCompanyId))
    .where(notificationsOfSite)
    .orderBy(desc(notifications.notifiedAt), desc(notifications.id))
    .limit(NOTIFICATIONS_CAP)
    .prepare(),
  notificationCount: db.select({ n: count() }).from(notifications).where(notificationsOfSite).prepare(),
  // The site's latest events, newest first, read backwards along events_site_idx.
  events: db
    .select({
      id: events.id,
      occurredAt: events.occurredAt,
      kind: events.kind,
      detail: events.detail,
      by: users.name,
      detectorId: events.detectorId,
      detectorTag: detectors.tag,
    })
    .from(events)
    .leftJoin(users, eq(users.id, events.userId))
    .leftJoin(detectors, eq(detectors.id, events.detectorId))
    .where(eventsOfSite)
    .orderBy(desc(events.occurredAt), desc(events.id))
    .limit(EVENTS_CAP)
    .prepare(),
  eventCount: db.select({ n: count() }).from(events).where(eventsOfSite).prepare(),
}))

/**
 * A site as its page and `/api/sites/:id` show it: the record with its customer and monitoring
 * company, then its units, detectors, visits to come, notification history and event timeline, each
 * a capped list with its total. Units and detectors read in natural tag order.
 */
export function siteRecord(db: Db, siteId: number, day: IsoDate) {
  const s = statements(db)
  const head = s.site.get({ id: siteId })
  if (!head) return null
  const at = { id: siteId }
  return {
    ...head,
    today: day,
    units: { rows: s.units.all(at).sort((a, b) => byTag.compare(a.tag, b.tag)), total: s.unitCount.get(at)!.n },
    detectors: { rows: s.detectors.all(at).sort((a, b) => byTag.compare(a.tag, b.tag)), total: s.detectorCount.get(at)!.n },
    upcomingVisits: { rows: s.visits.all({ id: siteId, today: day }), total: s.visitCount.get({ id: siteId, today: day })!.n },
    notifications: { rows: s.notifications.all(at), total: s.notificationCount.get(at)!.n },
    events: { rows: s.events.all(at), total: s.eventCount.get(at)!.n },
  }
}
