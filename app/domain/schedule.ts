import { addDays, addMonths, addYears, daysBetween, type IsoDate } from './dates'

export type Environment = 'clean' | 'dusty' | 'kitchen' | 'humid'
import type { DueStatus, Task } from './vocabulary'

export type { DueStatus, Task }

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

/**
 * How long after its nominal date a task may still be done on time. NFPA 72 (2016 and later, 3.3
 * frequency definitions; from memory) lets an annual task fall 9 to 15 months after the last one and a
 * semiannual one 4 to 8 months after: so 3 and 2 months past the nominal 12 and 6. The sensitivity
 * test has no such window ("within 1 year after installation", then a fixed interval), nor does the
 * cleaning interval, which is our own (common practice): both are overdue the day after they fall due.
 * The window is counted from the nominal date, so where a month-end clamp shortened the nominal date
 * the window ends a day or two early, never late.
 */
export const WINDOW_MONTHS: Record<Task, number> = { visual: 2, functional: 3, sensitivity: 0, cleaning: 0 }
export const WINDOW_BASIS: Record<Task, string> = {
  visual: 'semiannual means 4 to 8 months apart (NFPA 72 3.3 frequency definitions, 2016 and later; from memory)',
  functional: 'annual means 9 to 15 months apart (NFPA 72 3.3 frequency definitions, 2016 and later; from memory)',
  sensitivity: 'no window: the standard sets the latest date itself (NFPA 72 14.4.5.3)',
  cleaning: 'no window: the cleaning interval is our own (common practice)',
}

// Window ends already worked out, by task and date: the fleet's derivation and every row of a Triage
// page ask again and again for the same few thousand dates, and each is a calendar sum of months.
const windowEnds = new Map<string, IsoDate>()
const MAX_WINDOW_ENDS = 20_000

/** The last day a task is still inside its window; the day after, it is overdue. */
export function overdueAfter(task: Task, dueOn: IsoDate): IsoDate {
  const months = WINDOW_MONTHS[task]
  if (!months) return dueOn
  const key = `${task} ${dueOn}`
  let end = windowEnds.get(key)
  if (end === undefined) {
    if (windowEnds.size >= MAX_WINDOW_ENDS) windowEnds.clear()
    end = addMonths(dueOn, months)
    windowEnds.set(key, end)
  }
  return end
}

/** Worst first: the order a detector's several tasks are summed up in. */
const SEVERITY: Record<DueStatus, number> = { ok: 0, 'due-soon': 1, due: 2, overdue: 3 }
export const worstStatus = (a: DueStatus, b: DueStatus): DueStatus => (SEVERITY[b] > SEVERITY[a] ? b : a)

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
  /** The site keeps nuisance-alarm records: a condition of the 5-year interval. Absent means not kept. */
  nuisanceRecordsKept?: boolean
}

export interface TaskDue {
  task: Task
  dueOn: IsoDate
  status: DueStatus
  /** Days past the nominal date (negative: days left). */
  daysOver: number
  /** The last day inside the standard's window; overdue from the day after. */
  overdueAfter: IsoDate
  /** Days past the window (0 while inside it or not yet due). */
  daysOverdue: number
  basis: string
  /** Where the window comes from, in words. */
  windowBasis: string
}

/**
 * Due soon within 30 days of the nominal date; due from the nominal date to the window's last day;
 * overdue after it. A task without a window is due on its nominal day and overdue the day after.
 */
export function statusFor(dueOn: IsoDate, today: IsoDate, task?: Task): DueStatus {
  if (today > (task ? overdueAfter(task, dueOn) : dueOn)) return 'overdue'
  if (today >= dueOn) return 'due'
  if (daysBetween(today, dueOn) <= DUE_SOON_DAYS) return 'due-soon'
  return 'ok'
}

/** One task's status and lateness from its nominal date: the one rule the derivation and the lists share. */
export function taskStanding(task: Task, dueOn: IsoDate, today: IsoDate) {
  const end = overdueAfter(task, dueOn)
  return { status: statusFor(dueOn, today, task), overdueAfter: end, daysOverdue: Math.max(0, daysBetween(end, today)) }
}

