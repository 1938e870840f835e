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

/**
 * Every figure of one person's digest, counted in SQL over indexed columns: the whole fleet, or only the
 * customers the person follows. `today` is the office's day the digest is written for.
 */
export function digestFigures(db: Db, o: { today: string; customerIds: number[] | null }): DigestFigures {
  const c = db.$client
  const today = o.today
  const weekAgo = addDays(today, -7)
  const twoWeeksAgo = addDays(today, -14)
  const fortnight = addDays(today, 14)
  const ids = o.customerIds && o.customerIds.length > 0 ? o.customerIds : null
  // A list of integers the caller checked; inlined so each query keeps one plan for its index.
  const inIds = ids ? `(${ids.map((id) => Number(id) | 0).join(',')})` : ''
  const dWhere = ids ? `d.customer_id in ${inIds}` : '1'
  const sWhere = ids ? `s.customer_id in ${inIds}` : '1'

  const taskSums = (op: 'overdue' | 'soon') =>
    TASKS.map((t) => (op === 'overdue' ? `sum(d.next_${t}_on < @today) as ${t}` : `sum(d.next_${t}_on >= @today and d.next_${t}_on <= @fortnight) as ${t}`)).join(', ')
  const anyTask = (cond: (col: string) => string) => TASKS.map((t) => cond(`d.next_${t}_on`)).join(' or ')
  // One pass over the fleet's detectors for both overdue and falling due, by task and in all.
  const due = c
    .prepare(
      `select count(*) as detectors, ${taskSums('overdue')}, ${taskSums('soon').replace(/ as (\w+)/g, ' as soon_$1')},
              sum(${anyTask((col) => `${col} < @today`)}) as anyOverdue,
              sum(${anyTask((col) => `${col} between @today and @fortnight`)}) as anySoon
         from detectors d where ${dWhere} and d.state <> 'out-of-service'`,
    )
    .get({ today, fortnight }) as Record<string, number | null>
  const soon: Record<string, number | null> = { anySoon: due.anySoon }
  for (const t of TASKS) soon[t] = due[`soon_${t}`]

  // How long each detector now in trouble has been so: since its latest trouble event.
  const troubleRows = c
    .prepare(
      `select (select max(e.occurred_at) from events e where e.detector_id = d.id and e.kind = 'trouble') as since
         from detectors d where d.state = 'trouble' and ${dWhere}`,
    )
    .all() as { since: string | null }[]
  const ages = troubleRows.map((r) => (r.since ? daysBetween(r.since.slice(0, 10), today) : null))
  const known = ages.filter((a): a is number => a !== null)

  const failedTests = c
    .prepare(
      `select sum(tr.done_on > @weekAgo) as thisWeek, sum(tr.done_on <= @weekAgo) as weekBefore
         from task_results tr join visits v on v.id = tr.visit_id join sites s on s.id = v.site_id
        where v.scheduled_on > @from and v.scheduled_on <= @today and tr.outcome = 'fail'
          and tr.done_on > @twoWeeksAgo and tr.done_on <= @today and ${sWhere}`,
    )
    // Results hang off visits; a visit done late may have been booked a while before its day.
    .get({ weekAgo, twoWeeksAgo, today, from: addDays(today, -60) }) as { thisWeek: number | null; weekBefore: number | null }

  const diagnoses = c
    .prepare(
      `select count(*) as now,
              sum(exists (select 1 from readings r where r.detector_id = d.id and r.taken_at > @weekAgo)) as newThisWeek
         from detectors d where d.loop_verdict = 'fail' and ${dWhere}`,
    )
    .get({ weekAgo }) as { now: number; newThisWeek: number | null }

  const delay = c.prepare(`select count(*) as n from detectors d where d.delay_agreement = 'disagree' and ${dWhere}`).get() as { n: number }

  const visits = c
    .prepare(
      `select sum(v.status = 'done' and v.scheduled_on > @weekAgo and v.scheduled_on <= @today) as doneThisWeek,
              sum(v.status = 'done' and v.scheduled_on > @twoWeeksAgo and v.scheduled_on <= @weekAgo) as doneWeekBefore,
              sum(v.status in ('planned', 'notified', 'in-progress') and v.scheduled_on >= @today and v.scheduled_on < @nextWeek) as planned
         from visits v join sites s on s.id = v.site_id
        where v.scheduled_on > @twoWeeksAgo and v.scheduled_on < @nextWeek and ${sWhere}`,
    )
    .get({ weekAgo, twoWeeksAgo, today, nextWeek: addDays(today, 7) }) as Record<string, number | null>

  const notices = c
    .prepare(
      `select sum(n.notified_at > @weekAgo) as thisWeek, sum(n.notified_at <= @weekAgo) as weekBefore
         from notifications n join sites s on s.id = n.site_id
        where n.notified_at > @twoWeeksAgo and n.notified_at <= @end and ${sWhere}`,
    )
    .get({ weekAgo, twoWeeksAgo, end: `${today}T99` }) as { thisWeek: number | null; weekBefore: number | null }

  const atRisk = c
    .prepare(
      `select d.id, d.tag, s.name as site, cu.name as customer, d.risk_score as score, d.risk_reasons as reasons
         from detectors d join sites s on s.id = d.site_id join customers cu on cu.id = d.customer_id
        where d.risk_score > 0 and ${dWhere}
        order by d.risk_score desc, d.id limit 5`,
    )
    .all() as { id: number; tag: string; site: string; customer: string; score: number; reasons: string }[]

  const customers = ids ? (c.prepare(`select id, name from customers where id in ${inIds} order by name`).all() as { id: number; name: string }[]) : null
  const n = (v: number | null | undefined) => v ?? 0
  return {
    today,
    weekAgo,
    customers,
    detectors: n(due.detectors),
    overdue: { visual: n(due.visual), functional: n(due.functional), sensitivity: n(due.sensitivity), cleaning: n(due.cleaning), any: n(due.anyOverdue) },
    dueSoon: { visual: n(soon.visual), functional: n(soon.functional), sensitivity: n(soon.sensitivity), cleaning: n(soon.cleaning), any: n(soon.anySoon) },
    trouble: { now: troubleRows.length, overAWeek: known.filter((a) => a > 7).length, longestDays: known.length ? Math.max(...known) : null },
    failedTests: { thisWeek: n(failedTests.thisWeek), weekBefore: n(failedTests.weekBefore) },
    failedDiagnoses: { now: diagnoses.now, newThisWeek: n(diagnoses.newThisWeek) },
    delayDisagree: delay.n,
    visitsDone: { thisWeek: n(visits.doneThisWeek), weekBefore: n(visits.doneWeekBefore) },
    visitsPlanned: n(visits.planned),
    notices: { thisWeek: n(notices.thisWeek), weekBefore: n(notices.weekBefore) },
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
