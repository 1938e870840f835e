import { and, asc, count, desc, eq, gte, inArray, sql, type SQLWrapper } from 'drizzle-orm'
import { daysBetween, type IsoDate } from '~/domain/dates'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import type { Db } from '../db'
import { customers, detectors, sites, units, visits } from '../schema'
import { countWhere, perDb } from './statements'

// A customer can hold over a thousand sites and several thousand detectors, so both lists are capped
// and every query starts from the customer's own index (detectors_customer_idx, sites_customer_idx).
const SITES_CAP = 200
const DUE_WORK_CAP = 25

const id = sql.placeholder('id')
const today = sql.placeholder('today')

// One condition per figure: the totals count with it and the lists under them filter with it.
const overdue = eq(detectors.dueStatus, 'overdue')
const dueSoon = eq(detectors.dueStatus, 'due-soon')
const inTrouble = eq(detectors.state, 'trouble')
const outOfService = eq(detectors.state, 'out-of-service')
const delayDisagrees = eq(detectors.delayAgreement, 'disagree')

const statements = perDb((db: Db) => {
  const perSite = db
    .select({
      siteId: detectors.siteId,
      detectors: count().as('detectors'),
      overdue: countWhere(overdue).as('overdue'),
      inTrouble: countWhere(inTrouble).as('in_trouble'),
    })
    .from(detectors)
    .where(eq(detectors.customerId, id))
    .groupBy(detectors.siteId)
    .as('per_site')
  // A site with no detectors has no row in perSite; the builder has no coalesce.
  const orZero = (column: SQLWrapper) => sql<number>`coalesce(${column}, 0)`.mapWith(Number)
  const siteOverdue = orZero(perSite.overdue)
  const siteInTrouble = orZero(perSite.inTrouble)
  return {
    customer: db
      .select({
        id: customers.id,
        name: customers.name,
        kind: customers.kind,
        contactName: customers.contactName,
        contactEmail: customers.contactEmail,
        contactPhone: customers.contactPhone,
        createdAt: customers.createdAt,
      })
      .from(customers)
      .where(eq(customers.id, id))
      .prepare(),
    detectorTotals: db
      .select({
        detectors: count(),
        overdue: countWhere(overdue),
        dueSoon: countWhere(dueSoon),
        inTrouble: countWhere(inTrouble),
        outOfService: countWhere(outOfService),
        delayDisagrees: countWhere(delayDisagrees),
      })
      .from(detectors)
      .where(eq(detectors.customerId, id))
      .prepare(),
    siteCount: db.select({ n: count() }).from(sites).where(eq(sites.customerId, id)).prepare(),
    unitCount: db
      .select({ n: count() })
      .from(units)
      .innerJoin(sites, eq(sites.id, units.siteId))
      .where(eq(sites.customerId, id))
      .prepare(),
    dueWork: db
      .select({
        id: detectors.id,
        tag: detectors.tag,
        position: detectors.position,
        state: detectors.state,
        nextDueOn: detectors.nextDueOn,
        risk: detectors.riskScore,
        siteId: sites.id,
        site: sites.name,
        unitId: units.id,
        unit: units.tag,
      })
      .from(detectors)
      .innerJoin(sites, eq(sites.id, detectors.siteId))
      .innerJoin(units, eq(units.id, detectors.unitId))
      .where(and(eq(detectors.customerId, id), overdue))
      .orderBy(asc(detectors.nextDueOn), desc(detectors.riskScore), asc(detectors.id))
      .limit(DUE_WORK_CAP)
      .prepare(),
    sites: db
      .select({
        id: sites.id,
        name: sites.name,
        city: sites.city,
        detectors: orZero(perSite.detectors),
        overdue: siteOverdue,
        inTrouble: siteInTrouble,
      })
      .from(sites)
      .leftJoin(perSite, eq(perSite.siteId, sites.id))
      .where(eq(sites.customerId, id))
      .orderBy(desc(siteOverdue), desc(siteInTrouble), asc(sites.name), asc(sites.id))
      .limit(SITES_CAP)
      .prepare(),
    // Visits still to come at any of the customer's sites, soonest first per site (visits_site_idx).
    upcomingVisits: db
      .select({ siteId: visits.siteId, scheduledOn: visits.scheduledOn, kind: visits.kind })
      .from(visits)
      .innerJoin(sites, eq(sites.id, visits.siteId))
      .where(and(eq(sites.customerId, id), gte(visits.scheduledOn, today), inArray(visits.status, [...OPEN_VISIT_STATUSES])))
      .orderBy(asc(visits.siteId), asc(visits.scheduledOn), asc(visits.id))
      .prepare(),
  }
})

/**
 * A customer as its page and `/api/customers/:id` show it: the record, the totals over its
 * detectors, its most overdue detectors and its sites (worst first), each capped list with its total.
 */
export function customerRecord(db: Db, customerId: number, day: IsoDate) {
  const s = statements(db)
  const customer = s.customer.get({ id: customerId })
  if (!customer) return null
  const byDetector = s.detectorTotals.get({ id: customerId })!
  const totals = {
    sites: s.siteCount.get({ id: customerId })!.n,
    units: s.unitCount.get({ id: customerId })!.n,
    ...byDetector,
  }
  const nextVisit = new Map<number, { scheduledOn: string; kind: string }>()
  for (const v of s.upcomingVisits.all({ id: customerId, today: day })) if (!nextVisit.has(v.siteId)) nextVisit.set(v.siteId, v)

  return {
    customer,
    today: day,
    totals,
    dueWork: {
      rows: s.dueWork.all({ id: customerId }).map((d) => ({
        ...d,
        daysOverdue: d.nextDueOn ? Math.max(0, daysBetween(d.nextDueOn, day)) : null,
      })),
      total: totals.overdue,
    },
    sites: {
      rows: s.sites.all({ id: customerId }).map((row) => ({
        ...row,
        nextVisitOn: nextVisit.get(row.id)?.scheduledOn ?? null,
        nextVisitKind: nextVisit.get(row.id)?.kind ?? null,
      })),
      total: totals.sites,
    },
  }
}
