import { addDays, type IsoDate } from '~/domain/dates'
import type { Db } from '../db'

export interface OverviewFigures {
  customers: number
  sites: number
  units: number
  detectors: number
  events: number
  overdue: number
  dueSoon: number
  inTrouble: number
  outOfService: number
  delayDisagrees: number
  byEnvironment: Array<{ environment: string; detectors: number; overdue: number }>
  worstCustomers: Array<{ id: number; name: string; overdue: number; detectors: number }>
  attention: Array<{ id: number; tag: string; siteName: string; state: string; dueStatus: string; riskScore: number }>
  upcomingVisits: Array<{
    id: number
    scheduledOn: string
    kind: string
    status: string
    siteId: number
    siteName: string
    city: string
    technician: string | null
    detectors: number
  }>
}

/** Fleet-wide figures for the overview. Every query rides an index or the kept row totals. */
export function overviewFigures(db: Db, today: IsoDate): OverviewFigures {
  const q = db.$client
  const totals = Object.fromEntries(
    (q.prepare('select name, rows from table_counts').all() as Array<{ name: string; rows: number }>).map((r) => [
      r.name,
      r.rows,
    ]),
  )
  const count = (sql: string, ...params: unknown[]) => (q.prepare(sql).get(...params) as { n: number }).n
  return {
    customers: totals.customers ?? 0,
    sites: totals.sites ?? 0,
    units: totals.units ?? 0,
    detectors: totals.detectors ?? 0,
    events: totals.events ?? 0,
    overdue: count("select count(*) as n from detectors where due_status = 'overdue'"),
    dueSoon: count("select count(*) as n from detectors where due_status = 'due-soon'"),
    inTrouble: count("select count(*) as n from detectors where state = 'trouble'"),
    outOfService: count("select count(*) as n from detectors where state = 'out-of-service'"),
    delayDisagrees: count("select count(*) as n from detectors where delay_agreement = 'disagree'"),
    byEnvironment: q
      .prepare(
        `select environment, count(*) as detectors, sum(due_status = 'overdue') as overdue
         from detectors group by environment order by detectors desc`,
      )
      .all() as OverviewFigures['byEnvironment'],
    worstCustomers: q
      .prepare(
        `select c.id, c.name, o.overdue, (select count(*) from detectors d where d.customer_id = c.id) as detectors
         from (select customer_id, count(*) as overdue from detectors where due_status = 'overdue'
               group by customer_id order by overdue desc limit 6) o
         join customers c on c.id = o.customer_id order by o.overdue desc`,
      )
      .all() as OverviewFigures['worstCustomers'],
    attention: q
      .prepare(
        `select d.id, d.tag, s.name as siteName, d.state, d.due_status as dueStatus, d.risk_score as riskScore
         from detectors d join sites s on s.id = d.site_id
         where d.risk_score > 0 and d.acknowledged_at is null order by d.risk_score desc, d.id limit 8`,
      )
      .all() as OverviewFigures['attention'],
    upcomingVisits: q
      .prepare(
        `select v.id, v.scheduled_on as scheduledOn, v.kind, v.status, s.id as siteId, s.name as siteName, s.city,
                u.name as technician, (select count(*) from visit_detectors vd where vd.visit_id = v.id) as detectors
         from visits v join sites s on s.id = v.site_id left join users u on u.id = v.technician_id
         where v.scheduled_on between ? and ? and v.status in ('planned', 'notified', 'in-progress')
         order by v.scheduled_on, v.id limit 10`,
      )
      .all(today, addDays(today, 14)) as OverviewFigures['upcomingVisits'],
  }
}
