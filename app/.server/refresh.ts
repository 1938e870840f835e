import { auditDelay } from '~/domain/delay-audit'
import { summarizeDue } from '~/domain/schedule'
import type { Db } from './db'
import { derivedFields } from './derived'
import { listsChanged } from './list-query'
import { officeToday } from './today'

interface Row {
  id: number
  installedOn: string
  environment: 'clean' | 'dusty' | 'kitchen' | 'humid'
  lastVisualOn: string | null
  lastFunctionalOn: string | null
  lastSensitivityOn: string | null
  sensitivityStreak: number
  lastCleanedOn: string | null
  cleaningIntervalDays: number | null
  delaySeconds: number | null
  policySeconds: number
  state: 'normal' | 'alarm' | 'trouble' | 'supervisory' | 'out-of-service'
  lastResult: 'pass' | 'fail' | null
  loopVerdict: 'pass' | 'fail' | 'incomplete' | null
  troubles30d: number
  housing: 'standard' | 'nema4' | 'nema4x'
  nextDueOn: string | null
  dueStatus: string
  delayAgreement: string
  riskScore: number
}

/**
 * Re-derives each detector's due date, due status, delay agreement and risk score for `today`.
 * These columns exist so the fleet filters and sorts in SQL; a new day moves detectors from
 * "up to date" to "due soon" to "overdue" without anyone touching them. Only changed rows are written.
 */
export function refreshDerived(db: Db, today: string): { checked: number; changed: number } {
  const q = db.$client
  const rows = q
    .prepare(
      `select d.id, d.installed_on as installedOn, d.environment, d.last_visual_on as lastVisualOn,
              d.last_functional_on as lastFunctionalOn, d.last_sensitivity_on as lastSensitivityOn,
              d.sensitivity_streak as sensitivityStreak, d.last_cleaned_on as lastCleanedOn,
              d.cleaning_interval_days as cleaningIntervalDays, d.delay_seconds as delaySeconds,
              s.delay_policy_seconds as policySeconds, d.state, d.last_result as lastResult,
              d.loop_verdict as loopVerdict, d.troubles_30d as troubles30d, d.housing,
              d.next_due_on as nextDueOn, d.due_status as dueStatus, d.delay_agreement as delayAgreement,
              d.risk_score as riskScore
       from detectors d join sites s on s.id = d.site_id`,
    )
    .all() as Row[]
  const update = q.prepare('update detectors set next_due_on = ?, due_status = ?, delay_agreement = ?, risk_score = ? where id = ?')
  let changed = 0
  q.transaction(() => {
    for (const r of rows) {
      const due = summarizeDue(r, today)
      const delay = auditDelay({ delaySeconds: r.delaySeconds, policySeconds: r.policySeconds }).agreement
      const { riskScore: score } = derivedFields({
        state: r.state,
        dueStatus: due.dueStatus,
        nextDueOn: due.nextDueOn,
        today,
        lastResult: r.lastResult,
        diagnosisFailed: r.loopVerdict === 'fail',
        troubles30: r.troubles30d,
        environment: r.environment,
        housing: r.housing,
        delayAgreement: delay,
      })
      if (due.nextDueOn !== r.nextDueOn || due.dueStatus !== r.dueStatus || delay !== r.delayAgreement || score !== r.riskScore) {
        update.run(due.nextDueOn, due.dueStatus, delay, score, r.id)
        changed++
      }
    }
  })()
  if (changed > 0) listsChanged()
  return { checked: rows.length, changed }
}

let lastDay: string | null = null

/** Refreshes once per office day: at first use, then whenever the day has turned. */
export function refreshIfNewDay(db: Db, now = new Date()) {
  const today = officeToday(now)
  if (today === lastDay) return null
  lastDay = today
  return refreshDerived(db, today)
}
