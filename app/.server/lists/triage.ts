import { and, count, eq, isNotNull, isNull, ne, or, sql } from 'drizzle-orm'
import { z } from 'zod'
import { decodeReasons } from '~/domain/derive'
import { overdueTasks } from '~/domain/schedule'
import { triage, type TriageReason } from '~/domain/triage'
import { REASON_CODES, type ReasonCode } from '~/domain/vocabulary'
import type { Db } from '../db'
import { detectors, reasonCounts as reasonCountsTable, users } from '../schema'
import { perDb } from '../repos/statements'
import { idParam, multi, orNull, pagingSchema, runList, type ListResult, type ListRow, type ListSpec, wordIsBroad } from '../list-query'
import { detectorSearch, deviceList } from './devices'

export { REASON_CODES }

// Each reason filters on the codes the derivation stored (',a,b,'), never on a restated rule. The
// pattern is written as a literal (a code from REASON_CODES, checked by the query schema) so that
// SQLite matches it to that reason's partial index (detectors_reason_*_idx in the schema).
const hasReason = (code: ReasonCode) => sql`${detectors.riskReasons} like ${sql.raw(`'%,${code},%'`)}`

export const triageQuery = pagingSchema(Object.keys(deviceList.sorts) as [string, ...string[]]).extend({
  reason: multi(REASON_CODES),
  acknowledged: z.enum(['hide', 'only', 'all']).default('hide'),
  assignedTo: idParam.optional(),
  customer: idParam.optional(),
})
// `broad` is set from the database (`wordIsBroad`), never taken from the client.
export type TriageQuery = z.infer<typeof triageQuery> & { broad?: boolean }

const select = {
  ...deviceList.select,
  lastResult: detectors.lastResult,
  troubles30d: detectors.troubles30d,
  acknowledgedAt: detectors.acknowledgedAt,
  // Each task's nominal date and the reasons stored, so the words shown are the derivation's own.
  nextVisualOn: detectors.nextVisualOn,
  nextFunctionalOn: detectors.nextFunctionalOn,
  nextSensitivityOn: detectors.nextSensitivityOn,
  nextCleaningOn: detectors.nextCleaningOn,
  riskReasons: detectors.riskReasons,
  assignee: orNull(users.name),
  // The technician's own words on the latest failed visit result, while the last test stands failed:
  // the office's follow-up. Correlated, but read only for the rows of the window on screen.
  followUp: sql<string | null>`(case when ${detectors.lastResult} = 'fail' then (
    select vd.result_reason from visit_detectors vd join visits v on v.id = vd.visit_id
    where vd.detector_id = ${detectors.id} and vd.result = 'fail' and v.status = 'done'
    order by vd.completed_at desc limit 1) end)`,
}
type QueueRead = ListRow<typeof select>
/**
 * A row of the queue as the page and the JSON route send it: who and where, the state and due
 * badges, and the reasons in the engine's words with their points. The stored fields the reasons
 * were worked out from stay on the server (the detector's own route has them all): a window of the
 * queue is a third the size, on every page load and refresh.
 */
export type TriageRow = Pick<QueueRead, 'id' | 'tag' | 'risk' | 'siteId' | 'site' | 'city' | 'customerId' | 'customer' | 'unitId' | 'unit' | 'position' | 'state' | 'due' | 'assignee' | 'acknowledgedAt' | 'followUp'> & {
  reasons: TriageReason[]
}

// Read on every plain queue page: prepared once per database.
const keptReasons = perDb((db) =>
  db
    .select({ n: reasonCountsTable.n })
    .from(reasonCountsTable)
    .where(eq(reasonCountsTable.code, sql.placeholder('code')))
    .prepare(),
)

// Read with every window of the queue: prepared once per database.
const allReasonCounts = perDb((db) => db.select({ code: reasonCountsTable.code, n: reasonCountsTable.n }).from(reasonCountsTable).prepare())

/**
 * Open detectors carrying one reason, counted: for a code the kept totals have no row for yet (a row
 * per code is added by migration; until then the triggers have nothing to keep it in).
 */
