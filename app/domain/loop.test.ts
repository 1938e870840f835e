import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { AWG_SIZES, type Awg } from './conductors'
import { DETECTOR_STATES } from './contacts'
import { correctTerminals, diagnose, expectedCorrect, expectedReadings, type Arrangement, type FindingCode, type Readings } from './loop'

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
    // 250 ft of 18 AWG stranded at 7.95 Ω/kft (NEC Chapter 9 Table 8): 3.975 Ω of wire. Window: a 5 %
    // resistor (common practice) read by a ±1 % meter (from memory), plus 10 Ω of contacts and leads
    // (common practice): (3.975 + 14,250) × 0.99 − 10 = 14,101.44; (3.975 + 15,750) × 1.01 + 10 = 15,921.51.
    const e = expectedCorrect(base)
    expect(e.normal).toEqual({ ohms: 15_003.98, min: 14_101.44, max: 15_921.51 })
    expect(e.alarm).toEqual({ ohms: 3.98, min: 0, max: 14.01 })
    expect(e.trouble).toEqual({ open: true })
    expect(e.unpowered).toEqual({ open: true })
  })

  it('measured at the device, the wire adds nothing to the reading but still counts against the limit', () => {
    expect(expectedCorrect({ ...base, measuredAt: 'device' }).normal).toMatchObject({ ohms: 15_000 })
    // 18 AWG solid, 7,000 ft one way: 2 × 7,000 × 7.77 / 1000 = 108.8 Ω > 100 Ω (common practice limit).
    const d = diagnose({ ...base, measuredAt: 'device', conductor: { awg: 18, stranded: false, oneWayFeet: 7_000 } }, {})
    expect(d.lineOhms).toBe(108.78)
    expect(d.findings.map((f) => f.code)).toEqual(['line-resistance-high'])
  })

  it('expected is the correct loop; a miswired record is shown beside it as recorded', () => {
    const d = diagnose({ ...base, eolPlacement: 'across-pair' }, {})
    expect(d.expected.trouble).toEqual({ open: true })
    expect(d.expectedAsRecorded?.trouble).toMatchObject({ ohms: 15_003.98 })
    expect(diagnose(base, {}).expectedAsRecorded).toBeUndefined()
    expect(expectedReadings({ ...base, eolPlacement: 'across-pair' }).trouble).toMatchObject({ ohms: 15_003.98 })
  })
})

