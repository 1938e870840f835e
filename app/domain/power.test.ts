import { describe, expect, it } from 'vitest'
import { CLASS2_MAX_VA, CLASS2_MAX_VOLTS, class2LimitVa, class2Source, currentFor, powerBudget, voltageDrop } from './power'

// Load figures below are test inputs, not any device's published draw.
const detector = (label: string, standbyVa: number, alarmVa: number) => ({ label, standbyVa, alarmVa })

describe('current', () => {
  it('40 VA at 24 V is 1.667 A', () => {
    // Current = VA ÷ V, 40 VA at 24 V → 1.667 A: common practice
    expect(currentFor(40, 24)).toBeCloseTo(1.667, 3)
    expect(powerBudget({ transformerVa: 75, loads: [detector('Loads', 30, 40)] }).currentA).toBeCloseTo(1.667, 3)
  })
})

describe('powerBudget', () => {
  it('sums standby and alarm loads and leaves headroom', () => {
    const b = powerBudget({
      transformerVa: 40, // a typical control transformer size: common practice
      loads: [detector('Supply detector', 3, 6), detector('Return detector', 3, 6), detector('Test station', 0.5, 1)],
    })
    expect(b.standbyVa).toBeCloseTo(6.5, 9)
    expect(b.alarmVa).toBeCloseTo(13, 9)
    expect(b.headroomVa).toBeCloseTo(27, 9)
    expect(b.withinRating).toBe(true)
    expect(b.withinClass2).toBe(true)
    expect(b.findings).toEqual([])
    expect(b.class2LimitVa).toBe(100) // NEC Chapter 9 Table 11(A)
    expect(b.ratingVa).toBe(40)
  })

  it('flags a budget over the transformer rating', () => {
    const b = powerBudget({
      transformerVa: 40,
      loads: [detector('Unit controls', 30, 30), detector('Detectors', 8, 14)],
    })
    expect(b.withinRating).toBe(false)
    expect(b.headroomVa).toBeCloseTo(-4, 9)
    expect(b.findings.join(' ')).toMatch(/over the transformer's 40 VA rating/)
  })

  it('flags more than 100 VA as beyond Class 2', () => {
    // NEC Class 2 (Chapter 9 Table 11(A)): ≤ 100 VA at ≤ 30 V
    expect(CLASS2_MAX_VA).toBe(100)
    expect(CLASS2_MAX_VOLTS).toBe(30)
    const b = powerBudget({ transformerVa: 150, loads: [detector('Everything', 90, 110)] })
    expect(b.withinRating).toBe(true)
    expect(b.withinClass2).toBe(false)
    expect(b.findings.join(' ')).toMatch(/Class 2/)
  })

  it('exactly 100 VA at 24 V is still Class 2', () => {
    // NEC Chapter 9 Table 11(A): ≤ 100 VA
    const b = powerBudget({ transformerVa: 100, loads: [detector('Loads', 100, 100)] })
    expect(b.withinClass2).toBe(true)
    expect(b.withinRating).toBe(true)
  })

  it('a source rated over 100 VA is not Class 2 even when lightly loaded', () => {
    // NEC Chapter 9 Table 11(A)
    expect(powerBudget({ transformerVa: 150, loads: [detector('Loads', 10, 20)] }).withinClass2).toBe(false)
  })

  it('over 30 V is outside the Class 2 check', () => {
    // NEC Chapter 9 Table 11(A): the 100 VA band ends at 30 V; above it the limits are far lower (from memory)
    const b = powerBudget({ transformerVa: 40, volts: 120, loads: [detector('Loads', 5, 5)] })
    expect(b.withinClass2).toBe(false)
    expect(b.class2LimitVa).toBeNull()
    expect(b.findings.join(' ')).toMatch(/above the 30 V this Class 2 check covers/)
  })
})

describe('Class 2 limit by voltage', () => {
  it.each([
    // NEC Chapter 9 Table 11(A), 0–20 V: at most 5.0 × Vmax VA (from memory)
    [12, 60],
    [16, 80],
    [20, 100],
    // NEC Chapter 9 Table 11(A), over 20 V up to 30 V: at most 100 VA
    [20.5, 100],
    [24, 100],
    [30, 100],
  ])('%s V → %s VA', (volts, limit) => {
    expect(class2LimitVa(volts)).toBeCloseTo(limit, 9)
  })

  it('has no limit to give above 30 V or at no voltage', () => {
    expect(class2LimitVa(30.5)).toBeNull()
    expect(class2LimitVa(0)).toBeNull()
  })

  it('names the source beside the figure, and says which band is recalled', () => {
    expect(class2Source(24)).toBe('NEC Chapter 9 Table 11(A)')
    expect(class2Source(12)).toBe('NEC Chapter 9 Table 11(A), from memory')
  })

  it('a 75 VA transformer at 12 V is beyond Class 2; the same at 24 V is within', () => {
    // NEC Chapter 9 Table 11(A): 5.0 × 12 = 60 VA at 12 V (from memory); 100 VA at 24 V
    const low = powerBudget({ transformerVa: 75, volts: 12, loads: [detector('Loads', 10, 20)] })
    expect(low.class2LimitVa).toBe(60)
    expect(low.withinClass2).toBe(false)
    expect(low.findings.join(' ')).toMatch(/Class 2 limit of 60 VA at 12 V \(NEC Chapter 9 Table 11\(A\), from memory\)/)
    expect(powerBudget({ transformerVa: 75, volts: 24, loads: [detector('Loads', 10, 20)] }).withinClass2).toBe(true)
  })
})

describe('voltageDrop', () => {
  it('250 ft of 18 AWG stranded at 0.5 A', () => {
    // NEC Chapter 9 Table 8: 18 AWG stranded 7.95 Ω per 1,000 ft at 75 °C.
    // Loop = 2 × 250 ft × 7.95 / 1000 = 3.975 Ω; drop = 0.5 A × 3.975 Ω = 1.9875 V;
    // end = 24 − 1.9875 = 22.0125 V; percent = 1.9875 ÷ 24 × 100 = 8.28125 %.
    const d = voltageDrop({ currentA: 0.5, oneWayFeet: 250, awg: 18, stranded: true, volts: 24 })
    expect(d.dropV).toBeCloseTo(1.9875, 9)
    expect(d.endVolts).toBeCloseTo(22.0125, 9)
    expect(d.percent).toBeCloseTo(8.28125, 9)
  })

  it('solid wire of the same size drops a little less', () => {
    // NEC Chapter 9 Table 8: 18 AWG solid 7.77 Ω per 1,000 ft → 2 × 250 × 7.77 / 1000 × 0.5 = 1.9425 V
    expect(voltageDrop({ currentA: 0.5, oneWayFeet: 250, awg: 18, stranded: false }).dropV).toBeCloseTo(1.9425, 9)
  })

  it('no current, no drop', () => {
    expect(voltageDrop({ currentA: 0, oneWayFeet: 500, awg: 12, stranded: true })).toEqual({
      dropV: 0,
      endVolts: 24,
      percent: 0,
    })
  })
})
