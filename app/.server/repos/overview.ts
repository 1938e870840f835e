import { and, asc, between, count, desc, eq, gt, inArray, isNull, sql } from 'drizzle-orm'
import { addDays, type IsoDate } from '~/domain/dates'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import type { Db } from '../db'
import { customers, detectors, sites, tableCounts, users, visitDetectors, visits } from '../schema'
import { perDb } from './statements'

const overdue = eq(detectors.dueStatus, 'overdue')
const dueSoon = eq(detectors.dueStatus, 'due-soon')
const dueNow = eq(detectors.dueStatus, 'due')
const inTrouble = eq(detectors.state, 'trouble')
const outOfService = eq(detectors.state, 'out-of-service')
const delayDisagrees = eq(detectors.delayAgreement, 'disagree')

const statements = perDb((db: Db) => {
  // Each figure counts along its own index (due, state, delay); one pass with several conditions would read every detector.
  const countOf = (condition: typeof overdue) => db.select({ n: count() }).from(detectors).where(condition).prepare()
  const worst = db
    .select({ customerId: detectors.customerId, overdue: count().as('overdue') })
    .from(detectors)
    .where(overdue)
    .groupBy(detectors.customerId)
    .orderBy(desc(count()))
    .limit(6)
    .as('worst')
  return {
    totals: db.select({ name: tableCounts.name, rows: tableCounts.rows }).from(tableCounts).prepare(),
    overdue: countOf(overdue),
    dueSoon: countOf(dueSoon),
    dueNow: countOf(dueNow),
    inTrouble: countOf(inTrouble),
    outOfService: countOf(outOfService),
    delayDisagrees: countOf(delayDisagrees),
    // Two counts, each along an index alone: one pass counting both read every detector's row (70 ms
    // at 100,000 detectors), the overdue ones through (due status, environment) take a few.
    byEnvironment: db.select({ environment: detectors.environment, detectors: count() }).from(detectors).groupBy(detectors.environment).prepare(),
    overdueByEnvironment: db.select({ environment: detectors.environment, n: count() }).from(detectors).where(overdue).groupBy(detectors.environment).prepare(),
    worstCustomers: db
      .select({
        id: customers.id,
        name: customers.name,
        overdue: worst.overdue,
        detectors: db.$count(detectors, eq(detectors.customerId, customers.id)),
      })
      .from(worst)
      .innerJoin(customers, eq(customers.id, worst.customerId))
      .orderBy(desc(worst.overdue), asc(customers.id))
      .prepare(),
    attention: db
      .select({
        id: detectors.id,
        tag: detectors.tag,
        siteName: sites.name,
        state: detectors.state,
        dueStatus: detectors.dueStatus,
        riskScore: detectors.riskScore,
      })
      .from(detectors)
      .innerJoin(sites, eq(sites.id, detectors.siteId))
      .where(and(gt(detectors.riskScore, 0), isNull(detectors.acknowledgedAt)))
      .orderBy(desc(detectors.riskScore), asc(detectors.id))
      .limit(8)
      .prepare(),
    upcomingVisits: db
      .select({
        id: visits.id,
        scheduledOn: visits.scheduledOn,
        kind: visits.kind,
        status: visits.status,
        siteId: sites.id,
        siteName: sites.name,
        city: sites.city,
        technician: users.name,
        detectors: db.$count(visitDetectors, eq(visitDetectors.visitId, visits.id)),
      })
      .from(visits)
      .innerJoin(sites, eq(sites.id, visits.siteId))
      .leftJoin(users, eq(users.id, visits.technicianId))
      .where(
        and(
          between(visits.scheduledOn, sql.placeholder('from'), sql.placeholder('to')),
          inArray(visits.status, [...OPEN_VISIT_STATUSES]),
        ),
      )
      .orderBy(asc(visits.scheduledOn), asc(visits.id))
      .limit(10)
      .prepare(),
  }
})

/** Fleet-wide figures for the overview. Every query rides an index or the kept row totals. */
export function overviewFigures(db: Db, today: IsoDate) {
  const s = statements(db)
  const totals = new Map(s.totals.all().map((r) => [r.name, r.rows]))
  const total = (table: string) => totals.get(table) ?? 0
  return {
    customers: total('customers'),
    sites: total('sites'),
    units: total('units'),
    detectors: total('detectors'),
    events: total('events'),
    overdue: s.overdue.get()!.n,
    dueSoon: s.dueSoon.get()!.n,
    dueNow: s.dueNow.get()!.n,
    inTrouble: s.inTrouble.get()!.n,
    outOfService: s.outOfService.get()!.n,
    delayDisagrees: s.delayDisagrees.get()!.n,
    byEnvironment: byEnvironment(s.byEnvironment.all(), s.overdueByEnvironment.all()),
    worstCustomers: s.worstCustomers.all(),
    attention: s.attention.all(),
    upcomingVisits: s.upcomingVisits.all({ from: today, to: addDays(today, 14) }),
  }
}

/** Detectors and overdue detectors per environment, most detectors first. */
function byEnvironment(all: Array<{ environment: string; detectors: number }>, overdueRows: Array<{ environment: string; n: number }>) {
  const late = new Map(overdueRows.map((r) => [r.environment, r.n]))
  return all.map((r) => ({ ...r, overdue: late.get(r.environment) ?? 0 })).sort((a, b) => b.detectors - a.detectors || a.environment.localeCompare(b.environment))
}
