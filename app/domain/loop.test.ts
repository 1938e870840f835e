import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { AWG_SIZES, type Awg } from './conductors'
import { DETECTOR_STATES, type DetectorState } from './contacts'
import { correctTerminals, diagnose, expectedReadings, type Arrangement, type FindingCode, type Readings } from './loop'

// EOL values in use run from about 1 kΩ to tens of kΩ (common practice); 15 kΩ is one seen in the field.
const base: Arrangement = {
  eolOhms: 15_000,
  eolPlacement: 'through-supervisory',
  alarmTerminal: 'NO',
  supervisoryTerminal: 'NO',
  conductor: { awg: 18, stranded: true, oneWayFeet: 250 },
  measuredAt: 'panel',
}

/** What a meter would show for each state, given the expected table. */
function readingsFrom(expected: ReturnType<typeof expectedReadings>): Readings {
  return Object.fromEntries(DETECTOR_STATES.map((s) => [s, 'open' in expected[s] ? 'open' : expected[s].ohms])) as Readings
}

const labelling = fc.constantFrom('de-energized' as const, 'normal' as const)
const correctArrangement = fc
  .record({
    eolOhms: fc.integer({ min: 1_000, max: 47_000 }),
    awg: fc.constantFrom(...AWG_SIZES),
    stranded: fc.boolean(),
    // ≤ 3,000 ft keeps 18 AWG stranded under the 100 Ω line limit (2 × 3,000 × 7.95/1000 = 47.7 Ω).
    oneWayFeet: fc.integer({ min: 1, max: 3_000 }),
    measuredAt: fc.constantFrom('panel' as const, 'device' as const),
    labelling,
  })
  .map(
    (r): Arrangement => ({
      eolOhms: r.eolOhms,
      eolPlacement: 'through-supervisory',
      ...correctTerminals(r.labelling),
      supervisoryLabelledIn: r.labelling,
      conductor: { awg: r.awg as Awg, stranded: r.stranded, oneWayFeet: r.oneWayFeet },
      measuredAt: r.measuredAt,
    }),
  )

describe('expected loop readings', () => {
  it('tamper circuit: EOL plus wire in normal, short in alarm, open in trouble and power-off', () => {
    // 250 ft of 18 AWG stranded at 7.95 Ω/kft (NEC Chapter 9 Table 8): 3.975 Ω of wire.
    const e = expectedReadings(base)
    expect(e.normal).toEqual({ ohms: 15_003.98, min: 13_503.98, max: 16_503.97 })
    expect(e.alarm).toMatchObject({ ohms: 3.98, min: 0 })
    expect(e.trouble).toEqual({ open: true })
    expect(e.unpowered).toEqual({ open: true })
  })

  it('measured at the device, the wire adds nothing', () => {
    expect(expectedReadings({ ...base, measuredAt: 'device' }).normal).toMatchObject({ ohms: 15_000 })
  })

  it('EOL across the pair keeps showing the resistor in trouble', () => {
    const e = expectedReadings({ ...base, eolPlacement: 'across-pair' })
    expect(e.trouble).toMatchObject({ ohms: 15_003.98 })
  })
})

