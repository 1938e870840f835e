// The one derivation of a detector's stored facts. Everything the fleet filters and sorts on (last
// work dates, due dates, due status, loop verdict, delay agreement, risk and its reasons) is worked
// out here from the record, its site's policy, its history and the day. The seed, the daily refresh,
// the detector page, Triage, every write and the database check all call this function.
import { addDays, type IsoDate } from './dates'
import { auditDelay, type DelayAuditResult } from './delay-audit'
import { diagnose, type Arrangement, type Diagnosis, type Readings } from './loop'
import { dueTasks, summarizeTasks, type TaskDue } from './schedule'
import { triage, type TriageReason } from './triage'
import type {
  DelayAgreement,
  DetectorStatus,
  DueStatus,
  Environment,
  Housing,
  LoopVerdict,
  Outcome,
  ReasonCode,
  Task,
  VisitTask,
} from './vocabulary'

/** The parts of a detector's record the derivation reads. */
export interface DetectorRecord {
  installedOn: IsoDate
  environment: Environment
  housing: Housing
  state: DetectorStatus
  /** Reporting delay set on the module's switches, in seconds; null when nobody recorded it. */
  delaySeconds: number | null
  cleaningIntervalDays: number | null
  /** The loop as recorded (terminals, resistor, conductor). */
  arrangement: Arrangement
}

export interface SitePolicy {
  /** Reporting delay agreed with the monitoring company, in seconds. */
  delayPolicySeconds: number
  /** The site keeps nuisance-alarm records (`sites.keeps_nuisance_records`): a condition of the 5-year sensitivity interval. */
  nuisanceRecordsKept: boolean
}

export interface TaskResult {
  /** Shutdown and test-station checks are kept in the history too; the schedule reads the four tasks. */
  task: VisitTask
  doneOn: IsoDate
  outcome: Outcome
}

export interface History {
  /** Every task result on record for the detector, in any order. */
  results: readonly TaskResult[]
  /** The latest loop reading per detector state. */
  loopReadings: Readings
  /** The day (YYYY-MM-DD, or an ISO instant) of each trouble reported; older ones are ignored. */
  troubles: readonly string[]
}

/** What the history says about the work done: the record's dates follow these. */
export interface WorkFacts {
  lastVisualOn: IsoDate | null
  lastFunctionalOn: IsoDate | null
  lastSensitivityOn: IsoDate | null
  lastCleanedOn: IsoDate | null
  /** In-range sensitivity tests in a row, counted back from the latest. */
  sensitivityStreak: number
  /** Outcome of the latest functional or sensitivity test; a failure wins on the same day. */
  lastResult: Outcome | null
}

/** The columns stored on each detector so the fleet filters and sorts in SQL. */
export interface StoredFacts extends WorkFacts {
  nextVisualOn: IsoDate
  nextFunctionalOn: IsoDate
  nextSensitivityOn: IsoDate
  nextCleaningOn: IsoDate
  nextDueOn: IsoDate
  dueStatus: DueStatus
  loopVerdict: LoopVerdict
  loopFindings: string
  delayAgreement: DelayAgreement
  troubles30d: number
  riskScore: number
  riskReasons: string
}

export interface Derivation {
  stored: StoredFacts
  schedule: TaskDue[]
  loop: Diagnosis
  delay: DelayAuditResult
  reasons: TriageReason[]
}

// The window for "repeated troubles": the last 30 days, today included (the product's own call).
export const TROUBLE_WINDOW_DAYS = 30

/**
 * The latest result of each task, and the streak and outcome the schedule and risk depend on. A
 * result dated before the detector was installed belongs to some other device (a typo, a swapped
 * tag): it counts for nothing.
 */
export function workFacts(all: readonly TaskResult[], installedOn?: IsoDate): WorkFacts {
  const results = installedOn ? all.filter((r) => r.doneOn >= installedOn) : all
  const latest = (task: Task) => {
    let on: IsoDate | null = null
    for (const r of results) if (r.task === task && (on === null || r.doneOn > on)) on = r.doneOn
    return on
  }
  // Newest first; on one day a fail comes before a pass, so a day with any fail ends the streak
  // whatever order the results were stored in (the same rule as lastResult below).
  const sensitivity = results
    .filter((r) => r.task === 'sensitivity')
    .sort((a, b) => (a.doneOn !== b.doneOn ? (a.doneOn < b.doneOn ? 1 : -1) : a.outcome === b.outcome ? 0 : a.outcome === 'fail' ? -1 : 1))
  let streak = 0
  for (const r of sensitivity) {
    if (r.outcome !== 'pass') break
    streak++
  }
  let lastResult: Outcome | null = null
  let lastTestOn: IsoDate | null = null
  for (const r of results) {
    if (r.task !== 'functional' && r.task !== 'sensitivity') continue
    if (lastTestOn === null || r.doneOn > lastTestOn) {
      lastTestOn = r.doneOn
      lastResult = r.outcome
    } else if (r.doneOn === lastTestOn && r.outcome === 'fail') {
      lastResult = 'fail'
    }
  }
  return {
    lastVisualOn: latest('visual'),
    lastFunctionalOn: latest('functional'),
    lastSensitivityOn: latest('sensitivity'),
    lastCleanedOn: latest('cleaning'),
    sensitivityStreak: streak,
    lastResult,
  }
}

