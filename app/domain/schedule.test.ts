import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  CLEANING_INTERVAL_DAYS,
  DUE_SOON_DAYS,
  dueTasks,
  nextSensitivityDue,
  statusFor,
  summarizeDue,
  type ScheduleInput,
} from './schedule'

const base: ScheduleInput = {
  installedOn: '2010-06-01',
  environment: 'clean',
  lastVisualOn: null,
  lastFunctionalOn: null,
  lastSensitivityOn: null,
  sensitivityStreak: 0,
  lastCleanedOn: null,
  nuisanceRecordsKept: true,
}
const taskOf = (input: ScheduleInput, task: string, today = '2026-03-10') => dueTasks(input, today).find((t) => t.task === task)!

describe('nextSensitivityDue: the worked example', () => {
  // NFPA 72 14.4.5.3.1–.2, worked example citing the 2010 edition: installed 2010 → tests 2011,
  // 2013, 2015 → next 2020. The streak counts in-range results in a row, the first-year test included.
  it('installed 2010 → 2011 → 2013 → 2015 → 2020', () => {
    const installed = { ...base, installedOn: '2010-06-01' }
    const first = nextSensitivityDue(installed)
    expect(first.dueOn).toBe('2011-06-01') // within 1 year of installation
    expect(first.basis).toMatch(/14\.4\.5\.3\.1/)

    const after2011 = nextSensitivityDue({ ...installed, lastSensitivityOn: '2011-05-20', sensitivityStreak: 1 })
    expect(after2011.dueOn).toBe('2013-05-20') // alternate year
    expect(after2011.basis).toMatch(/alternate year/)

    const after2013 = nextSensitivityDue({ ...installed, lastSensitivityOn: '2013-05-14', sensitivityStreak: 2 })
    expect(after2013.dueOn).toBe('2015-05-14') // still alternate year

    const after2015 = nextSensitivityDue({ ...installed, lastSensitivityOn: '2015-05-11', sensitivityStreak: 3 })
    expect(after2015.dueOn).toBe('2020-05-11') // extended to 5 years
    expect(after2015.basis).toMatch(/5 years.*14\.4\.5\.3\.2/)

    // Staying in range keeps the 5-year interval.
    expect(nextSensitivityDue({ ...installed, lastSensitivityOn: '2020-05-04', sensitivityStreak: 4 }).dueOn).toBe('2025-05-04')
  })

  it('a result out of range resets the streak, and the interval goes back to alternate years', () => {
    // Streak 0 with a test on file: the last test was out of range.
    expect(nextSensitivityDue({ ...base, lastSensitivityOn: '2020-05-04', sensitivityStreak: 0 }).dueOn).toBe('2022-05-04')
  })

  it('the extension needs nuisance-alarm records kept (NFPA 72 14.4.5.3.2)', () => {
    const tested = { ...base, lastSensitivityOn: '2015-05-11', sensitivityStreak: 3 }
    expect(nextSensitivityDue({ ...tested, nuisanceRecordsKept: false }).dueOn).toBe('2017-05-11')
    expect(nextSensitivityDue({ ...tested, nuisanceRecordsKept: true }).dueOn).toBe('2020-05-11')
  })

  it('without word of the records, the longer interval is not given, and the basis says which condition is missing', () => {
    const tested = { ...base, lastSensitivityOn: '2015-05-11', sensitivityStreak: 3 }
    const { nuisanceRecordsKept: _, ...unknown } = tested
    expect(nextSensitivityDue(unknown).dueOn).toBe('2017-05-11')
    expect(nextSensitivityDue({ ...tested, nuisanceRecordsKept: false }).basis).toMatch(/no nuisance-alarm records/)
    // Two in range in a row are not enough, records or not: 2011 and 2013 → 2015 (the worked example).
    expect(nextSensitivityDue({ ...tested, sensitivityStreak: 2 }).basis).toMatch(/2 in-range tests in a row so far, and the 5-year interval needs 3/)
  })

  it('never tested: due 1 year after installation, clamped on 29 February', () => {
    expect(nextSensitivityDue({ ...base, installedOn: '2024-02-29' }).dueOn).toBe('2025-02-28')
  })
})

