import { addDays } from '~/domain/dates'
import { PERMISSIONS } from '~/domain/permissions'
import type { ReasonCode } from '~/domain/vocabulary'
import type { Db } from '../db'

const TASKS = ['visual', 'functional', 'sensitivity', 'cleaning'] as const
type Task = (typeof TASKS)[number]

export interface DigestFigures {
  today: string
  weekAgo: string
  customers: { id: number; name: string }[] | null
  detectors: number
  overdue: Record<Task, number> & { any: number }
  dueSoon: Record<Task, number> & { any: number }
  trouble: { now: number; overAWeek: number; longestDays: number | null }
  failedTests: { thisWeek: number; weekBefore: number }
  failedDiagnoses: { now: number; newThisWeek: number }
  delayDisagree: number
  visitsDone: { thisWeek: number; weekBefore: number }
  visitsPlanned: number
  notices: { thisWeek: number; weekBefore: number }
  atRisk: { id: number; tag: string; site: string; customer: string; score: number; reasons: ReasonCode[] }[]
}

/** One customer's share of every additive figure; a person's digest sums the customers they follow. */
interface Tally {
  detectors: number
  overdue: Record<Task, number> & { any: number }
  dueSoon: Record<Task, number> & { any: number }
  troubleNow: number
  troubleOverAWeek: number
  troubleLongest: number | null
  failedThisWeek: number
  failedWeekBefore: number
  diagnosesNow: number
  diagnosesNew: number
  delayDisagree: number
  doneThisWeek: number
  doneWeekBefore: number
  planned: number
  noticesThisWeek: number
  noticesWeekBefore: number
}

/** Every customer's tallies for one office day, computed once for however many people get a digest. */
export interface FleetFigures {
  today: string
  byCustomer: Map<number, Tally>
}

const emptyTally = (): Tally => ({
  detectors: 0,
  overdue: { visual: 0, functional: 0, sensitivity: 0, cleaning: 0, any: 0 },
  dueSoon: { visual: 0, functional: 0, sensitivity: 0, cleaning: 0, any: 0 },
  troubleNow: 0,
  troubleOverAWeek: 0,
  troubleLongest: null,
  failedThisWeek: 0,
  failedWeekBefore: 0,
  diagnosesNow: 0,
  diagnosesNew: 0,
  delayDisagree: 0,
  doneThisWeek: 0,
  doneWeekBefore: 0,
  planned: 0,
  noticesThisWeek: 0,
  noticesWeekBefore: 0,
})

/**
 * The whole fleet's figures in a handful of grouped queries, one row per customer: the detectors in one
 * pass, then the trouble ages, failed results, visits and notices of the last two weeks on their
 * indexes. Every person's digest is then a sum over customers, so a hundred managers cost one pass.
 */