describe('diagnosis', () => {
  it('passes the worked request and says incomplete when supervision was not proven', () => {
    expect(diagnose(base, { normal: 15_420, alarm: 6.4, trouble: 'open', unpowered: 'open' }).verdict).toBe('pass')
    const partial = diagnose(base, { normal: 15_420, alarm: 6.4 })
    expect(partial.verdict).toBe('incomplete')
    expect(partial.findings).toEqual([])
  })

  it('names a wrong EOL value with the value it sees, and only the states measured', () => {
    const d = diagnose(base, { normal: 4_704, alarm: 4, trouble: 'open' })
    expect(d.findings.map((f) => f.code)).toEqual(['eol-wrong-value'])
    expect(d.findings[0].message).toContain('4.7 kΩ')
    expect(d.findings[0].message).not.toMatch(/power off reads/)
  })

  it('tells 5.1 k from 4.7 k: the window is the resistor’s 5 % and the meter, not ±10 %', () => {
    // E24 neighbours (common practice): 4.7 k × 1.05 = 4,935 Ω < 5,100 Ω.
    const a = { ...base, eolOhms: 4_700, measuredAt: 'device' as const }
    expect(diagnose(a, { normal: 5_100, alarm: 0.3, trouble: 'open' }).findings.map((f) => f.code)).toEqual(['eol-wrong-value'])
    expect(diagnose(a, { normal: 4_800, alarm: 0.3, trouble: 'open' }).verdict).toBe('pass')
  })

  it('reads 999,999 Ω as open, and a high finite reading where open belongs as leakage', () => {
    expect(diagnose(base, { normal: 15_004, alarm: 4, trouble: 999_999 }).verdict).toBe('pass')
    const d = diagnose(base, { normal: 14_300, alarm: 4, trouble: 300_000 })
    expect(d.findings.map((f) => f.code)).toContain('leakage')
  })

  it('follows the panel’s line limit for a short: 60 Ω of wire and splices still alarms on a 100 Ω panel', () => {
    expect(diagnose(base, { normal: 15_060, alarm: 60, trouble: 'open' }).verdict).toBe('pass')
    // 130 Ω in alarm is past the 100 Ω limit (common practice): a high-resistance splice or terminal.
    expect(diagnose(base, { normal: 15_130, alarm: 130, trouble: 'open' }).findings.map((f) => f.code)).toEqual(['line-resistance-high'])
  })

  it('names the new wiring faults', () => {
    const codes = (r: Readings) => diagnose(base, r).findings.map((f) => f.code)
    expect(codes({ normal: 'open', alarm: 'open', trouble: 'open', unpowered: 'open' })).toEqual(['open-conductor'])
    expect(codes({ normal: 2, alarm: 2, trouble: 2, unpowered: 2 })).toEqual(['shorted-pair'])
    expect(codes({ normal: 15_004, alarm: 'open', trouble: 'open' })).toEqual(['alarm-in-series'])
    expect(codes({ normal: 15_004, alarm: 15_004, trouble: 'open' })).toEqual(['no-alarm-short'])
    expect(codes({ normal: 15_004, alarm: 4, trouble: 4, unpowered: 4 })).toEqual(['trouble-reports-as-alarm'])
    // De-energized labelling: the alarm pair on the supervisory NO (closed in normal) shorts the loop at rest.
    expect(codes({ normal: 4, alarm: 4, trouble: 'open', unpowered: 'open' })).toEqual(['contacts-swapped'])
    const msg = diagnose(base, { normal: 15_004, alarm: 4, trouble: 4 }).findings[0].message
    expect(msg).toMatch(/false dispatch/)
    expect(msg).toMatch(/fire alarm contractor/)
  })

  it('names both faults where two together explain the readings', () => {
    // Alarm on NC and a 22 k resistor: short at rest, 22 k in alarm; no leak raises a reading above the resistor.
    const d = diagnose(base, { normal: 4, alarm: 22_004, trouble: 4, unpowered: 4 })
    expect(d.findings.map((f) => f.code).sort()).toEqual(['alarm-on-nc', 'eol-wrong-value'])
  })

  it('calls readings that fit no one or two faults unexplained', () => {
    // Trouble and power-off drop the same relay, so they cannot read differently on any wiring.
    const d = diagnose(base, { normal: 15_004, alarm: 4, trouble: 'open', unpowered: 4 })
    expect(d.verdict).toBe('fail')
    expect(d.findings).toEqual([expect.objectContaining({ code: 'unexplained', state: 'unpowered' })])
  })

  it('names no wiring fault the readings do not show when only the record is wrong', () => {
    const d = diagnose({ ...base, alarmTerminal: 'NC' }, { alarm: 5, trouble: 'open' })
    expect(d.findings.map((f) => f.code)).toEqual(['alarm-on-nc'])
  })

  it('passes with an advisory when readings prove a correct loop the record calls miswired', () => {
    const d = diagnose({ ...base, alarmTerminal: 'NC' }, { normal: 15_004, alarm: 4, trouble: 'open', unpowered: 'open' })
    expect(d.verdict).toBe('pass')
    expect(d.findings).toEqual([expect.objectContaining({ code: 'record-differs', advisory: true })])
  })

  it('defers to the fire alarm contractor in every fault', () => {
    const d = diagnose({ ...base, alarmTerminal: 'NC', eolPlacement: 'across-pair' }, { normal: 3, alarm: 'open' })
    for (const f of d.findings) expect(f.message).toMatch(/fire alarm contractor/)
  })

  it('property: a correct arrangement’s own expected readings pass, for every EOL, conductor and run', () => {
    fc.assert(
      fc.property(correctArrangement, (a) => {
        const d = diagnose(a, readingsFrom(expectedCorrect(a)))
        expect(d.findings).toEqual([])
        expect(d.verdict).toBe('pass')
      }),
      { numRuns: 300 },
    )
  })

  it('property: readings within the resistor’s tolerance and a few ohms of contact still pass', () => {
    fc.assert(
      fc.property(correctArrangement, fc.double({ min: -0.05, max: 0.05, noNaN: true }), fc.double({ min: 0, max: 9, noNaN: true }), (a, drift, contact) => {
        const e = expectedCorrect(a)
        const line = 'ohms' in e.alarm ? e.alarm.ohms : 0
        const r: Readings = { normal: ('ohms' in e.normal ? e.normal.ohms : 0) + drift * a.eolOhms, alarm: line + contact, trouble: 'open', unpowered: 'open' }
        expect(diagnose(a, r).verdict).toBe('pass')
      }),
      { numRuns: 200 },
    )
  })

  it('property: a miswired record is flagged unless the readings prove the loop, then it is an advisory', () => {
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
        const proven = d.verdict === 'pass'
        if (proven) expect(d.findings.map((f) => f.code)).toEqual(['record-differs'])
        else {
          expect(d.verdict).toBe('fail')
          expect(d.findings.map((f) => f.code)).toContain(code)
        }
      }),
      { numRuns: 300 },
    )
  })
})
