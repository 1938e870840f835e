import convert from 'convert-units'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  airflowForVelocity,
  checkPressure,
  checkVelocity,
  ductAreaFt2,
  ductVelocityFpm,
  fpmToMetresPerSecond,
  metresPerSecondToFpm,
  type Duct,
} from './airflow'

const rect = (widthIn: number, heightIn: number): Duct => ({ shape: 'rectangular', widthIn, heightIn })
const round = (diameterIn: number): Duct => ({ shape: 'round', diameterIn })

describe('duct area and velocity', () => {
  it('12 × 8 in at 1,000 cfm is 1,500 ft/min', () => {
    // velocity = cfm ÷ area (ft²); rectangular area = W(in) × H(in) ÷ 144: common practice
    expect(ductAreaFt2(rect(12, 8))).toBeCloseTo(96 / 144, 12)
    expect(ductVelocityFpm(1000, rect(12, 8))).toBeCloseTo(1500, 9)
  })

  it('24 × 12 in at 450 ft/min is 900 cfm', () => {
    // cfm = velocity × area (ft²): common practice
    expect(airflowForVelocity(450, rect(24, 12))).toBeCloseTo(900, 9)
  })

  it('14 in round at 2,000 cfm is 1,870.9 ft/min', () => {
    // round area = π·r(in)² ÷ 144: common practice; 2,000 ÷ (π × 7² ÷ 144) = 1,870.9 (computed)
    expect(ductVelocityFpm(2000, round(14))).toBeCloseTo(1870.9, 1)
  })

  it('agrees with convert-units on square inches to square feet', () => {
    // independent conversion library as a cross-check
    for (const [w, h] of [
      [12, 8],
      [24, 12],
      [7, 3],
      [60, 36],
    ]) {
      expect(ductAreaFt2(rect(w, h))).toBeCloseTo(
        convert(w * h)
          .from('in2')
          .to('ft2'),
        12,
      )
    }
    const r = 7
    expect(ductAreaFt2(round(14))).toBeCloseTo(
      convert(Math.PI * r * r)
        .from('in2')
        .to('ft2'),
      12,
    )
  })

  it('refuses a duct with no size', () => {
    expect(() => ductAreaFt2(rect(0, 8))).toThrow(RangeError)
    expect(() => ductAreaFt2(round(-2))).toThrow(RangeError)
  })

  it('refuses airflow, listed ranges and pressures that are not numbers or below zero', () => {
    expect(() => ductVelocityFpm(Number.NaN, rect(12, 8))).toThrow(/cfm must be zero or more/)
    expect(() => ductVelocityFpm(-1000, rect(12, 8))).toThrow(RangeError)
    expect(() => airflowForVelocity(Number.POSITIVE_INFINITY, rect(12, 8))).toThrow(RangeError)
    expect(() => checkVelocity({ cfm: 1000, duct: rect(12, 8), listedMinFpm: Number.NaN, listedMaxFpm: 4000 })).toThrow(RangeError)
    expect(() => checkPressure({ measuredInWc: Number.NaN, listedMinInWc: 0.01, listedMaxInWc: 1.2 })).toThrow(RangeError)
    // 0 cfm is a stopped fan, a real reading: 12×8 in gives 0 ft/min.
    expect(ductVelocityFpm(0, rect(12, 8))).toBe(0)
  })

  it('velocity × area gives back the airflow', () => {
    const duct = fc.oneof(
      fc.record({
        shape: fc.constant('rectangular' as const),
        widthIn: fc.double({ min: 2, max: 120, noNaN: true }),
        heightIn: fc.double({ min: 2, max: 120, noNaN: true }),
      }),
      fc.record({ shape: fc.constant('round' as const), diameterIn: fc.double({ min: 2, max: 120, noNaN: true }) }),
    )
    fc.assert(
      fc.property(fc.double({ min: 1, max: 100_000, noNaN: true }), duct, (cfm, d) => {
        const back = ductVelocityFpm(cfm, d) * ductAreaFt2(d)
        expect(Math.abs(back - cfm) / cfm).toBeLessThan(1e-12)
        expect(Math.abs(airflowForVelocity(ductVelocityFpm(cfm, d), d) - cfm) / cfm).toBeLessThan(1e-12)
      }),
    )
  })
})

