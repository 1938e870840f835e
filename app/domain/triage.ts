import type { DelayAgreement } from './delay-audit'
import { TASK_LABELS, type Environment } from './schedule'
import type { ReasonCode, Task } from './vocabulary'

export type TriageReasonCode = ReasonCode

export interface OverdueTask {
  task: Task
  /** Days past the last day the standard's window allows (≥ 1 once overdue). */
  days: number
}

export interface TriageInput {
  state: 'normal' | 'alarm' | 'trouble' | 'supervisory' | 'out-of-service'
  /** Every task past its window; a task merely due (inside its window) is not a reason. */
  overdue: readonly OverdueTask[]
  lastResult: 'pass' | 'fail' | null
  /** The last loop or interlock diagnosis failed. */
  diagnosisFailed: boolean
  /** No loop reading ever showed the panel a trouble or a powered-down detector, and no fault explains why. */
  supervisionUnproven: boolean
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

// What each overdue task starts at: the functional test proves the detector stops the unit and
// reaches the panel, so it weighs most; sensitivity next; the visual check and cleaning least.
export const OVERDUE_BASE: Record<Task, number> = { functional: 20, sensitivity: 14, visual: 8, cleaning: 6 }
// Then 2 points for each 30 days past the window for the first ten steps, and 1 point for each
// further 90 days without end: a detector forgotten for years keeps climbing, slowly.
export const OVERDUE_STEP_DAYS = 30
export const OVERDUE_STEPS = 10
export const OVERDUE_SLOW_STEP_DAYS = 90

/** Points for one task this many days past its window. */
export function overduePoints(task: Task, days: number): number {
  if (days < 1) return 0
  const early = Math.min(OVERDUE_STEPS, Math.floor(days / OVERDUE_STEP_DAYS))
  const late = Math.max(0, Math.floor((days - OVERDUE_STEPS * OVERDUE_STEP_DAYS) / OVERDUE_SLOW_STEP_DAYS))
  return OVERDUE_BASE[task] + 2 * early + late
}

const SHORT: Record<Task, string> = { functional: 'functional test', sensitivity: 'sensitivity', visual: 'visual check', cleaning: 'cleaning' }
// One formatter for every row (toLocaleString builds its own each call).
const thousands = new Intl.NumberFormat('en-US')
// Past two years a count of days says less than the years it makes (a detector never tested since
// it went in years ago): 'over 13 years'. The detector's page gives the exact dates.
const dayWord = (n: number) => (n >= 730 ? `over ${Math.floor(n / 365.2425)} years` : `${thousands.format(n)} day${n === 1 ? '' : 's'}`)

// Weights are the product's own call, set so that a live trouble outranks paperwork and an
// unreported fault outranks a late test; each reason shows its points so the order explains itself.
export function triage(input: TriageInput): { score: number; reasons: TriageReason[] } {
  const reasons: TriageReason[] = []
  const add = (code: TriageReasonCode, points: number, text: string) => reasons.push({ code, points, text })

  if (input.state === 'trouble') add('in-trouble', 40, 'In trouble at the panel now')
  if (input.state === 'alarm' || input.state === 'supervisory') add('in-alarm', 45, `Showing ${input.state} now`)
  if (input.state === 'out-of-service') add('out-of-service', 35, 'Out of service: the duct is not protected')
  if (input.overdue.length > 0) {
    // The weightiest task sets the points and its lateness is given; the others are named after it.
    const ranked = [...input.overdue]
      .map((t) => ({ ...t, points: overduePoints(t.task, t.days) }))
      .sort((a, b) => b.points - a.points || a.task.localeCompare(b.task))
    const [head, ...rest] = ranked
    const more = rest.map((t) => SHORT[t.task]).join(', ')
    add('overdue', head.points, `${TASK_LABELS[head.task]} overdue by ${dayWord(head.days)}${more ? `; also ${more}` : ''}`)
  }
  // A miswire fails the test and the readings alike: one fault, counted once (under the failed test),
  // while both reasons stay listed so either filter finds the detector.
  if (input.lastResult === 'fail') add('failed-test', 25, 'Failed its last test')
  if (input.diagnosisFailed) {
    if (input.lastResult === 'fail') add('failed-diagnosis', 0, 'Readings point at a wiring fault, likely why the test failed (counted once)')
    else add('failed-diagnosis', 25, 'Last readings point at a wiring fault')
  } else if (input.supervisionUnproven) {
    add('supervision-unproven', 8, 'Loop never shown to report trouble (no reading in trouble or powered down)')
  }
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
