import { z } from 'zod'
import { daysBetween } from '~/domain/dates'
import { triage, type TriageReason, type TriageReasonCode } from '~/domain/triage'
import type { Db } from '../db'
import { cached, idParam, multi, pagingSchema, runList, type ListResult, type ListSpec } from '../list-query'
import { deviceList, deviceQuery, type DeviceListRow } from './devices'

export const REASON_CODES = [
  'in-trouble',
  'in-alarm',
  'out-of-service',
  'overdue',
  'failed-test',
  'failed-diagnosis',
  'repeated-troubles',
  'humid-unrated',
  'delay-disagrees',
  'delay-unknown',
] as const satisfies readonly TriageReasonCode[]

// Each reason as SQL over the stored fields, the same conditions the engine scores.
const REASON_SQL: Record<(typeof REASON_CODES)[number], string> = {
  'in-trouble': "t.state = 'trouble'",
  'in-alarm': "t.state in ('alarm', 'supervisory')",
  'out-of-service': "t.state = 'out-of-service'",
  overdue: "t.due_status = 'overdue'",
  'failed-test': "t.last_result = 'fail'",
  'failed-diagnosis': "t.loop_verdict = 'fail'",
  'repeated-troubles': 't.troubles_30d >= 2',
  'humid-unrated': "t.environment = 'humid' and t.housing = 'standard'",
  'delay-disagrees': "t.delay_agreement = 'disagree'",
  'delay-unknown': "t.delay_agreement = 'unknown'",
}

export const triageQuery = pagingSchema(Object.keys(deviceList.sorts) as [string, ...string[]]).extend({
  reason: multi(REASON_CODES),
  acknowledged: z.enum(['hide', 'only', 'all']).default('hide'),
  assignedTo: idParam.optional(),
  customer: idParam.optional(),
})
export type TriageQuery = z.infer<typeof triageQuery>

export interface TriageRow extends DeviceListRow {
  lastResult: 'pass' | 'fail' | null
  troubles30d: number
  acknowledgedAt: string | null
  assignee: string | null
  reasons: TriageReason[]
}

const spec: ListSpec<TriageQuery> = {
  ...deviceList,
  from: `${deviceList.from} left join users a on a.id = t.assigned_to`,
  select: {
    ...deviceList.select,
    lastResult: 't.last_result',
    troubles30d: 't.troubles_30d',
    acknowledgedAt: 't.acknowledged_at',
    assignee: 'a.name',
  },
  countedAs: 'detectors',
  where(f) {
    const clauses = ['t.risk_score > 0']
    const params: unknown[] = []
    if (f.acknowledged === 'hide') clauses.push('t.acknowledged_at is null')
    if (f.acknowledged === 'only') clauses.push('t.acknowledged_at is not null')
    if (f.reason?.length) clauses.push(`(${f.reason.map((r) => REASON_SQL[r]).join(' or ')})`)
    if (f.assignedTo) {
      clauses.push('t.assigned_to = ?')
      params.push(f.assignedTo)
    }
    if (f.customer) {
      clauses.push('t.customer_id = ?')
      params.push(f.customer)
    }
    const fromDevices = deviceList.where(deviceQuery.parse({ q: f.q }))
    return { clauses: [...clauses, ...fromDevices.clauses], params: [...params, ...fromDevices.params] }
  },
}

/** The queue: detectors ranked by the engine's score, each with the reasons that make it up. */
export function triageList(db: Db, query: TriageQuery, today: string): ListResult<TriageRow> {
  const page = runList<TriageQuery, Omit<TriageRow, 'reasons'>>(db, spec, query)
  return {
    ...page,
    rows: page.rows.map((r) => ({
      ...r,
      reasons: triage({
        state: r.state as TriageRow['state'] & 'normal',
        dueStatus: r.due as 'ok',
        daysOverdue: r.nextDueOn ? Math.max(0, daysBetween(r.nextDueOn, today)) : 0,
        lastResult: r.lastResult,
        diagnosisFailed: r.loop === 'fail',
        troubles30d: r.troubles30d,
        environment: r.environment as 'clean',
        housing: r.housing as 'standard',
        delayAgreement: r.delay as 'agree',
      }).reasons,
    })),
  }
}

/** How many open (unacknowledged) detectors carry each reason: one pass over the table, kept briefly. */
export function reasonCounts(db: Db): Record<(typeof REASON_CODES)[number], number> & { open: number } {
  return cached('triage-reason-counts', 15_000, () => {
    const sums = REASON_CODES.map((c) => `sum(${REASON_SQL[c]}) as "${c}"`).join(', ')
    return db.$client
      .prepare(`select count(*) as open, ${sums} from detectors t where t.risk_score > 0 and t.acknowledged_at is null`)
      .get() as Record<(typeof REASON_CODES)[number], number> & { open: number }
  })
}
