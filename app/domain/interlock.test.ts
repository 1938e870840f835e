import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  ABSENT_MAX_VOLTS,
  diagnoseInterlock,
  LINE_MIN_VOLTS,
  interlockPlan,
  PRESENT_MIN_VOLTS,
  type InterlockMeasurement,
  type InterlockStyle,
} from './interlock'

const STYLES: InterlockStyle[] = ['break-to-stop', 'make-to-stop']
const codes = (m: InterlockMeasurement) => diagnoseInterlock(m).findings.map((f) => f.code)

describe('interlockPlan', () => {
  it('break-to-stop: R to C, NC to the stop input, 24 V normal, 0 V in alarm', () => {
    // Break-to-stop wiring and readings: common practice
    const plan = interlockPlan('break-to-stop')
    expect(plan.contact).toBe('NC')
    expect(plan.wiring).toEqual([
      { from: 'R (24 VAC)', to: 'auxiliary contact C' },
      { from: 'auxiliary contact NC', to: 'unit stop/safety input' },
    ])
    expect(plan.expected).toEqual({ normal: { volts: 24, unitRuns: true }, alarm: { volts: 0, unitRuns: false } })
  })

  it('make-to-stop: R to C, NO to the shutdown input, 0 V normal, 24 V in alarm', () => {
    // Make-to-stop wiring and readings: common practice
    const plan = interlockPlan('make-to-stop', 'R from unit transformer')
    expect(plan.contact).toBe('NO')
    expect(plan.wiring[0]).toEqual({ from: 'R from unit transformer', to: 'auxiliary contact C' })
    expect(plan.wiring[1].from).toBe('auxiliary contact NO')
    expect(plan.expected).toEqual({ normal: { volts: 0, unitRuns: true }, alarm: { volts: 24, unitRuns: false } })
  })

  it.each(STYLES)('%s steps start with notifying and placing the system in test, and end by taking it out', (style) => {
    const { steps } = interlockPlan(style)
    expect(steps[0]).toMatch(/monitoring company/)
    expect(steps[0]).toMatch(/in test/)
    expect(steps.at(-1)).toMatch(/out of test/)
    expect(steps.join(' ')).toMatch(/Leave the alarm and supervisory contacts and all fire alarm wiring alone/)
  })
})

