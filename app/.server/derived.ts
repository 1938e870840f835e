import { daysBetween, type IsoDate } from '~/domain/dates'
import type { DelayAgreement } from '~/domain/delay-audit'
import type { DueStatus, Environment } from '~/domain/schedule'
import { triage, type TriageInput } from '~/domain/triage'

/** The stored risk score, from the same engine the console explains it with (seed and daily refresh). */
export function derivedFields(o: {
  state: TriageInput['state']
  dueStatus: DueStatus
  nextDueOn: IsoDate
  today: IsoDate
  lastResult: 'pass' | 'fail' | null
  troubles30: number
  environment: Environment
  housing: 'standard' | 'nema4' | 'nema4x'
  delayAgreement: DelayAgreement
  diagnosisFailed?: boolean
}) {
  const { score } = triage({
    state: o.state,
    dueStatus: o.dueStatus,
    daysOverdue: daysBetween(o.nextDueOn, o.today),
    lastResult: o.lastResult,
    diagnosisFailed: o.diagnosisFailed ?? false,
    troubles30d: o.troubles30,
    environment: o.environment,
    housing: o.housing,
    delayAgreement: o.delayAgreement,
  })
  return { riskScore: score }
}