export function fleetFigures(db: Db, today: string): FleetFigures {
  const c = db.$client
  const weekAgo = addDays(today, -7)
  const twoWeeksAgo = addDays(today, -14)
  const fortnight = addDays(today, 14)
  const byCustomer = new Map<number, Tally>()
  const tally = (id: number) => {
    let t = byCustomer.get(id)
    if (!t) byCustomer.set(id, (t = emptyTally()))
    return t
  }
  const live = `d.state <> 'out-of-service'`
  const sums = TASKS.map((t) => `sum(${live} and d.next_${t}_on < @today) as o_${t}, sum(${live} and d.next_${t}_on between @today and @fortnight) as s_${t}`).join(', ')
  const anyTask = (cond: (col: string) => string) => TASKS.map((t) => cond(`d.next_${t}_on`)).join(' or ')
  // One pass over the detectors for due dates, wiring verdicts and delay agreement. The readings probe
  // runs only for the few detectors whose loop failed (CASE evaluates its branch only when it applies).
  const rows = c
    .prepare(
      `select d.customer_id as customer, sum(${live}) as detectors, ${sums},
              sum(${live} and (${anyTask((col) => `${col} < @today`)})) as o_any,
              sum(${live} and (${anyTask((col) => `${col} between @today and @fortnight`)})) as s_any,
              sum(d.loop_verdict = 'fail') as diagnosesNow,
              sum(case when d.loop_verdict = 'fail' then exists (select 1 from readings r where r.detector_id = d.id and r.taken_at > @weekAgo) else 0 end) as diagnosesNew,
              sum(d.delay_agreement = 'disagree') as delayDisagree
         from detectors d group by d.customer_id`,
    )
    .all({ today, fortnight, weekAgo }) as Record<string, number>[]
  for (const r of rows) {
    const t = tally(r.customer)
    t.detectors = r.detectors
    for (const k of [...TASKS, 'any'] as const) {
      t.overdue[k] = r[`o_${k}`]
      t.dueSoon[k] = r[`s_${k}`]
    }
    t.diagnosesNow = r.diagnosesNow
    t.diagnosesNew = r.diagnosesNew
    t.delayDisagree = r.delayDisagree
  }

  // How long each detector now in trouble has been so: since its latest trouble event.
  const trouble = c
    .prepare(
      `select d.customer_id as customer, (select max(e.occurred_at) from events e where e.detector_id = d.id and e.kind = 'trouble') as since
         from detectors d where d.state = 'trouble'`,
    )
    .all() as { customer: number; since: string | null }[]
  for (const r of trouble) {
    const t = tally(r.customer)
    t.troubleNow++
    if (!r.since) continue
    const age = daysBetween(r.since.slice(0, 10), today)
    if (age > 7) t.troubleOverAWeek++
    t.troubleLongest = Math.max(t.troubleLongest ?? age, age)
  }

  const failed = c
    .prepare(
      `select s.customer_id as customer, sum(tr.done_on > @weekAgo) as thisWeek, sum(tr.done_on <= @weekAgo) as weekBefore
         from visits v join task_results tr on tr.visit_id = v.id join sites s on s.id = v.site_id
        where v.scheduled_on > @from and v.scheduled_on <= @today and tr.outcome = 'fail'
          and tr.done_on > @twoWeeksAgo and tr.done_on <= @today
        group by s.customer_id`,
    )
    // Results hang off visits; a visit done late may have been booked a while before its day.
    .all({ weekAgo, twoWeeksAgo, today, from: addDays(today, -60) }) as { customer: number; thisWeek: number; weekBefore: number }[]
  for (const r of failed) Object.assign(tally(r.customer), { failedThisWeek: r.thisWeek, failedWeekBefore: r.weekBefore })

  const visits = c
    .prepare(
      `select s.customer_id as customer,
              sum(v.status = 'done' and v.scheduled_on > @weekAgo and v.scheduled_on <= @today) as doneThisWeek,
              sum(v.status = 'done' and v.scheduled_on <= @weekAgo) as doneWeekBefore,
              sum(v.status in ('planned', 'notified', 'in-progress') and v.scheduled_on >= @today) as planned
         from visits v join sites s on s.id = v.site_id
        where v.scheduled_on > @twoWeeksAgo and v.scheduled_on < @nextWeek
        group by s.customer_id`,
    )
    .all({ weekAgo, twoWeeksAgo, today, nextWeek: addDays(today, 7) }) as { customer: number; doneThisWeek: number; doneWeekBefore: number; planned: number }[]
  for (const r of visits) Object.assign(tally(r.customer), { doneThisWeek: r.doneThisWeek, doneWeekBefore: r.doneWeekBefore, planned: r.planned })

  const notices = c
    .prepare(
      `select s.customer_id as customer, sum(n.notified_at > @weekAgo) as thisWeek, sum(n.notified_at <= @weekAgo) as weekBefore
         from notifications n join sites s on s.id = n.site_id
        where n.notified_at > @twoWeeksAgo and n.notified_at <= @end
        group by s.customer_id`,
    )
    .all({ weekAgo, twoWeeksAgo, end: `${today}T99` }) as { customer: number; thisWeek: number; weekBefore: number }[]
  for (const r of notices) Object.assign(tally(r.customer), { noticesThisWeek: r.thisWeek, noticesWeekBefore: r.weekBefore })

  return { today, byCustomer }
}

/**
 * One person's digest figures: the whole fleet, or only the customers the person follows. Pass the
 * fleet's figures when building several digests for the same day; without them they are counted here.
 */