describe('diagnosis', () => {
  it('passes the worked request and says incomplete when supervision was not proven', () => {
    expect(diagnose(base, { normal: 15_420, alarm: 6.4, trouble: 'open', unpowered: 'open' }).verdict).toBe('pass')
    const partial = diagnose(base, { normal: 15_420, alarm: 6.4 })
    expect(partial.verdict).toBe('incomplete')
    expect(partial.findings).toEqual([])
  })

  it('names a wrong EOL value with the value it sees', () => {
    const d = diagnose(base, { normal: 4_704, alarm: 4, trouble: 'open' })
    expect(d.findings.map((f) => f.code)).toEqual(['eol-wrong-value'])
    expect(d.findings[0].message).toContain('4.7 kΩ')
  })

  it('flags a run over the panel’s line limit from the arrangement alone', () => {
    // 18 AWG solid, 7,000 ft one way: 2 × 7,000 × 7.77 / 1000 = 108.8 Ω > 100 Ω (common practice limit).
    const d = diagnose({ ...base, conductor: { awg: 18, stranded: false, oneWayFeet: 7_000 } }, {})
    expect(d.findings.map((f) => f.code)).toEqual(['line-resistance-high'])
  })

  it('calls readings that fit no single miswire unexplained', () => {
    const d = diagnose(base, { normal: 15_004, alarm: 'open' })
    expect(d.verdict).toBe('fail')
    expect(d.findings).toEqual([expect.objectContaining({ code: 'unexplained', state: 'alarm' })])
  })

  it('names no wiring fault the readings do not show when only the record is wrong', () => {
    const d = diagnose({ ...base, alarmTerminal: 'NC' }, { alarm: 5, trouble: 'open' })
    expect(d.findings.map((f) => f.code)).toEqual(['alarm-on-nc'])
  })

  it('defers to the fire alarm contractor in every finding', () => {
    const d = diagnose({ ...base, alarmTerminal: 'NC', eolPlacement: 'across-pair' }, { normal: 3, alarm: 'open' })
    for (const f of d.findings) expect(f.message).toMatch(/fire alarm contractor/)
  })

  it('property: a correct arrangement’s own expected readings pass, for every EOL, conductor and run', () => {
    fc.assert(
      fc.property(correctArrangement, (a) => {
        const d = diagnose(a, readingsFrom(expectedReadings(a)))
        expect(d.findings).toEqual([])
        expect(d.verdict).toBe('pass')
      }),
      { numRuns: 300 },
    )
  })

  it('property: readings within tolerance still pass', () => {
    fc.assert(
      fc.property(correctArrangement, fc.double({ min: -0.09, max: 0.09, noNaN: true }), fc.double({ min: 0, max: 9, noNaN: true }), (a, drift, contact) => {
        const e = expectedReadings(a)
        const line = 'ohms' in e.alarm ? e.alarm.ohms : 0
        const r: Readings = { normal: ('ohms' in e.normal ? e.normal.ohms : 0) + drift * a.eolOhms, alarm: line + contact, trouble: 'open', unpowered: 'open' }
        expect(diagnose(a, r).verdict).toBe('pass')
      }),
      { numRuns: 200 },
    )
  })

  it('property: an arrangement that is itself a fault is always flagged, whatever the readings', () => {
    const reading = fc.oneof(fc.constant('open' as const), fc.double({ min: 0, max: 2_000_000, noNaN: true }))
    const anyReadings = fc.record({ normal: reading, alarm: reading, trouble: reading, unpowered: reading }, { requiredKeys: [] })
    fc.assert(
      fc.property(correctArrangement, fc.constantFrom<FindingCode>('alarm-on-nc', 'not-supervised', 'supervisory-wrong-terminal'), anyReadings, (good, code, readings) => {
        const bad: Arrangement =
          code === 'alarm-on-nc'
            ? { ...good, alarmTerminal: 'NC' }
            : code === 'not-supervised'
              ? { ...good, eolPlacement: 'across-pair' }
              : { ...good, supervisoryTerminal: good.supervisoryTerminal === 'NO' ? 'NC' : 'NO' }
        const d = diagnose(bad, readings as Readings)
        expect(d.verdict).toBe('fail')
        expect(d.findings.map((f) => f.code)).toContain(code)
      }),
      { numRuns: 300 },
    )
  })

  // What the meter shows when the real loop has one fault but the record says it is correct.
  function faulty(a: Arrangement, code: FindingCode, p: { wrongEol: number; extra: number }): Readings {
    const e = expectedReadings(a)
    const line = 'ohms' in e.alarm ? e.alarm.ohms : 0
    const eol = a.eolOhms + line
    const per = (s: DetectorState, v: Record<DetectorState, number | 'open'>) => v[s]
    const map = (v: Record<DetectorState, number | 'open'>) => Object.fromEntries(DETECTOR_STATES.map((s) => [s, per(s, v)])) as Readings
    switch (code) {
      case 'eol-missing':
        return map({ normal: 'open', alarm: line, trouble: 'open', unpowered: 'open' })
      case 'eol-wrong-value':
        return map({ normal: p.wrongEol + line, alarm: line, trouble: 'open', unpowered: 'open' })
      case 'alarm-on-nc':
        return map({ normal: line, alarm: eol, trouble: line, unpowered: line })
      case 'supervisory-wrong-terminal':
        return map({ normal: 'open', alarm: line, trouble: eol, unpowered: eol })
      case 'not-supervised':
        return map({ normal: eol, alarm: line, trouble: eol, unpowered: eol })
      case 'line-resistance-high':
        return map({ normal: eol + p.extra, alarm: line + p.extra, trouble: 'open', unpowered: 'open' })
      default:
        throw new Error(code)
    }
  }

  it('property: every single-fault mutation of the readings is caught with a finding naming it', () => {
    const codes: FindingCode[] = ['eol-missing', 'eol-wrong-value', 'alarm-on-nc', 'supervisory-wrong-terminal', 'not-supervised', 'line-resistance-high']
    fc.assert(
      fc.property(
        correctArrangement,
        fc.constantFrom(...codes),
        fc.double({ min: 0.2, max: 0.85, noNaN: true }),
        fc.boolean(),
        fc.double({ min: 12, max: 400, noNaN: true }),
        (a, code, fraction, larger, extraOhms) => {
          // A wrong resistor differs by more than the tolerance: 20–85 % smaller, or 1.2–1.85× larger.
          const wrongEol = larger ? a.eolOhms * (1 + fraction) : a.eolOhms * (1 - fraction)
          // Extra series resistance: more than the short allowance, less than the EOL tolerance.
          const extra = Math.min(extraOhms, a.eolOhms * 0.09)
          fc.pre(code !== 'line-resistance-high' || extra > 11)
          const d = diagnose(a, faulty(a, code, { wrongEol, extra }))
          expect(d.verdict).toBe('fail')
          expect(d.findings.map((f) => f.code)).toContain(code)
        },
      ),
      { numRuns: 500 },
    )
  })
})
