import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { decodeReasons, deriveDetector, encodeReasons, recentTroubles, workFacts, type DetectorRecord, type TaskResult } from './derive'
import type { Arrangement, Readings } from './loop'

// A correctly wired tamper-circuit loop: resistor through the supervisory contact, alarm on NO
// (the arrangement the trade describes; common practice). 18 AWG solid, 100 ft each way.
const goodLoop: Arrangement = {
  eolOhms: 4_700,
  eolPlacement: 'through-supervisory',
  alarmTerminal: 'NO',
  supervisoryTerminal: 'NO',
  supervisoryLabelledIn: 'de-energized',
  conductor: { awg: 18, stranded: false, oneWayFeet: 100 },
  measuredAt: 'panel',
}

const record = (o: Partial<DetectorRecord> = {}): DetectorRecord => ({
  installedOn: '2010-03-01',
  environment: 'clean',
  housing: 'standard',
  state: 'normal',
  delaySeconds: 0,
  cleaningIntervalDays: null,
  arrangement: goodLoop,
  ...o,
})
const policy = { delayPolicySeconds: 0, nuisanceRecordsKept: true }
const r = (task: TaskResult['task'], doneOn: string, outcome: TaskResult['outcome'] = 'pass'): TaskResult => ({ task, doneOn, outcome })
const derive = (results: TaskResult[], today: string, o: Partial<DetectorRecord> = {}, troubles: string[] = [], loopReadings: Readings = {}) =>
  deriveDetector(record(o), policy, { results, loopReadings, troubles }, today)

// Readings of the good loop above, at the panel: 4,700 Ω plus 200 ft of 18 AWG solid at 7.77 Ω per
// 1,000 ft (NEC Chapter 9 Table 8) = 4,701.6 Ω in normal; the alarm contact's short plus the same
// 1.6 Ω; open in trouble and powered down, which is what proves supervision.
const proven: Readings = { normal: 4_701.6, alarm: 1.6, trouble: 'open', unpowered: 'open' }

describe('workFacts: the record follows its history', () => {
  it('takes the latest result of each task, whatever order the history comes in', () => {
    const history = [r('functional', '2025-05-02'), r('visual', '2026-01-10'), r('functional', '2026-01-10'), r('cleaning', '2025-11-20'), r('visual', '2025-07-01')]
    const facts = workFacts(history)
    expect(facts).toMatchObject({ lastVisualOn: '2026-01-10', lastFunctionalOn: '2026-01-10', lastCleanedOn: '2025-11-20', lastSensitivityOn: null })
    expect(workFacts([...history].reverse())).toEqual(facts)
  })

  it('counts in-range sensitivity tests back from the latest, and a failure resets the streak', () => {
    expect(workFacts([r('sensitivity', '2011-03-01'), r('sensitivity', '2013-03-01'), r('sensitivity', '2015-03-01')]).sensitivityStreak).toBe(3)
    expect(workFacts([r('sensitivity', '2011-03-01'), r('sensitivity', '2013-03-01', 'fail'), r('sensitivity', '2015-03-01')]).sensitivityStreak).toBe(1)
    expect(workFacts([r('sensitivity', '2011-03-01'), r('sensitivity', '2013-03-01'), r('sensitivity', '2015-03-01', 'fail')]).sensitivityStreak).toBe(0)
  })

  it('takes the last result from the latest functional or sensitivity test, a failure winning on the same day', () => {
    expect(workFacts([r('functional', '2026-01-10', 'fail'), r('functional', '2026-03-01')]).lastResult).toBe('pass')
    expect(workFacts([r('functional', '2026-03-01'), r('sensitivity', '2026-03-01', 'fail')]).lastResult).toBe('fail')
    // A visual inspection or a cleaning is not a test of the detector's operation.
    expect(workFacts([r('functional', '2026-01-10', 'fail'), r('visual', '2026-03-01')]).lastResult).toBe('fail')
    expect(workFacts([]).lastResult).toBeNull()
  })
})

