import { and, asc, count, desc, eq, inArray, isNotNull, max, sql } from 'drizzle-orm'
import { addDays, weekday } from '~/domain/dates'
import { OPEN_VISIT_STATUSES, type VisitTask } from '~/domain/vocabulary'
import { loadCompanyCalendar, type CompanyCalendar } from '../bulk/calendar'
import type { Db } from '../db'
import { detectors, sites, users, visitDetectors, visits } from '../schema'
import { byTag, perDb } from './statements'
import { Refusal, tasksFor, type BookingKind } from './triage-actions'

// "Usual" is read over this many of the site's latest finished visits: recent enough to follow a
// change of round, long enough that one sick day does not decide it.
const RECENT_VISITS = 10
// Public holidays are sent for this many days ahead, so the form can warn before the server refuses.
const HOLIDAY_HORIZON_DAYS = 120

interface UsualTechnician {
  id: number
  name: string
  /** Of the site's latest finished visits (`of`), how many this technician did. */
  visits: number
  of: number
}

interface OpenVisit {
  visitId: number
  detectorId: number
  tag: string
  scheduledOn: string
  status: string
  kind: string
  tasks: VisitTask[]
  technician: string | null
  /** It already holds one of the tasks this booking would add: booking it again is refused. */
  sameWork: boolean
}

export interface SitePlan {
  siteId: number
  site: string
  city: string
  region: string
  detectors: Array<{ id: number; tag: string }>
  usual: UsualTechnician | null
  suggestedDay: string
  /** Working days the suggestion stepped over, other than weekends. */
  skipped: Array<{ date: string; holiday: string }>
  /** The region's public holidays in the coming months. */
  holidays: Record<string, string>
  openVisits: OpenVisit[]
}

export interface BookingPlan {
  kind: BookingKind
  today: string
  technicians: Array<{ id: number; name: string }>
  sites: SitePlan[]
}

const statements = perDb((db) => {
  const recent = db
    .select({ technicianId: visits.technicianId, on: visits.scheduledOn })
    .from(visits)
    .where(and(eq(visits.siteId, sql.placeholder('siteId')), eq(visits.status, 'done'), isNotNull(visits.technicianId)))
    .orderBy(desc(visits.scheduledOn), desc(visits.id))
    .limit(RECENT_VISITS)
    .as('recent')
  // Only someone who can still be booked is suggested; the window total is every recent visit.
  const eligible = sql<number>`(${users.role} = 'technician' and ${users.active} = 1)`.mapWith(Number)
  return {
    usual: db
      .select({ id: users.id, name: users.name, eligible, visits: count(), last: max(recent.on), of: sql<number>`sum(count(*)) over ()`.mapWith(Number) })
      .from(recent)
      .innerJoin(users, eq(users.id, recent.technicianId))
      .groupBy(users.id)
      .orderBy(desc(eligible), desc(count()), desc(max(recent.on)))
      .limit(1)
      .prepare(),
    technicians: db
      .select({ id: users.id, name: users.name })
      .from(users)
      .where(and(eq(users.role, 'technician'), eq(users.active, true)))
      .orderBy(asc(users.name))
      .prepare(),
  }
})

/** The technician who did most of the site's latest finished visits, while still an active technician. */
function usualTechnician(db: Db, siteId: number): UsualTechnician | null {
  const row = statements(db).usual.get({ siteId })
  return row && row.eligible ? { id: row.id, name: row.name, visits: row.visits, of: row.of } : null
}

/**
 * `usualTechnician` for many sites in one statement (a site with no eligible one is left out): the
 * same window of each site's latest finished visits, ranked the same way.
 */
export function usualTechnicians(db: Db, siteIds: readonly number[]): Map<number, UsualTechnician> {
  const out = new Map<number, UsualTechnician>()
  for (let i = 0; i < siteIds.length; i += 5_000) {
    const chunk = siteIds.slice(i, i + 5_000)
    // Raw SQL: window functions number each site's visits and rank its technicians in one pass.
    const rows = db.$client
      .prepare(
        `with recent as (
           select v.site_id as siteId, v.technician_id as technicianId, v.scheduled_on as "on",
                  row_number() over (partition by v.site_id order by v.scheduled_on desc, v.id desc) as n
             from visits v
            where v.site_id in (${chunk.map(() => '?').join(',')}) and v.status = 'done' and v.technician_id is not null
         ), tally as (
           select siteId, technicianId, count(*) as visits, max("on") as last, sum(count(*)) over (partition by siteId) as "of"
             from recent where n <= ${RECENT_VISITS} group by siteId, technicianId
         ), ranked as (
           select t.siteId, u.id, u.name, t.visits, t."of", (u.role = 'technician' and u.active = 1) as eligible,
                  row_number() over (partition by t.siteId order by (u.role = 'technician' and u.active = 1) desc, t.visits desc, t.last desc) as pick
             from tally t join users u on u.id = t.technicianId
         )
         select siteId, id, name, visits, "of" from ranked where pick = 1 and eligible`,
      )
      .all(...chunk) as Array<UsualTechnician & { siteId: number }>
    for (const { siteId, ...usual } of rows) out.set(siteId, usual)
  }
  return out
}

