import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { decodeReasons, deriveDetector, encodeReasons, recentTroubles, workFacts, type DetectorRecord, type TaskResult } from './derive'
import type { Arrangement } from './loop'

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
const policy = { delayPolicySeconds: 0 }
const r = (task: TaskResult['task'], doneOn: string, outcome: TaskResult['outcome'] = 'pass'): TaskResult => ({ task, doneOn, outcome })
const derive = (results: TaskResult[], today: string, o: Partial<DetectorRecord> = {}, troubles: string[] = []) =>
  deriveDetector(record(o), policy, { results, loopReadings: {}, troubles }, today)

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

  it('scores an overdue detector with the overdue reason, its days counted from the earliest task', () => {
    // Visual due 2026-07-10; on 2026-09-08 it is 60 days late: 10 points + 2 per whole month (product weights).
    const d = derive([r('functional', '2026-01-10'), r('visual', '2026-01-10'), r('cleaning', '2026-01-10'), r('sensitivity', '2025-06-01')], '2026-09-08')
    expect(d.stored.dueStatus).toBe('overdue')
    expect(decodeReasons(d.stored.riskReasons)).toEqual(['overdue'])
    expect(d.stored.riskScore).toBe(14)
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
    expect(deriveDetector(record({ delaySeconds: 180 }), { delayPolicySeconds: 0 }, { results: [], loopReadings: {}, troubles: [] }, '2026-01-01').stored.delayAgreement).toBe('disagree')
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