describe('deriveDetector', () => {
  it('follows the NFPA 72 worked example for sensitivity: installed 2010, tested 2011, 2013, 2015, next 2020', () => {
    // NFPA 72 14.4.5.3.1–.2 worked example (read, citing the 2010 edition); nuisance records kept.
    const d = derive([r('sensitivity', '2011-03-01'), r('sensitivity', '2013-03-01'), r('sensitivity', '2015-03-01')], '2016-01-01')
    expect(d.stored.nextSensitivityOn).toBe('2020-03-01')
    expect(d.stored.sensitivityStreak).toBe(3)
  })

  it('falls due a year after a functional test and six months after a visual inspection', () => {
    // NFPA 72 Chapter 14: functional test annually, visual inspection semiannually (reproduced tables).
    const d = derive([r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')], '2026-03-01')
    expect(d.stored.nextFunctionalOn).toBe('2027-01-10')
    expect(d.stored.nextVisualOn).toBe('2026-07-10')
    // Clean air: cleaning every 365 days (common practice).
    expect(d.stored.nextCleaningOn).toBe('2027-01-10')
    expect(d.stored.nextDueOn).toBe('2026-07-10')
    expect(d.stored.dueStatus).toBe('ok')
    // Twenty days before the visual inspection falls due: within the 30-day planning window (common practice).
    expect(derive([r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')], '2026-06-20').stored.dueStatus).toBe('due-soon')
  })

  // Hand-worked: visual last done 2026-01-10 → nominal 2026-07-10; semiannual allows up to 8 months
  // between inspections (NFPA 72 3.3 frequency definitions, 2016 and later; from memory), so the
  // window runs to 2026-09-10. On 2026-09-08 it is due, not overdue; on 2026-11-09 it is 60 days past
  // the window: 8 points for a visual check + 2 steps of 30 days × 2 = 12 (product weights).
  it('a task past its nominal date is due inside the window, overdue after it, and the reason names it', () => {
    const history = [r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')]
    const due = derive(history, '2026-09-08', {}, [], proven)
    expect(due.stored.dueStatus).toBe('due')
    expect(due.stored.riskReasons).toBe('')
    expect(derive(history, '2026-09-10', {}, [], proven).stored.dueStatus).toBe('due')
    expect(derive(history, '2026-09-11', {}, [], proven).stored.dueStatus).toBe('overdue')
    const late = derive(history, '2026-11-09', {}, [], proven)
    expect(late.stored.dueStatus).toBe('overdue')
    expect(decodeReasons(late.stored.riskReasons)).toEqual(['overdue'])
    expect(late.stored.riskScore).toBe(12)
    expect(late.reasons[0].text).toBe('Visual inspection overdue by 60 days')
  })

  // Hand-worked: visual done 2026-01-10 (nominal 2026-07-10, window to 2026-09-10); kitchen cleaning
  // done 2026-05-01, every 90 days (common practice) → 2026-07-30, no window. On 2026-08-15 the
  // visual check is still inside its window but the cleaning is 16 days overdue: the detector is
  // overdue though its earliest task is not, and the reason names the cleaning: 6 points.
  it('the detector takes the worst status of its tasks, not the earliest task\'s', () => {
    const d = derive([r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-05-01'), r('sensitivity', '2025-06-01')], '2026-08-15', { environment: 'kitchen' }, [], proven)
    expect(d.stored.nextDueOn).toBe('2026-07-10')
    expect(d.stored.dueStatus).toBe('overdue')
    expect(d.reasons).toEqual([{ code: 'overdue', points: 6, text: 'Cleaning overdue by 16 days' }])
  })

  it('ignores results dated before the detector was installed', () => {
    // Installed 2026-03-01; a functional test on 2026-02-20 belongs to something else: the test is
    // still owed from installation (due 2027-03-01), and its fail does not stand as the last result.
    const d = derive([r('functional', '2026-02-20', 'fail'), r('visual', '2026-03-01')], '2026-04-01', { installedOn: '2026-03-01' }, [], proven)
    expect(d.stored.lastFunctionalOn).toBeNull()
    expect(d.stored.lastResult).toBeNull()
    expect(d.stored.nextFunctionalOn).toBe('2027-03-01')
    expect(d.stored.lastVisualOn).toBe('2026-03-01') // the installation day itself counts
  })

  it('the 5-year sensitivity interval only where the site keeps nuisance-alarm records', () => {
    // Worked example (NFPA 72 14.4.5.3.1–.2, read, citing the 2010 edition): 2011, 2013, 2015 → 2020
    // with records kept; without them every alternate year applies → 2017.
    const history = [r('sensitivity', '2011-03-01'), r('sensitivity', '2013-03-01'), r('sensitivity', '2015-03-01')]
    const kept = deriveDetector(record(), { delayPolicySeconds: 0, nuisanceRecordsKept: true }, { results: history, loopReadings: proven, troubles: [] }, '2016-01-01')
    const notKept = deriveDetector(record(), { delayPolicySeconds: 0, nuisanceRecordsKept: false }, { results: history, loopReadings: proven, troubles: [] }, '2016-01-01')
    expect(kept.stored.nextSensitivityOn).toBe('2020-03-01')
    expect(notKept.stored.nextSensitivityOn).toBe('2017-03-01')
    expect(notKept.schedule.find((t) => t.task === 'sensitivity')!.basis).toMatch(/no nuisance-alarm records/)
  })

  it('a miswire that failed the test and the readings counts once', () => {
    // Alarm contact recorded on NC, and the functional test on it failed: one fault behind both.
    const d = derive([r('functional', '2026-01-10', 'fail'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')], '2026-02-01', { arrangement: { ...goodLoop, alarmTerminal: 'NC' } })
    expect(decodeReasons(d.stored.riskReasons)).toEqual(['failed-diagnosis', 'failed-test'])
    expect(d.stored.riskScore).toBe(25)
  })

  it('a loop with no reading in trouble or powered down has unproven supervision', () => {
    const noProof = { normal: proven.normal, alarm: proven.alarm }
    const d = derive([r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')], '2026-02-01', {}, [], noProof)
    expect(d.stored.loopVerdict).toBe('incomplete')
    expect(d.reasons).toEqual([{ code: 'supervision-unproven', points: 8, text: expect.stringMatching(/never shown to report trouble/) }])
    expect(derive([r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')], '2026-02-01', {}, [], proven).stored.riskReasons).toBe('')
  })

  it('flags a recorded miswire from the record alone, with no readings taken', () => {
    // Alarm contact on NC: the panel sees a short at rest (common practice; the loop model's own finding).
    const d = derive([r('functional', '2026-01-10')], '2026-02-01', { arrangement: { ...goodLoop, alarmTerminal: 'NC' } })
    expect(d.stored.loopVerdict).toBe('fail')
    expect(d.stored.loopFindings).toBe('alarm-on-nc')
    expect(decodeReasons(d.stored.riskReasons)).toContain('failed-diagnosis')
    expect(d.reasons.find((x) => x.code === 'failed-diagnosis')?.points).toBe(25)
  })

  it('leaves a correct loop with no readings incomplete, not failed', () => {
    expect(derive([], '2026-02-01').stored.loopVerdict).toBe('incomplete')
  })

  it('counts troubles in the 30 days ending today, and ages them out', () => {
    const troubles = ['2026-05-17T09:00:00.000Z', '2026-05-16T23:59:00.000Z', '2026-06-15T01:00:00.000Z']
    // 2026-06-15 back 29 days is 2026-05-17: the first and last count, the second is a day too old.
    expect(recentTroubles(troubles, '2026-06-15')).toBe(2)
    expect(recentTroubles(troubles, '2026-07-20')).toBe(0)
    const d = derive([], '2026-06-15', {}, troubles)
    expect(d.stored.troubles30d).toBe(2)
    expect(decodeReasons(d.stored.riskReasons)).toContain('repeated-troubles')
  })

  it('audits the reporting delay against the site policy', () => {
    expect(derive([], '2026-01-01', { delaySeconds: null }).stored.delayAgreement).toBe('unknown')
    expect(deriveDetector(record({ delaySeconds: 180 }), { delayPolicySeconds: 0, nuisanceRecordsKept: true }, { results: [], loopReadings: {}, troubles: [] }, '2026-01-01').stored.delayAgreement).toBe('disagree')
  })

  it('stores reason codes sorted and fenced by commas so one code filters with LIKE', () => {
    expect(encodeReasons(['overdue', 'failed-test'])).toBe(',failed-test,overdue,')
    expect(encodeReasons([])).toBe('')
    expect(decodeReasons(',failed-test,overdue,')).toEqual(['failed-test', 'overdue'])
  })

  it('ends the sensitivity streak on a day that holds a fail, whichever order that day was stored in', () => {
    const pass = { task: 'sensitivity', doneOn: '2015-05-24', outcome: 'pass' } as const
    const fail = { task: 'sensitivity', doneOn: '2015-05-24', outcome: 'fail' } as const
    expect(derive([pass, fail], '2016-01-01', {}).stored.sensitivityStreak).toBe(0)
    expect(derive([fail, pass], '2016-01-01', {}).stored.sensitivityStreak).toBe(0)
  })

  it('gives the same facts for any order of the same history, and the score is the sum of its reasons', () => {
    const day = fc.integer({ min: 0, max: 3000 }).map((n) => new Date(Date.UTC(2015, 0, 1) + n * 86_400_000).toISOString().slice(0, 10))
    const result = fc.record({ task: fc.constantFrom('visual', 'functional', 'sensitivity', 'cleaning' as const), doneOn: day, outcome: fc.constantFrom('pass', 'fail' as const) })
    fc.assert(
      fc.property(fc.array(result, { maxLength: 20 }), fc.constantFrom('clean', 'dusty', 'kitchen', 'humid' as const), (history, environment) => {
        const a = derive(history, '2024-06-01', { environment })
        const b = derive([...history].reverse(), '2024-06-01', { environment })
        expect(b.stored).toEqual(a.stored)
        expect(a.stored.riskScore).toBe(a.reasons.reduce((s, x) => s + x.points, 0))
        expect(a.stored.nextDueOn <= a.stored.nextVisualOn && a.stored.nextDueOn <= a.stored.nextCleaningOn).toBe(true)
      }),
    )
  })
})
