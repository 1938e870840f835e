import { z } from 'zod'
import { daysBetween } from '~/domain/dates'
import { triage, type TriageReason } from '~/domain/triage'
import { REASON_CODES, type ReasonCode } from '~/domain/vocabulary'
import { eq } from 'drizzle-orm'
import type { Db } from '../db'
import { reasonCounts as reasonCountsTable } from '../schema'
import { idParam, multi, pagingSchema, runList, type ListResult, type ListSpec } from '../list-query'
import { deviceList, deviceQuery, type DeviceListRow } from './devices'

export { REASON_CODES }

// Each reason filters on the codes the derivation stored (',a,b,'), never on a restated rule.
const reasonSql = (code: ReasonCode) => `t.risk_reasons like '%,${code},%'`

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
  // The plain open queue, whole or by one reason, is a kept total: no count over the open detectors.
  keptTotal(f) {
    if (f.q || f.assignedTo || f.customer || f.acknowledged !== 'hide' || (f.reason?.length ?? 0) > 1) return null
    return db => db.select({ n: reasonCountsTable.n }).from(reasonCountsTable).where(eq(reasonCountsTable.code, f.reason?.[0] ?? 'open')).get()?.n ?? 0
  },
  where(f) {
    // Open means the derivation gave the detector a reason; the same test the kept counts use.
    const clauses = ["t.risk_reasons != ''"]
    const params: unknown[] = []
    if (f.acknowledged === 'hide') clauses.push('t.acknowledged_at is null')
    if (f.acknowledged === 'only') clauses.push('t.acknowledged_at is not null')
    if (f.reason?.length) clauses.push(`(${f.reason.map(reasonSql).join(' or ')})`)
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

/** How many open (unacknowledged) detectors carry each reason, from the totals the triggers keep. */
export function reasonCounts(db: Db): Record<ReasonCode | 'open', number> {
  const counts = Object.fromEntries(['open', ...REASON_CODES].map((c) => [c, 0])) as Record<ReasonCode | 'open', number>
  for (const row of db.select().from(reasonCountsTable).all()) counts[row.code as ReasonCode | 'open'] = row.n
  return counts
}
