import type { DelayAgreement } from './delay-audit'
import type { DueStatus, Environment } from './schedule'
import type { ReasonCode } from './vocabulary'

export type TriageReasonCode = ReasonCode

export interface TriageInput {
  state: 'normal' | 'alarm' | 'trouble' | 'supervisory' | 'out-of-service'
  dueStatus: DueStatus
  /** Days the earliest task is past due (≤ 0 when not overdue). */
  daysOverdue: number
  lastResult: 'pass' | 'fail' | null
  /** The last loop or interlock diagnosis failed. */
  diagnosisFailed: boolean
  troubles30d: number
  environment: Environment
  housing: 'standard' | 'nema4' | 'nema4x'
  delayAgreement: DelayAgreement
}

export interface TriageReason {
  code: TriageReasonCode
  points: number
  text: string
}

// An overdue detector gains 2 points for each 30 days late, for up to 10 steps (30 points in all).
export const OVERDUE_STEP_DAYS = 30
export const OVERDUE_STEPS = 10

// Weights are the product's own call, set so that a live trouble outranks paperwork and an
// unreported fault outranks a late test; each reason shows its points so the order explains itself.
export function triage(input: TriageInput): { score: number; reasons: TriageReason[] } {
  const reasons: TriageReason[] = []
  const add = (code: TriageReasonCode, points: number, text: string) => reasons.push({ code, points, text })

  if (input.state === 'trouble') add('in-trouble', 40, 'In trouble at the panel now')
  if (input.state === 'alarm' || input.state === 'supervisory') add('in-alarm', 45, `Showing ${input.state} now`)
  if (input.state === 'out-of-service') add('out-of-service', 35, 'Out of service: the duct is not protected')
  if (input.dueStatus === 'overdue') {
    const months = Math.min(OVERDUE_STEPS, Math.max(0, Math.floor(input.daysOverdue / OVERDUE_STEP_DAYS)))
    add('overdue', 10 + months * 2, `Overdue by ${input.daysOverdue} day${input.daysOverdue === 1 ? '' : 's'}`)
  }
  if (input.lastResult === 'fail') add('failed-test', 25, 'Failed its last test')
  if (input.diagnosisFailed) add('failed-diagnosis', 25, 'Last readings point at a wiring fault')
  if (input.troubles30d >= 2) {
    add('repeated-troubles', Math.min(20, 5 * input.troubles30d), `${input.troubles30d} troubles in the last 30 days`)
  }
  if (input.environment === 'humid' && input.housing === 'standard') {
    add('humid-unrated', 10, 'Humid location without a water-resistant housing')
  }
  if (input.delayAgreement === 'disagree') add('delay-disagrees', 10, 'Reporting delay differs from site policy')
  if (input.delayAgreement === 'unknown') add('delay-unknown', 3, 'Reporting delay not recorded')

  reasons.sort((a, b) => b.points - a.points || a.code.localeCompare(b.code))
  return { score: reasons.reduce((sum, r) => sum + r.points, 0), reasons }
}