/**
 * In-range sensitivity tests in a row before the longer interval: the test within a year of
 * installation and the two alternate-year tests after it. NFPA 72 14.4.5.3.1–.2 (2010 numbering;
 * it differs between editions) allows 5 years "after the second required" test found in range; its
 * worked example (installed 2010 → 2011, 2013, 2015 → next 2020) counts the second alternate-year
 * test, so three in-range results in a row, and a result out of range starts the count again.
 */
export const EXTENSION_STREAK = 3

/**
 * Next sensitivity test. NFPA 72 14.4.5.3.1–.2: within 1 year after installation, then every
 * alternate year; after EXTENSION_STREAK in-range tests in a row the interval may grow to 5 years,
 * only where nuisance-alarm records are kept (without them, every alternate year applies).
 */
export function nextSensitivityDue(input: ScheduleInput): { dueOn: IsoDate; basis: string } {
  if (!input.lastSensitivityOn) {
    return { dueOn: addYears(input.installedOn, 1), basis: 'Within 1 year of installation (NFPA 72 14.4.5.3.1)' }
  }
  const inRange = input.sensitivityStreak >= EXTENSION_STREAK
  if (inRange && input.nuisanceRecordsKept === true) {
    return {
      dueOn: addYears(input.lastSensitivityOn, 5),
      basis: `Every 5 years: ${input.sensitivityStreak} tests in range in a row, the first-year test and two alternate-year ones at least, and the site keeps nuisance-alarm records (NFPA 72 14.4.5.3.2)`,
    }
  }
  const why = inRange
    ? `${input.sensitivityStreak} tests in range in a row, but the site keeps no nuisance-alarm records, a condition of the 5-year interval`
    : `${input.sensitivityStreak} in-range test${input.sensitivityStreak === 1 ? '' : 's'} in a row so far, and the 5-year interval needs ${EXTENSION_STREAK}`
  return { dueOn: addYears(input.lastSensitivityOn, 2), basis: `Every alternate year: ${why} (NFPA 72 14.4.5.3.1–.2)` }
}

/** Every task with its next due date, worst first. Never-done tasks fall due from installation. */
export function dueTasks(input: ScheduleInput, today: IsoDate): TaskDue[] {
  const from = (last: IsoDate | null) => last ?? input.installedOn
  const cleaningDays = input.cleaningIntervalDays ?? CLEANING_INTERVAL_DAYS[input.environment]
  const sensitivity = nextSensitivityDue(input)
  const list: Array<Pick<TaskDue, 'task' | 'dueOn' | 'basis'>> = [
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
    .map((t) => ({ ...t, ...taskStanding(t.task, t.dueOn, today), daysOver: daysBetween(t.dueOn, today), windowBasis: WINDOW_BASIS[t.task] }))
    .sort((a, b) => a.dueOn.localeCompare(b.dueOn))
}

/**
 * The single date and status the fleet tables filter and sort on: the earliest nominal date, and the
 * worst status of any task (a later task without a window can be overdue while the earliest is still
 * inside its own).
 */
export function summarizeDue(input: ScheduleInput, today: IsoDate): { nextDueOn: IsoDate; dueStatus: DueStatus } {
  return summarizeTasks(dueTasks(input, today))
}

export function summarizeTasks(tasks: readonly TaskDue[]): { nextDueOn: IsoDate; dueStatus: DueStatus } {
  return { nextDueOn: tasks[0].dueOn, dueStatus: tasks.reduce<DueStatus>((w, t) => worstStatus(w, t.status), 'ok') }
}

/** Tasks past their window, with days past it: what the overdue risk reason names and weighs. */
export function overdueTasks(dues: Record<Task, IsoDate | null>, today: IsoDate): Array<{ task: Task; days: number }> {
  const out: Array<{ task: Task; days: number }> = []
  for (const task of Object.keys(dues) as Task[]) {
    const dueOn = dues[task]
    if (dueOn === null) continue
    // taskStanding's overdue test and lateness, with the window's end worked out once: this runs for
    // every task of every row of a Triage page.
    const end = overdueAfter(task, dueOn)
    if (today > end) out.push({ task, days: daysBetween(end, today) })
  }
  return out
}