describe('dueTasks: intervals', () => {
  it('visual inspection every 6 months (NFPA 72 Table 14.3.1, from memory for the table itself)', () => {
    const t = taskOf({ ...base, lastVisualOn: '2026-01-15' }, 'visual')
    expect(t.dueOn).toBe('2026-07-15')
    expect(t.basis).toMatch(/Semiannual/)
  })

  it('functional test every 12 months (NFPA 72 Chapter 14, reproduced tables)', () => {
    const t = taskOf({ ...base, lastFunctionalOn: '2026-01-15' }, 'functional')
    expect(t.dueOn).toBe('2027-01-15')
    expect(t.basis).toMatch(/Annual/)
  })

  it('a task never done falls due from installation', () => {
    const input = { ...base, installedOn: '2025-11-03' }
    expect(taskOf(input, 'visual').dueOn).toBe('2026-05-03')
    expect(taskOf(input, 'functional').dueOn).toBe('2026-11-03')
    expect(taskOf(input, 'cleaning').dueOn).toBe('2026-11-03') // 365 days later, clean air
  })

  it('month-end: 31 January + 6 months is 31 July; 31 August + 6 months clamps to February', () => {
    expect(taskOf({ ...base, lastVisualOn: '2026-01-31' }, 'visual').dueOn).toBe('2026-07-31')
    expect(taskOf({ ...base, lastVisualOn: '2025-08-31' }, 'visual').dueOn).toBe('2026-02-28')
    expect(taskOf({ ...base, lastVisualOn: '2027-08-31' }, 'visual').dueOn).toBe('2028-02-29') // leap year
    expect(taskOf({ ...base, lastFunctionalOn: '2024-02-29' }, 'functional').dueOn).toBe('2025-02-28')
  })

  // Cleaning intervals by environment are common practice (no published figure).
  it('cleaning interval by environment (common practice)', () => {
    expect(CLEANING_INTERVAL_DAYS).toEqual({ clean: 365, dusty: 180, humid: 120, kitchen: 90 })
    const last = '2026-01-01'
    expect(taskOf({ ...base, environment: 'clean', lastCleanedOn: last }, 'cleaning').dueOn).toBe('2027-01-01')
    expect(taskOf({ ...base, environment: 'dusty', lastCleanedOn: last }, 'cleaning').dueOn).toBe('2026-06-30')
    expect(taskOf({ ...base, environment: 'humid', lastCleanedOn: last }, 'cleaning').dueOn).toBe('2026-05-01')
    const kitchen = taskOf({ ...base, environment: 'kitchen', lastCleanedOn: last }, 'cleaning')
    expect(kitchen.dueOn).toBe('2026-04-01')
    expect(kitchen.basis).toBe('Cleaning every 90 days for a kitchen location (common practice)')
  })

  it('a per-detector cleaning interval overrides the environment; null falls back to it', () => {
    const input = { ...base, environment: 'kitchen' as const, lastCleanedOn: '2026-01-01' }
    expect(taskOf({ ...input, cleaningIntervalDays: 30 }, 'cleaning').dueOn).toBe('2026-01-31')
    expect(taskOf({ ...input, cleaningIntervalDays: null }, 'cleaning').dueOn).toBe('2026-04-01')
  })
})

