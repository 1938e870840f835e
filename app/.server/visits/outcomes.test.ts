import { describe, expect, it } from 'vitest'
import type { DetectorEntry } from '~/domain/visit-forms'
import { entryFromRow, eventKind, findingsOf, taskOutcomes } from './outcomes'

const entry = (e: Partial<DetectorEntry>): DetectorEntry => ({ detectorId: 7, result: 'pass', ...e })
const outcomes = (tasks: Parameters<typeof taskOutcomes>[0], e: Partial<DetectorEntry>) =>
  Object.fromEntries(taskOutcomes(tasks, entry(e)).map((o) => [o.task, o.outcome]))

describe('task outcomes of a detector entry', () => {
  it('passes every task done on a pass, and writes no cleaning that was not done', () => {
    expect(outcomes(['visual', 'functional', 'cleaning'], { cleaned: true })).toEqual({ visual: 'pass', functional: 'pass', cleaning: 'pass' })
    expect(outcomes(['visual', 'cleaning'], { cleaned: false })).toEqual({ visual: 'pass' })
  })

  it('fails the tests the findings show failed, and only those', () => {
    const noShutdown = { result: 'fail' as const, reason: 'Fan kept running', functional: { signalAtPanel: 'alarm' as const, unitShutDown: false, resetOk: true } }
    expect(outcomes(['visual', 'functional', 'shutdown', 'test-station'], { ...noShutdown, testStationWorked: true })).toEqual({
      visual: 'pass',
      functional: 'fail',
      shutdown: 'fail',
      'test-station': 'pass',
    })
    expect(outcomes(['functional', 'test-station'], { result: 'fail', reason: 'Key switch dead', testStationWorked: false, functional: { signalAtPanel: 'alarm', unitShutDown: true, resetOk: true } })).toEqual({
      functional: 'pass',
      'test-station': 'fail',
    })
  })

  it('fails the first test covered when the technician failed a detector the findings do not explain', () => {
    expect(outcomes(['visual', 'sensitivity', 'functional'], { result: 'fail', reason: 'Head cracked', sensitivityPctFt: 2.1 })).toEqual({ visual: 'pass', sensitivity: 'pass', functional: 'fail' })
    expect(outcomes(['visual', 'cleaning'], { result: 'fail', reason: 'Housing broken', cleaned: true })).toEqual({ visual: 'fail', cleaning: 'pass' })
    // A failure always lands on a task, even when the only task was a cleaning not done.
    expect(outcomes(['cleaning'], { result: 'fail', reason: 'Sampling tube missing', cleaned: false })).toEqual({ cleaning: 'fail' })
  })

  it('writes nothing for a detector not tested, and keeps the sensitivity reading as the value', () => {
    expect(taskOutcomes(['visual', 'functional'], entry({ result: 'not-tested', reason: 'Roof closed' }))).toEqual([])
    expect(taskOutcomes(['sensitivity'], entry({ sensitivityPctFt: 1.8 }))).toEqual([{ task: 'sensitivity', outcome: 'pass', value: 1.8 }])
    expect(eventKind(taskOutcomes(['visual', 'cleaning'], entry({ cleaned: true })))).toBe('cleaning')
    expect(eventKind(taskOutcomes(['visual', 'functional', 'cleaning'], entry({ cleaned: true })))).toBe('test')
  })

  it('reads a saved entry back as it was recorded', () => {
    const saved = entry({ result: 'not-tested', reason: 'Locked out', loop: { normal: 'open' }, loopReadBy: 'Ines Varga, Northpoint Alarm Co.', notes: 'Call the site' })
    const row = { detectorId: 7, result: 'skipped', resultReason: 'Locked out', notes: 'Call the site', findings: JSON.stringify(findingsOf(saved)) }
    expect(entryFromRow(row)).toEqual(saved)
    expect(entryFromRow({ ...row, result: 'pending' })).toBeNull()
  })

  it('fails the station check on a station that did not trip or reset, and a functional test on a head that did not trip', () => {
    const f = { signalAtPanel: 'alarm' as const, unitShutDown: true, resetOk: true }
    expect(outcomes(['functional', 'test-station'], { result: 'fail', reason: 'Station not wired', functional: f, testStationWorked: true, testStationReset: false })).toEqual({ functional: 'pass', 'test-station': 'fail' })
    expect(outcomes(['functional'], { result: 'fail', reason: 'Head 2 dead', functional: f, heads: [{ head: 1, tripped: true }, { head: 2, tripped: false }] })).toEqual({ functional: 'fail' })
  })

  it('on a two-head module counts the cleaning only when both heads were cleaned', () => {
    const halfCleaned = entry({ cleaned: true, heads: [{ head: 1, cleaned: true }, { head: 2, cleaned: false }] })
    expect(taskOutcomes(['visual', 'cleaning'], halfCleaned, 2).map((o) => o.task)).toEqual(['visual'])
    const both = entry({ heads: [{ head: 1, cleaned: true }, { head: 2, cleaned: true }] })
    expect(taskOutcomes(['visual', 'cleaning'], both, 2).map((o) => o.task)).toEqual(['visual', 'cleaning'])
  })
})
