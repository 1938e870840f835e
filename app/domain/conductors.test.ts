import convert from 'convert-units'
import { describe, expect, it } from 'vitest'
import { AWG_SIZES, awgAreaCmil, awgDiameterIn, formulaOhmsPerKft, loopOhms, NEC_TABLE_8 } from './conductors'

describe('conductor resistance', () => {
  // NEC (NFPA 70) Chapter 9 Table 8 vs the AWG formula d = 0.005 × 92^((36 − n)/39) with annealed
  // copper at 0.017241 Ω·mm²/m (NBS Handbook 100) and R₂ = R₁[1 + 0.00323(T₂ − 75)]: within ±0.01 Ω/kft.
  it.each(AWG_SIZES)('AWG %i: table and formula agree at 75 °C (solid)', (awg) => {
    expect(Math.abs(formulaOhmsPerKft(awg, 75) - NEC_TABLE_8[awg].solid)).toBeLessThanOrEqual(0.01)
  })

  it('computes the 20 °C values for 18/16/14/12 AWG (6.385 / 4.015 / 2.525 / 1.588 Ω per 1,000 ft)', () => {
    const expected = { 18: 6.385, 16: 4.015, 14: 2.525, 12: 1.588 } as const
    for (const awg of AWG_SIZES) expect(formulaOhmsPerKft(awg, 20)).toBeCloseTo(expected[awg], 2)
  })

  it('areas from the formula match the table in circular mils (Table 8 column)', () => {
    for (const awg of AWG_SIZES) expect(Math.abs(awgAreaCmil(awg) - NEC_TABLE_8[awg].cmil) / NEC_TABLE_8[awg].cmil).toBeLessThan(0.01)
  })

  it('cross-checks the copper resistivity unit conversion with convert-units', () => {
    // 0.017241 Ω·mm²/m → Ω·cmil/ft: 1 mm² = 1973.525 cmil, 1 m = 3.28084 ft.
    const mm2PerIn2 = convert(1).from('in2').to('mm2')
    const cmilPerMm2 = 1e6 / (mm2PerIn2 * (Math.PI / 4))
    const ftPerM = convert(1).from('m').to('ft')
    expect(0.017241 * cmilPerMm2 / ftPerM).toBeCloseTo(10.371, 2)
    // 18 AWG: 0.0403 in diameter.
    expect(convert(awgDiameterIn(18)).from('in').to('mm')).toBeCloseTo(1.024, 2)
  })

  it('a loop counts both conductors', () => {
    // 250 ft of 18 AWG stranded: 2 × 250 × 7.95 / 1000 = 3.975 Ω.
    expect(loopOhms(18, true, 250)).toBeCloseTo(3.975, 6)
    expect(loopOhms(12, false, 1000)).toBeCloseTo(3.86, 6)
  })
})
