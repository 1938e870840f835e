import { describe, expect, it } from 'vitest'
import { cleanedAll, entryRefusals, fieldChecks, tasksWithStation, type FieldCheckInput } from './field-checks'

const base: FieldCheckInput = { testStation: 'none', headsFitted: 1, notTested: false, functionalRecorded: true }
const codes = (i: Partial<FieldCheckInput>) => fieldChecks({ ...base, ...i }).map((c) => c.code)

// A fitted remote test station is operated at each functional test; one that does not trip or reset
// the detector is a finding (common practice).
describe('remote test station', () => {
  it('must be operated at each functional test where one is fitted', () => {
    expect(codes({ testStation: 'key' })).toEqual(['station-not-checked'])
    expect(fieldChecks({ ...base, testStation: 'key' })[0].missing).toBe(true)
    expect(codes({ testStation: 'key', functionalRecorded: false })).toEqual([])
    expect(codes({ testStation: 'none' })).toEqual([])
    expect(codes({ testStation: 'magnet', notTested: true })).toEqual([])
  })

  it('names a station that did not trip the detector "station not wired"', () => {
    const [c] = fieldChecks({ ...base, testStation: 'key', testStationWorked: false })
    expect(c.code).toBe('station-not-wired')
    expect(c.message).toMatch(/^Station not wired: /)
    expect(c.missing).toBeUndefined()
  })

  it('names a station that tripped but did not reset the detector', () => {
    expect(codes({ testStation: 'magnet', testStationWorked: true, testStationReset: false })).toEqual(['station-no-reset'])
    expect(codes({ testStation: 'magnet', testStationWorked: true, testStationReset: true })).toEqual([])
    expect(codes({ testStation: 'magnet', testStationWorked: true })).toEqual([])
  })

  it('writes its own result with the functional test', () => {
    expect(tasksWithStation(['visual', 'functional'], 'key', true)).toEqual(['visual', 'functional', 'test-station'])
    expect(tasksWithStation(['visual', 'functional'], 'key', false)).toEqual(['visual', 'functional'])
    expect(tasksWithStation(['visual'], 'key', true)).toEqual(['visual'])
    expect(tasksWithStation(['functional', 'test-station'], 'magnet', true)).toEqual(['functional', 'test-station'])
    expect(tasksWithStation(['functional'], 'none', true)).toEqual(['functional'])
  })
})

describe('two heads on one module', () => {
  it('asks for each head’s own test and cleaning', () => {
    expect(codes({ headsFitted: 2 })).toEqual(['head-not-tested', 'head-not-tested'])
    expect(codes({ headsFitted: 2, heads: [{ head: 1, tripped: true }] })).toEqual(['head-not-tested'])
    expect(codes({ headsFitted: 2, heads: [{ head: 1, tripped: true }, { head: 2, tripped: true }] })).toEqual([])
    expect(codes({ headsFitted: 2, cleaned: true, heads: [{ head: 1, tripped: true, cleaned: true }, { head: 2, tripped: true }] })).toEqual(['head-not-cleaned'])
    expect(fieldChecks({ ...base, headsFitted: 2 }).map((c) => c.field)).toEqual(['heads.1.tripped', 'heads.2.tripped'])
  })

  it('names the head that did not trip', () => {
    const checks = fieldChecks({ ...base, headsFitted: 2, heads: [{ head: 1, tripped: true }, { head: 2, tripped: false }] })
    expect(checks.map((c) => c.code)).toEqual(['head-did-not-trip'])
    expect(checks[0].message).toMatch(/^Head 2 did not put the module into alarm/)
  })

  it('counts a cleaning only when every head was cleaned', () => {
    expect(cleanedAll({ heads: [{ head: 1, cleaned: true }, { head: 2, cleaned: true }] }, 2)).toBe(true)
    expect(cleanedAll({ heads: [{ head: 1, cleaned: true }, { head: 2, cleaned: false }] }, 2)).toBe(false)
    expect(cleanedAll({ cleaned: true, heads: [{ head: 1, cleaned: true }] }, 2)).toBe(true)
    expect(cleanedAll({ cleaned: false }, 1)).toBe(false)
    expect(cleanedAll({ cleaned: true, heads: [{ head: 1, cleaned: false }] }, 1)).toBe(true)
  })

  it('a one-head module asks nothing per head', () => {
    expect(codes({ headsFitted: 1, cleaned: true })).toEqual([])
  })
})

describe('entryRefusals', () => {
  it('refuses what is left out, and a pass over a fault; a fail with the fault recorded is accepted', () => {
    const notWired = fieldChecks({ ...base, testStation: 'key', testStationWorked: false })
    expect(entryRefusals(notWired, 'fail')).toEqual([])
    expect(entryRefusals(notWired, 'pass')[0]).toMatch(/^Marked as passed, but: Station not wired/)
    const missing = fieldChecks({ ...base, testStation: 'key' })
    expect(entryRefusals(missing, 'fail')).toEqual([missing[0].message])
  })
})