/** The company's first working day after `today` in a region, and the days off stepped over to reach it. */
export function suggestedDay(company: CompanyCalendar, region: string, today: string): { day: string; skipped: Array<{ date: string; holiday: string }> } {
  const day = company.forRegion(region).nextWorkingDay(addDays(today, 1))
  const skipped: Array<{ date: string; holiday: string }> = []
  for (let d = addDays(today, 1); d < day; d = addDays(d, 1)) {
    const why = company.dayOff(region, d)
    if (why && weekday(d) !== 0 && weekday(d) !== 6) skipped.push({ date: d, holiday: why })
  }
  return { day, skipped }
}

/** The company's weekday days off ahead in a region (observed holidays, closed days), by date. */
function holidaysAhead(company: CompanyCalendar, region: string, today: string): Record<string, string> {
  const out: Record<string, string> = {}
  for (let i = 0; i <= HOLIDAY_HORIZON_DAYS; i++) {
    const d = addDays(today, i)
    const why = weekday(d) === 0 || weekday(d) === 6 ? null : company.dayOff(region, d)
    if (why) out[d] = why
  }
  return out
}

/**
 * What booking the selected detectors would make: one visit per site, each with its usual
 * technician and next working day suggested, and any open visit the detectors are already on.
 */
export function bookingPlan(db: Db, ids: number[], kind: BookingKind, today: string): BookingPlan {
  const rows = db
    .select({ id: detectors.id, tag: detectors.tag, siteId: sites.id, site: sites.name, city: sites.city, region: sites.region })
    .from(detectors)
    .innerJoin(sites, eq(sites.id, detectors.siteId))
    .where(inArray(detectors.id, ids))
    .all()
  if (rows.length !== ids.length) throw new Refusal(`${ids.length - rows.length} of the selected detectors no longer exist; reload and try again.`, 404)
  const wanted = new Set(tasksFor(kind))
  const tags = new Map(rows.map((r) => [r.id, r.tag]))
  const open = db
    .select({ detectorId: visitDetectors.detectorId, visitId: visits.id, scheduledOn: visits.scheduledOn, status: visits.status, kind: visits.kind, tasks: visitDetectors.tasks, technician: users.name })
    .from(visitDetectors)
    .innerJoin(visits, eq(visits.id, visitDetectors.visitId))
    .leftJoin(users, eq(users.id, visits.technicianId))
    .where(and(inArray(visitDetectors.detectorId, ids), inArray(visits.status, OPEN_VISIT_STATUSES)))
    .orderBy(asc(visits.scheduledOn), asc(visits.id))
    .all()
    .map((o): OpenVisit => {
      const tasks = o.tasks.split(',') as VisitTask[]
      return { ...o, tag: tags.get(o.detectorId) ?? '', tasks, sameWork: tasks.some((t) => wanted.has(t)) }
    })

  // Sites share a handful of regions: each region's calendar is read once.
  const company = loadCompanyCalendar(db)
  const calendars = new Map<string, { day: string; skipped: SitePlan['skipped']; holidays: SitePlan['holidays'] }>()
  const calendarOf = (region: string) => {
    let c = calendars.get(region)
    if (!c) calendars.set(region, (c = { ...suggestedDay(company, region, today), holidays: holidaysAhead(company, region, today) }))
    return c
  }
  const bySite = new Map<number, SitePlan>()
  for (const r of rows) {
    let plan = bySite.get(r.siteId)
    if (!plan) {
      const { day, skipped, holidays } = calendarOf(r.region)
      plan = { siteId: r.siteId, site: r.site, city: r.city, region: r.region, detectors: [], usual: usualTechnician(db, r.siteId), suggestedDay: day, skipped, holidays, openVisits: [] }
      bySite.set(r.siteId, plan)
    }
    plan.detectors.push({ id: r.id, tag: r.tag })
  }
  const siteOf = new Map(rows.map((r) => [r.id, r.siteId]))
  for (const o of open) bySite.get(siteOf.get(o.detectorId)!)?.openVisits.push(o)
  const plans = [...bySite.values()].sort((a, b) => byTag.compare(a.site, b.site))
  for (const p of plans) p.detectors.sort((a, b) => byTag.compare(a.tag, b.tag))
  return { kind, today, technicians: statements(db).technicians.all(), sites: plans }
}
