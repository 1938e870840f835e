import { addDays, addMonths, addYears, daysBetween, type IsoDate } from './dates'

export type Environment = 'clean' | 'dusty' | 'kitchen' | 'humid'
export type DueStatus = 'ok' | 'due-soon' | 'overdue'
export type Task = 'visual' | 'functional' | 'sensitivity' | 'cleaning'

export const TASK_LABELS: Record<Task, string> = {
  visual: 'Visual inspection',
  functional: 'Functional test',
  sensitivity: 'Sensitivity test',
  cleaning: 'Cleaning',
}

// NFPA 72 Chapter 14 (Table 14.3.1, from memory for the table itself): duct detectors inspected
// visually every six months.
export const VISUAL_INTERVAL_MONTHS = 6
// NFPA 72 Chapter 14 (Table 14.4.3.2 / 14.4.2.2 reproductions): functional test annually.
export const FUNCTIONAL_INTERVAL_MONTHS = 12
// Cleaning by environment, in days: common practice (no published figure); overridable per detector.
export const CLEANING_INTERVAL_DAYS: Record<Environment, number> = {
  clean: 365,
  dusty: 180,
  humid: 120,
  kitchen: 90,
}
// How far ahead a task counts as "due soon": common practice, a month to plan a visit.
export const DUE_SOON_DAYS = 30

export interface ScheduleInput {
  installedOn: IsoDate
  environment: Environment
  lastVisualOn: IsoDate | null
  lastFunctionalOn: IsoDate | null
  lastSensitivityOn: IsoDate | null
  /** In-range sensitivity results in a row, most recent last. */
  sensitivityStreak: number
  lastCleanedOn: IsoDate | null
  cleaningIntervalDays?: number | null
  /** Nuisance-alarm records kept for the detector: a condition of the 5-year interval. */
  nuisanceRecordsKept?: boolean
}

export interface TaskDue {
  task: Task
  dueOn: IsoDate
  status: DueStatus
  /** Days past due (negative: days left). */
  daysOver: number
  basis: string
}

export function statusFor(dueOn: IsoDate, today: IsoDate): DueStatus {
  const left = daysBetween(today, dueOn)
  if (left < 0) return 'overdue'
  if (left <= DUE_SOON_DAYS) return 'due-soon'
  return 'ok'
}

/**
 * Next sensitivity test. NFPA 72 14.4.5.3.1–.2: within 1 year after installation, then every
 * alternate year; after the second alternate-year test in range, the interval may grow to 5 years
 * if nuisance-alarm records are kept. Worked example: installed 2010 → 2011, 2013, 2015 → 2020.
 */
export function nextSensitivityDue(input: ScheduleInput): { dueOn: IsoDate; basis: string } {
  if (!input.lastSensitivityOn) {
    return { dueOn: addYears(input.installedOn, 1), basis: 'Within 1 year of installation (NFPA 72 14.4.5.3.1)' }
  }
  const extended = input.sensitivityStreak >= 3 && (input.nuisanceRecordsKept ?? true)
  if (extended) {
    return {
      dueOn: addYears(input.lastSensitivityOn, 5),
      basis: 'Every 5 years after two alternate-year tests in range (NFPA 72 14.4.5.3.2)',
    }
  }
  return { dueOn: addYears(input.lastSensitivityOn, 2), basis: 'Every alternate year (NFPA 72 14.4.5.3.1)' }
}

/** Every task with its next due date, worst first. Never-done tasks fall due from installation. */
export function dueTasks(input: ScheduleInput, today: IsoDate): TaskDue[] {
  const from = (last: IsoDate | null) => last ?? input.installedOn
  const cleaningDays = input.cleaningIntervalDays ?? CLEANING_INTERVAL_DAYS[input.environment]
  const sensitivity = nextSensitivityDue(input)
  const list: Array<Omit<TaskDue, 'status' | 'daysOver'>> = [
    {
      task: 'visual',
      dueOn: addMonths(from(input.lastVisualOn), VISUAL_INTERVAL_MONTHS),
      basis: 'Semiannual visual inspection (NFPA 72 Table 14.3.1)',
    },
    {
      task: 'functional',
      dueOn: addMonths(from(input.lastFunctionalOn), FUNCTIONAL_INTERVAL_MONTHS),
      basis: 'Annual functional test (NFPA 72 Table 14.4.3.2)',
    },
    { task: 'sensitivity', ...sensitivity },
    {
      task: 'cleaning',
      dueOn: addDays(from(input.lastCleanedOn), cleaningDays),
      basis: `Cleaning every ${cleaningDays} days for a ${input.environment} location (common practice)`,
    },
  ]
  return list
    .map((t) => ({ ...t, status: statusFor(t.dueOn, today), daysOver: daysBetween(t.dueOn, today) }))
    .sort((a, b) => a.dueOn.localeCompare(b.dueOn))
}

/** The single date and status the fleet tables filter and sort on: the earliest task due. */
export function summarizeDue(input: ScheduleInput, today: IsoDate): { nextDueOn: IsoDate; dueStatus: DueStatus } {
  const [first] = dueTasks(input, today)
  return { nextDueOn: first.dueOn, dueStatus: first.status }
}