describe('SI helpers', () => {
  it('ft/min to m/s agrees with convert-units', () => {
    // convert-units has ft/s, not ft/min: 1 ft/min = 1/60 ft/s
    for (const v of [100, 500, 1500, 4000]) {
      const lib = convert(v / 60)
        .from('ft/s')
        .to('m/s')
      expect(Math.abs(fpmToMetresPerSecond(v) - lib) / lib).toBeLessThan(1e-5)
    }
    expect(fpmToMetresPerSecond(1000)).toBeCloseTo(5.08, 10) // 0.3048 m/ft × 1000 ÷ 60
  })

  it('round-trips', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 10_000, noNaN: true }), (v) => {
        expect(metresPerSecondToFpm(fpmToMetresPerSecond(v))).toBeCloseTo(v, 9)
      }),
    )
  })
})

describe('checkVelocity', () => {
  // The listed range is per model (from the device's listing); these figures are test inputs only.
  const listed = { listedMinFpm: 500, listedMaxFpm: 4000 }

  it('in range', () => {
    const r = checkVelocity({ cfm: 1000, duct: rect(12, 8), ...listed })
    expect(r.status).toBe('in-range')
    expect(r.velocityFpm).toBeCloseTo(1500, 9)
    expect(r.message).toMatch(/within the listed range/)
  })

  it('too low', () => {
    const r = checkVelocity({ cfm: 300, duct: rect(24, 12), ...listed })
    expect(r.velocityFpm).toBeCloseTo(150, 9)
    expect(r.status).toBe('too-low')
  })

  it('too high', () => {
    const r = checkVelocity({ cfm: 3000, duct: rect(12, 8), ...listed })
    expect(r.status).toBe('too-high')
  })

  it('the listed limits themselves are in range', () => {
    expect(checkVelocity({ cfm: airflowForVelocity(500, rect(12, 8)), duct: rect(12, 8), ...listed }).status).toBe(
      'in-range',
    )
    expect(checkVelocity({ cfm: 2000, duct: rect(12, 6), ...listed }).status).toBe('in-range') // exactly 4,000 ft/min
  })

  it('refuses a range upside down', () => {
    expect(() => checkVelocity({ cfm: 1000, duct: rect(12, 8), listedMinFpm: 4000, listedMaxFpm: 500 })).toThrow(
      RangeError,
    )
  })
})

describe('checkPressure', () => {
  // Pressure difference within the manufacturer's published range (NFPA 72-2010 Table 14.4.2.2 item 14(g)(6));
  // the range itself is a test input.
  const listed = { listedMinInWc: 0.01, listedMaxInWc: 1.0 }

  it('in range', () => {
    expect(checkPressure({ measuredInWc: 0.2, ...listed }).status).toBe('in-range')
  })

  it('too low names the tube checks', () => {
    const r = checkPressure({ measuredInWc: 0.004, ...listed })
    expect(r.status).toBe('too-low')
    expect(r.message).toMatch(/face into the airflow/)
    expect(r.message).toMatch(/span the duct/)
    expect(r.message).toMatch(/blocked/)
    expect(r.message).toMatch(/water/)
  })

  it('below zero points at reversed tubes', () => {
    // common practice
    expect(checkPressure({ measuredInWc: -0.05, ...listed }).message).toMatch(/reversed/)
  })

  it('too high', () => {
    const r = checkPressure({ measuredInWc: 1.4, ...listed })
    expect(r.status).toBe('too-high')
    expect(r.message).toMatch(/span the duct/)
  })
})