const countOpen = (db: Db, code: ReasonCode) =>
  db.select({ n: count() }).from(detectors).where(and(ne(detectors.riskReasons, ''), isNull(detectors.acknowledgedAt), hasReason(code))).get()?.n ?? 0

/** The queue as a list spec (the CSV export walks it too). */
export const triageSpec: ListSpec<TriageQuery, typeof select> = {
  ...deviceList,
  from: (q) => deviceList.from(q).leftJoin(users, eq(users.id, detectors.assignedTo)),
  select,
  refine: (db, f) => ({ ...f, broad: wordIsBroad(db, 'detector', f.q) }),
  // The page offers risk, tag, site, state and due, each an index walk over the open queue (and
  // customer, a walk by name); the other detector orders only over a few thousand rows.
  costlySorts: ['unit', 'position', 'nextDueOn', 'environment', 'housing', 'delay', 'loop', 'lastFunctionalOn', 'installedOn'],
  // The plain open queue, whole or by one reason, is a kept total: no count over the open detectors.
  keptTotal(f) {
    if (f.q || f.assignedTo || f.customer || f.acknowledged !== 'hide' || (f.reason?.length ?? 0) > 1) return null
    return (db) => {
      const kept = keptReasons(db).get({ code: f.reason?.[0] ?? 'open' })
      return kept ? kept.n : f.reason?.[0] ? countOpen(db, f.reason[0]) : 0
    }
  },
  where: (f) => [
    // Open means the derivation gave the detector a reason; the same test the kept counts use. A
    // literal, so SQLite matches the open queue's partial indexes (detectors_open_*_idx).
    sql`${detectors.riskReasons} <> ''`,
    f.acknowledged === 'hide' ? isNull(detectors.acknowledgedAt) : undefined,
    f.acknowledged === 'only' ? isNotNull(detectors.acknowledgedAt) : undefined,
    f.reason?.length ? or(...f.reason.map(hasReason)) : undefined,
    f.assignedTo ? eq(detectors.assignedTo, f.assignedTo) : undefined,
    f.customer ? eq(detectors.customerId, f.customer) : undefined,
    detectorSearch(f.q, f.broad),
  ],
}

/** The queue: detectors ranked by the engine's score, each with the reasons that make it up. */
export function triageList(db: Db, query: TriageQuery, today: string): ListResult<TriageRow> {
  const page = runList(db, triageSpec, query)
  return {
    ...page,
    rows: page.rows.map((r) => ({
      id: r.id,
      tag: r.tag,
      risk: r.risk,
      siteId: r.siteId,
      site: r.site,
      city: r.city,
      customerId: r.customerId,
      customer: r.customer,
      unitId: r.unitId,
      unit: r.unit,
      position: r.position,
      state: r.state,
      due: r.due,
      assignee: r.assignee,
      acknowledgedAt: r.acknowledgedAt,
      followUp: r.followUp,
      reasons: triage({
        state: r.state,
        overdue: overdueTasks({ visual: r.nextVisualOn, functional: r.nextFunctionalOn, sensitivity: r.nextSensitivityOn, cleaning: r.nextCleaningOn }, today),
        lastResult: r.lastResult,
        diagnosisFailed: r.loop === 'fail',
        // Which readings exist is not on the row; the stored code says what the derivation found.
        supervisionUnproven: decodeReasons(r.riskReasons).includes('supervision-unproven'),
        troubles30d: r.troubles30d,
        environment: r.environment,
        housing: r.housing,
        delayAgreement: r.delay,
      }).reasons,
    })),
  }
}

/** How many open (unacknowledged) detectors carry each reason, from the totals the triggers keep. */
export function reasonCounts(db: Db): Record<ReasonCode | 'open', number> {
  const counts = Object.fromEntries(['open', ...REASON_CODES].map((c) => [c, -1])) as Record<ReasonCode | 'open', number>
  for (const row of allReasonCounts(db).all()) counts[row.code as ReasonCode | 'open'] = row.n
  for (const code of REASON_CODES) if (counts[code] < 0) counts[code] = countOpen(db, code)
  if (counts.open < 0) counts.open = 0
  return counts
}