/** Troubles reported in the window ending today. */
export function recentTroubles(troubles: readonly string[], today: IsoDate): number {
  const from = addDays(today, -(TROUBLE_WINDOW_DAYS - 1))
  let n = 0
  for (const t of troubles) {
    const day = t.slice(0, 10)
    if (day >= from && day <= today) n++
  }
  return n
}

/** Reason codes as stored: ',a,b,' so that one code filters with `like '%,code,%'`. */
export const encodeReasons = (codes: readonly ReasonCode[]) => (codes.length ? `,${[...codes].sort().join(',')},` : '')
export const decodeReasons = (stored: string) => stored.split(',').filter(Boolean) as ReasonCode[]

/**
 * Everything stored for a detector, worked out from its record, its site's policy, its history and
 * the office's day. Pure: the same inputs always give the same facts.
 */
export function deriveDetector(record: DetectorRecord, policy: SitePolicy, history: History, today: IsoDate): Derivation {
  const work = workFacts(history.results, record.installedOn)
  const schedule = dueTasks(
    {
      installedOn: record.installedOn,
      environment: record.environment,
      ...work,
      cleaningIntervalDays: record.cleaningIntervalDays,
      nuisanceRecordsKept: policy.nuisanceRecordsKept,
    },
    today,
  )
  const dueOf = (task: Task) => schedule.find((t) => t.task === task)!.dueOn
  const due = summarizeTasks(schedule)
  const loop = diagnose(record.arrangement, history.loopReadings)
  const delay = auditDelay({ delaySeconds: record.delaySeconds, policySeconds: policy.delayPolicySeconds })
  const troubles30d = recentTroubles(history.troubles, today)
  const { score, reasons } = triage({
    state: record.state,
    overdue: schedule.filter((t) => t.status === 'overdue').map((t) => ({ task: t.task, days: t.daysOverdue })),
    lastResult: work.lastResult,
    diagnosisFailed: loop.verdict === 'fail',
    // Supervision is proven only by a reading taken with the loop opened at the detector.
    supervisionUnproven: history.loopReadings.trouble === undefined && history.loopReadings.unpowered === undefined,
    troubles30d,
    environment: record.environment,
    housing: record.housing,
    delayAgreement: delay.agreement,
  })
  const findingCodes = [...new Set(loop.findings.map((f) => f.code))]
  return {
    stored: {
      ...work,
      nextVisualOn: dueOf('visual'),
      nextFunctionalOn: dueOf('functional'),
      nextSensitivityOn: dueOf('sensitivity'),
      nextCleaningOn: dueOf('cleaning'),
      nextDueOn: due.nextDueOn,
      dueStatus: due.dueStatus,
      loopVerdict: loop.verdict,
      loopFindings: findingCodes.join(','),
      delayAgreement: delay.agreement,
      troubles30d,
      riskScore: score,
      riskReasons: encodeReasons(reasons.map((r) => r.code)),
    },
    schedule,
    loop,
    delay,
    reasons,
  }
}

/** The stored columns whose values the derivation owns, in the order the check reports them. */
export const STORED_FACT_KEYS = [
  'lastVisualOn',
  'lastFunctionalOn',
  'lastSensitivityOn',
  'lastCleanedOn',
  'sensitivityStreak',
  'lastResult',
  'nextVisualOn',
  'nextFunctionalOn',
  'nextSensitivityOn',
  'nextCleaningOn',
  'nextDueOn',
  'dueStatus',
  'loopVerdict',
  'loopFindings',
  'delayAgreement',
  'troubles30d',
  'riskScore',
  'riskReasons',
] as const satisfies ReadonlyArray<keyof StoredFacts>

/** The stored facts that differ from a fresh derivation, each with both values. */
export function factDifferences(stored: Record<(typeof STORED_FACT_KEYS)[number], unknown>, derived: StoredFacts) {
  return STORED_FACT_KEYS.filter((k) => (stored[k] ?? null) !== (derived[k] ?? null)).map((k) => ({ field: k, stored: stored[k] ?? null, derived: derived[k] }))
}