export function digestFigures(db: Db, o: { today: string; customerIds: number[] | null; fleet?: FleetFigures }): DigestFigures {
  const fleet = o.fleet && o.fleet.today === o.today ? o.fleet : fleetFigures(db, o.today)
  const ids = o.customerIds && o.customerIds.length > 0 ? [...new Set(o.customerIds.map((id) => Number(id) | 0))] : null
  const sum = emptyTally()
  for (const [customer, t] of fleet.byCustomer) {
    if (ids && !ids.includes(customer)) continue
    for (const k of [...TASKS, 'any'] as const) {
      sum.overdue[k] += t.overdue[k]
      sum.dueSoon[k] += t.dueSoon[k]
    }
    for (const k of ['detectors', 'troubleNow', 'troubleOverAWeek', 'failedThisWeek', 'failedWeekBefore', 'diagnosesNow', 'diagnosesNew', 'delayDisagree', 'doneThisWeek', 'doneWeekBefore', 'planned', 'noticesThisWeek', 'noticesWeekBefore'] as const) {
      sum[k] += t[k]
    }
    if (t.troubleLongest !== null) sum.troubleLongest = Math.max(sum.troubleLongest ?? t.troubleLongest, t.troubleLongest)
  }
  const c = db.$client
  // A list of integers checked above; inlined so the query keeps one plan for its index.
  const inIds = ids ? `(${ids.join(',')})` : ''
  const atRisk = c
    .prepare(
      // The five picked on the detectors alone, so the risk index orders them and the walk stops at five;
      // joined first, the planner sorted every detector with a risk.
      `select d.id, d.tag, s.name as site, cu.name as customer, d.risk_score as score, d.risk_reasons as reasons
         from (select id from detectors where risk_score > 0 and ${ids ? `customer_id in ${inIds}` : '1'} order by risk_score desc, id limit 5) top
         join detectors d on d.id = top.id join sites s on s.id = d.site_id join customers cu on cu.id = d.customer_id
        order by d.risk_score desc, d.id`,
    )
    .all() as { id: number; tag: string; site: string; customer: string; score: number; reasons: string }[]
  const customers = ids ? (c.prepare(`select id, name from customers where id in ${inIds} order by name`).all() as { id: number; name: string }[]) : null
  return {
    today: o.today,
    weekAgo: addDays(o.today, -7),
    customers,
    detectors: sum.detectors,
    overdue: sum.overdue,
    dueSoon: sum.dueSoon,
    trouble: { now: sum.troubleNow, overAWeek: sum.troubleOverAWeek, longestDays: sum.troubleLongest },
    failedTests: { thisWeek: sum.failedThisWeek, weekBefore: sum.failedWeekBefore },
    failedDiagnoses: { now: sum.diagnosesNow, newThisWeek: sum.diagnosesNew },
    delayDisagree: sum.delayDisagree,
    visitsDone: { thisWeek: sum.doneThisWeek, weekBefore: sum.doneWeekBefore },
    visitsPlanned: sum.planned,
    notices: { thisWeek: sum.noticesThisWeek, weekBefore: sum.noticesWeekBefore },
    atRisk: atRisk.map((r) => ({ ...r, reasons: r.reasons.split(',').filter(Boolean) as ReasonCode[] })),
  }
}

function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000)
}

export interface DigestRecipient {
  userId: number
  email: string
  name: string
  enabled: boolean
  weekday: number
  hour: number
  customerIds: number[]
}

const DIGEST_ROLES = PERMISSIONS['receive:digest'] as readonly string[]

/** Everyone active whose role receives the digest, with their settings (default: on, Monday, 07:00). */
export function digestRecipients(db: Db): DigestRecipient[] {
  const rows = db.$client
    .prepare(
      `select u.id as userId, u.email, u.name, u.role, coalesce(ds.enabled, 1) as enabled, coalesce(ds.weekday, 1) as weekday, coalesce(ds.hour, 7) as hour,
              (select group_concat(dc.customer_id) from digest_customers dc where dc.user_id = u.id) as customers
         from users u left join digest_settings ds on ds.user_id = u.id
        where u.active = 1 order by u.id`,
    )
    .all() as { userId: number; email: string; name: string; role: string; enabled: number; weekday: number; hour: number; customers: string | null }[]
  return rows
    .filter((r) => DIGEST_ROLES.includes(r.role))
    .map((r) => ({
      userId: r.userId,
      email: r.email,
      name: r.name,
      enabled: r.enabled === 1,
      weekday: r.weekday,
      hour: r.hour,
      customerIds: r.customers ? r.customers.split(',').map(Number) : [],
    }))
}

/** ISO 8601 week of a calendar day, e.g. 2026-W25: the digest's once-a-week key. */
export function isoWeek(day: string): string {
  const d = new Date(`${day}T00:00:00Z`)
  const weekday = d.getUTCDay() || 7
  d.setUTCDate(d.getUTCDate() + 4 - weekday)
  const yearStart = Date.UTC(d.getUTCFullYear(), 0, 1)
  const week = Math.ceil(((d.getTime() - yearStart) / 86_400_000 + 1) / 7)
  return `${d.getUTCFullYear()}-W${String(week).padStart(2, '0')}`
}

export const digestKey = (userId: number, day: string) => `digest:${userId}:${isoWeek(day)}`