describe('diagnoseInterlock', () => {
  it('thresholds', () => {
    // Present ≥ 18 V, absent ≤ 3 V: common practice
    expect(PRESENT_MIN_VOLTS).toBe(18)
    expect(ABSENT_MAX_VOLTS).toBe(3)
  })

  it('break-to-stop passes on 24 V → 0 V with the unit stopping', () => {
    expect(
      diagnoseInterlock({
        style: 'break-to-stop',
        measured: { normalVolts: 24.6, alarmVolts: 0.2, unitStopped: true },
      }),
    ).toEqual({ verdict: 'pass', findings: [] })
  })

  it('make-to-stop passes on 0 V → 24 V with the unit stopping', () => {
    expect(
      diagnoseInterlock({ style: 'make-to-stop', measured: { normalVolts: 0, alarmVolts: 23.1, unitStopped: true } }),
    ).toEqual({ verdict: 'pass', findings: [] })
  })

  it('is incomplete until every reading is in', () => {
    expect(diagnoseInterlock({ style: 'break-to-stop', measured: {} }).verdict).toBe('incomplete')
    expect(diagnoseInterlock({ style: 'break-to-stop', measured: { normalVolts: 24 } }).verdict).toBe('incomplete')
    expect(diagnoseInterlock({ style: 'make-to-stop', measured: { normalVolts: 0, alarmVolts: 24 } }).verdict).toBe(
      'incomplete',
    )
  })

  it.each(STYLES)('%s wired like the other style', (style) => {
    // The classic miswire: C–NC and C–NO swapped (common practice)
    const plan = interlockPlan(style)
    const m = { style, measured: { normalVolts: plan.expected.alarm.volts, alarmVolts: plan.expected.normal.volts } }
    expect(codes(m)).toEqual(['wired-for-other-style'])
    expect(diagnoseInterlock(m).verdict).toBe('fail')
    expect(codes({ ...m, measured: { ...m.measured, unitStopped: false } })).toEqual([
      'wired-for-other-style',
      'unit-did-not-stop',
    ])
  })

  it('wired-for-other-style with the unit stopping points at the record', () => {
    const d = diagnoseInterlock({
      style: 'make-to-stop',
      measured: { normalVolts: 24, alarmVolts: 0, unitStopped: true },
    })
    expect(d.findings[0].code).toBe('wired-for-other-style')
    expect(d.findings[0].message).toMatch(/record is wrong/)
  })

  it.each(STYLES)('%s with no voltage in either state has no source', (style) => {
    expect(codes({ style, measured: { normalVolts: 0.4, alarmVolts: 0 } })).toEqual(['no-source'])
  })

  it('break-to-stop with no voltage in either state has no source, and cannot run to be stopped', () => {
    expect(codes({ style: 'break-to-stop', measured: { normalVolts: 0.4, alarmVolts: 0, unitStopped: true } })).toEqual(['no-source'])
  })

  it('break-to-stop with 24 V in both states never stops', () => {
    expect(codes({ style: 'break-to-stop', measured: { normalVolts: 24, alarmVolts: 24 } })).toEqual([
      'unit-did-not-stop',
    ])
    expect(
      codes({ style: 'break-to-stop', measured: { normalVolts: 24, alarmVolts: 24, unitStopped: false } }),
    ).toEqual(['unit-did-not-stop'])
  })

  it('make-to-stop with 24 V in both states is stuck stopped', () => {
    expect(codes({ style: 'make-to-stop', measured: { normalVolts: 24, alarmVolts: 24, unitStopped: true } })).toEqual([
      'stuck-stopped',
    ])
  })

  it('make-to-stop with 24 V in normal alone is stuck stopped', () => {
    expect(codes({ style: 'make-to-stop', measured: { normalVolts: 24 } })).toEqual(['stuck-stopped'])
  })

  it('break-to-stop with no voltage in normal alone has no source', () => {
    expect(codes({ style: 'break-to-stop', measured: { normalVolts: 0 } })).toEqual(['no-source'])
  })

  it.each(STYLES)('%s: right voltages but the unit kept running', (style) => {
    const plan = interlockPlan(style)
    const d = diagnoseInterlock({
      style,
      measured: { normalVolts: plan.expected.normal.volts, alarmVolts: plan.expected.alarm.volts, unitStopped: false },
    })
    expect(d.verdict).toBe('fail')
    expect(d.findings.map((f) => f.code)).toEqual(['unit-did-not-stop'])
    expect(d.findings[0].message).toMatch(/changed as expected/)
  })

  it.each([
    [10, 'normal'],
    [17.9, 'normal'],
    [3.1, 'alarm'],
  ])('%f V in the %s state is unexpected', (volts, state) => {
    // Between 3 V and 18 V: neither present nor absent (common practice)
    const measured =
      state === 'normal'
        ? { normalVolts: volts, alarmVolts: 0, unitStopped: true }
        : { normalVolts: 24, alarmVolts: volts, unitStopped: true }
    const d = diagnoseInterlock({ style: 'break-to-stop', measured })
    expect(d.verdict).toBe('fail')
    expect(d.findings.map((f) => f.code)).toEqual(['unexpected-voltage'])
  })

  it('the band edges count as present and absent', () => {
    // ≥ 18 V present, ≤ 3 V absent (common practice)
    expect(
      diagnoseInterlock({ style: 'break-to-stop', measured: { normalVolts: 18, alarmVolts: 3, unitStopped: true } })
        .verdict,
    ).toBe('pass')
  })

  it('property: each plan’s own expected voltages, with the unit stopping, pass', () => {
    fc.assert(
      fc.property(fc.constantFrom(...STYLES), fc.string(), (style, source) => {
        const plan = interlockPlan(style, source || undefined)
        const d = diagnoseInterlock({
          style,
          measured: {
            normalVolts: plan.expected.normal.volts,
            alarmVolts: plan.expected.alarm.volts,
            unitStopped: true,
          },
        })
        expect(d).toEqual({ verdict: 'pass', findings: [] })
      }),
    )
  })

  it('property: any reading inside the bands for the plan passes', () => {
    const present = fc.double({ min: PRESENT_MIN_VOLTS, max: 30, noNaN: true })
    const absent = fc.double({ min: 0, max: ABSENT_MAX_VOLTS, noNaN: true })
    fc.assert(
      fc.property(fc.constantFrom(...STYLES), present, absent, (style, on, off) => {
        const plan = interlockPlan(style)
        const pick = (v: 24 | 0) => (v === 24 ? on : off)
        const d = diagnoseInterlock({
          style,
          measured: {
            normalVolts: pick(plan.expected.normal.volts),
            alarmVolts: pick(plan.expected.alarm.volts),
            unitStopped: true,
          },
        })
        expect(d.verdict).toBe('pass')
      }),
    )
  })

  it('line voltage on the 24 V input is its own finding, never read as "24 V present"', () => {
    // A Class 2 circuit is at most 30 V (NEC Chapter 9 Table 11(A)); 120 V is line voltage (common practice)
    expect(LINE_MIN_VOLTS).toBe(30)
    const d = diagnoseInterlock({ style: 'break-to-stop', measured: { normalVolts: 121, alarmVolts: 0, unitStopped: true } })
    expect(d.verdict).toBe('fail')
    expect(d.findings.map((f) => f.code)).toEqual(['line-voltage'])
    expect(d.findings[0].message).toMatch(/normal 121 V/)
    expect(d.findings[0].message).toMatch(/Stop the test and keep clear/)
    // 28 V is an unloaded 24 VAC transformer (common practice), not line voltage.
    expect(diagnoseInterlock({ style: 'break-to-stop', measured: { normalVolts: 28, alarmVolts: 0, unitStopped: true } }).verdict).toBe('pass')
    expect(codes({ style: 'make-to-stop', measured: { normalVolts: 0, alarmVolts: 208, unitStopped: true } })).toEqual(['line-voltage'])
  })

  it.each(STYLES)('%s: a detector that did not trip is named, and the unit is not blamed for running on', (style) => {
    const plan = interlockPlan(style)
    const same = plan.expected.normal.volts
    const d = diagnoseInterlock({ style, measured: { normalVolts: same, alarmVolts: same, unitStopped: false, detectorTripped: false } })
    expect(d.verdict).toBe('fail')
    expect(d.findings.map((f) => f.code)).toEqual(['detector-did-not-trip'])
    expect(d.findings[0].message).toMatch(/detector did not trip/)
  })

  it.each(STYLES)('%s: a unit that stopped is never reported as not stopping', (style) => {
    const plan = interlockPlan(style)
    const same = plan.expected.normal.volts
    const d = diagnoseInterlock({ style, measured: { normalVolts: same, alarmVolts: same, unitStopped: true } })
    expect(d.findings.map((f) => f.code)).toEqual(['input-did-not-change'])
    expect(d.findings[0].message).toMatch(/The unit stopped/)
  })

  it('property: with the unit seen stopping, no reading ever yields "unit did not stop"', () => {
    const volts = fc.option(fc.double({ min: 0, max: 300, noNaN: true }), { nil: undefined })
    fc.assert(
      fc.property(fc.constantFrom(...STYLES), volts, volts, fc.option(fc.boolean(), { nil: undefined }), (style, normalVolts, alarmVolts, detectorTripped) => {
        expect(codes({ style, measured: { normalVolts, alarmVolts, unitStopped: true, detectorTripped } })).not.toContain('unit-did-not-stop')
      }),
    )
  })

  it('property: any reading over 30 V fails as line voltage', () => {
    // NEC Chapter 9 Table 11(A): Class 2 at most 30 V
    fc.assert(
      fc.property(fc.constantFrom(...STYLES), fc.double({ min: 30.01, max: 600, noNaN: true }), fc.boolean(), (style, high, atNormal) => {
        const plan = interlockPlan(style)
        const measured = atNormal ? { normalVolts: high, alarmVolts: plan.expected.alarm.volts, unitStopped: true } : { normalVolts: plan.expected.normal.volts, alarmVolts: high, unitStopped: true }
        const d = diagnoseInterlock({ style, measured })
        expect(d.verdict).toBe('fail')
        expect(d.findings[0].code).toBe('line-voltage')
      }),
    )
  })
})