describe('due status', () => {
  it(`due soon within ${DUE_SOON_DAYS} days (common practice); with no window, due on the day and overdue the day after`, () => {
    expect(DUE_SOON_DAYS).toBe(30)
    expect(statusFor('2026-04-10', '2026-03-10')).toBe('ok') // 31 days left
    expect(statusFor('2026-04-09', '2026-03-10')).toBe('due-soon') // 30 days left
    expect(statusFor('2026-03-11', '2026-03-10')).toBe('due-soon') // due tomorrow
    expect(statusFor('2026-03-10', '2026-03-10')).toBe('due') // due today
    expect(statusFor('2026-03-09', '2026-03-10')).toBe('overdue')
    expect(statusFor('2026-03-09', '2026-03-10', 'cleaning')).toBe('overdue')
    expect(statusFor('2026-03-09', '2026-03-10', 'sensitivity')).toBe('overdue')
  })

  // Hand-worked from the frequency definitions (NFPA 72 3.3, 2016 and later; from memory): annual is
  // 9 to 15 months apart, so a functional test last done 2025-01-20 is nominally due 2026-01-20 and
  // still on time through 2026-04-20; semiannual is 4 to 8 months, so a visual check last done
  // 2025-07-05 is nominally due 2026-01-05 and on time through 2026-03-05.
  it('due inside the window the standard allows, overdue after it', () => {
    const f = { ...base, lastFunctionalOn: '2025-01-20' }
    expect(taskOf(f, 'functional', '2026-01-19')).toMatchObject({ status: 'due-soon', overdueAfter: '2026-04-20' })
    expect(taskOf(f, 'functional', '2026-01-20')).toMatchObject({ status: 'due', daysOver: 0, daysOverdue: 0 })
    expect(taskOf(f, 'functional', '2026-04-20')).toMatchObject({ status: 'due', daysOver: 90, daysOverdue: 0 })
    expect(taskOf(f, 'functional', '2026-04-21')).toMatchObject({ status: 'overdue', daysOver: 91, daysOverdue: 1 })
    const v = { ...base, lastVisualOn: '2025-07-05' }
    expect(taskOf(v, 'visual', '2026-03-05')).toMatchObject({ status: 'due', overdueAfter: '2026-03-05' })
    expect(taskOf(v, 'visual', '2026-03-06')).toMatchObject({ status: 'overdue', daysOverdue: 1 })
    expect(taskOf(v, 'visual', '2026-03-06').windowBasis).toMatch(/4 to 8 months.*from memory/)
    expect(taskOf(f, 'functional', '2026-03-06').windowBasis).toMatch(/9 to 15 months.*from memory/)
    // No window for the sensitivity test or the cleaning interval.
    expect(taskOf({ ...base, installedOn: '2025-03-01' }, 'sensitivity', '2026-03-02')).toMatchObject({ dueOn: '2026-03-01', status: 'overdue', daysOverdue: 1 })
    expect(taskOf(base, 'cleaning', '2026-03-10').windowBasis).toMatch(/common practice/)
  })

  // An independent month count (year × 12 + month, day clamped to the month's length) against the
  // engine's window: the last on-time day for an annual task is the nominal date plus 3 months.
  const lastDay = (y: number, m: number) => new Date(Date.UTC(y, m, 0)).getUTCDate() // m is 1-based
  const plusMonths = (iso: string, n: number) => {
    const [y, m, d] = iso.split('-').map(Number)
    const k = y * 12 + (m - 1) + n
    const [yy, mm] = [Math.floor(k / 12), (k % 12) + 1]
    return `${yy}-${String(mm).padStart(2, '0')}-${String(Math.min(d, lastDay(yy, mm))).padStart(2, '0')}`
  }
  it('the status never goes back as the days pass, and matches an independent month count', () => {
    const day = fc.integer({ min: 0, max: 4000 }).map((n) => new Date(Date.UTC(2015, 0, 1) + n * 86_400_000).toISOString().slice(0, 10))
    const rank = { ok: 0, 'due-soon': 1, due: 2, overdue: 3 }
    fc.assert(
      fc.property(day, fc.integer({ min: 0, max: 900 }), fc.integer({ min: 0, max: 400 }), (last, a, b) => {
        const input = { ...base, installedOn: '2014-01-01', lastFunctionalOn: last, lastVisualOn: last }
        const t1 = new Date(Date.parse(last) + a * 86_400_000).toISOString().slice(0, 10)
        const t2 = new Date(Date.parse(t1) + b * 86_400_000).toISOString().slice(0, 10)
        for (const [task, nominal, window] of [['functional', 12, 3], ['visual', 6, 2]] as const) {
          const s1 = taskOf(input, task, t1)
          const s2 = taskOf(input, task, t2)
          expect(rank[s2.status]).toBeGreaterThanOrEqual(rank[s1.status])
          const dueOn = plusMonths(last, nominal)
          const end = plusMonths(dueOn, window)
          expect(s1.dueOn).toBe(dueOn)
          expect(s1.status).toBe(t1 > end ? 'overdue' : t1 >= dueOn ? 'due' : s1.status === 'ok' ? 'ok' : 'due-soon')
        }
      }),
    )
  })

  it('dueTasks lists all four tasks, earliest first', () => {
    const tasks = dueTasks({ ...base, installedOn: '2025-01-01', lastVisualOn: '2026-01-01', lastFunctionalOn: '2025-06-01', lastCleanedOn: '2025-12-01', environment: 'kitchen' }, '2026-03-10')
    expect(tasks.map((t) => t.task)).toEqual(['sensitivity', 'cleaning', 'functional', 'visual'])
    expect(tasks.map((t) => t.dueOn)).toEqual(['2026-01-01', '2026-03-01', '2026-06-01', '2026-07-01'])
  })
})

describe('summarizeDue', () => {
  it('the earliest nominal date, and the worst status of any task', () => {
    const input: ScheduleInput = {
      ...base,
      installedOn: '2020-01-01',
      lastVisualOn: '2026-01-10', // → 2026-07-10
      lastFunctionalOn: '2025-09-01', // → 2026-09-01
      lastSensitivityOn: '2024-06-01', // streak 1 → 2026-06-01
      sensitivityStreak: 1,
      environment: 'kitchen',
      lastCleanedOn: '2026-01-05', // 90 days → 2026-04-05
    }
    expect(summarizeDue(input, '2026-03-10')).toEqual({ nextDueOn: '2026-04-05', dueStatus: 'due-soon' })
    expect(summarizeDue({ ...input, lastCleanedOn: '2026-03-01' }, '2026-03-10')).toEqual({ nextDueOn: '2026-05-30', dueStatus: 'ok' })
    // Visual nominally 2026-02-01, inside its window to 2026-04-01: due, not overdue.
    expect(summarizeDue({ ...input, lastVisualOn: '2025-08-01' }, '2026-03-10')).toEqual({ nextDueOn: '2026-02-01', dueStatus: 'due' })
    expect(summarizeDue({ ...input, lastVisualOn: '2025-07-01' }, '2026-03-10')).toEqual({ nextDueOn: '2026-01-01', dueStatus: 'overdue' })
    // The cleaning (no window) overdue while the earlier visual check is still inside its window.
    expect(summarizeDue({ ...input, lastVisualOn: '2025-08-01', lastCleanedOn: '2025-11-05' }, '2026-03-10')).toEqual({ nextDueOn: '2026-02-01', dueStatus: 'overdue' })
  })
})
