import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { addDays, addMonths, addYears, daysBetween, fromUtc, isIsoDate, todayIn, toUtc, weekday } from './dates'

describe('addMonths', () => {
  it('clamps to the last day of a shorter month', () => {
    expect(addMonths('2026-01-31', 1)).toBe('2026-02-28')
    expect(addMonths('2026-03-31', 6)).toBe('2026-09-30')
    expect(addMonths('2026-03-31', -1)).toBe('2026-02-28')
    expect(addMonths('2026-01-31', 6)).toBe('2026-07-31')
  })

  it('knows leap years, century rule included', () => {
    expect(addMonths('2024-01-31', 1)).toBe('2024-02-29')
    expect(addMonths('2100-01-31', 1)).toBe('2100-02-28') // not a leap year
    expect(addMonths('2000-01-31', 1)).toBe('2000-02-29') // a leap year
    expect(addYears('2024-02-29', 1)).toBe('2025-02-28')
    expect(addYears('2024-02-29', 4)).toBe('2028-02-29')
  })

  it('crosses year ends both ways', () => {
    expect(addMonths('2026-12-15', 1)).toBe('2027-01-15')
    expect(addMonths('2026-01-15', -1)).toBe('2025-12-15')
    expect(addMonths('2026-05-20', -17)).toBe('2024-12-20')
  })

  it('always gives a real date no later than the same day number', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 36_000 }), fc.integer({ min: -60, max: 60 }), (offset, months) => {
        const start = addDays('1990-01-01', offset)
        const out = addMonths(start, months)
        expect(isIsoDate(out)).toBe(true)
        expect(Number(out.slice(8))).toBeLessThanOrEqual(Number(start.slice(8)))
      }),
      { numRuns: 200 },
    )
  })
})

describe('addDays, daysBetween, weekday', () => {
  it('counts whole days, negative when the second date is earlier', () => {
    expect(daysBetween('2026-01-01', '2027-01-01')).toBe(365)
    expect(daysBetween('2028-01-01', '2029-01-01')).toBe(366)
    expect(daysBetween('2026-03-10', '2026-03-01')).toBe(-9)
    expect(daysBetween('2026-03-07', '2026-03-09')).toBe(2) // over a US clock change: still whole days
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29')
    expect(addDays('2026-02-28', 1)).toBe('2026-03-01')
    expect(addDays('2026-01-01', -1)).toBe('2025-12-31')
  })

  it('addDays and daysBetween undo each other', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 36_000 }), fc.integer({ min: -5000, max: 5000 }), (offset, n) => {
        const a = addDays('1990-01-01', offset)
        expect(daysBetween(a, addDays(a, n))).toBe(n)
        expect(fromUtc(toUtc(a))).toBe(a)
      }),
      { numRuns: 200 },
    )
  })

  it('weekday: 0 is Sunday', () => {
    expect(weekday('2026-03-08')).toBe(0)
    expect(weekday('2026-03-10')).toBe(2)
    expect(weekday('2026-03-14')).toBe(6)
    expect(weekday('2028-02-29')).toBe(2)
  })
})

describe('isIsoDate', () => {
  it('accepts real YYYY-MM-DD dates only', () => {
    expect(isIsoDate('2026-03-10')).toBe(true)
    expect(isIsoDate('2028-02-29')).toBe(true)
    expect(isIsoDate('2026-02-29')).toBe(false)
    expect(isIsoDate('2026-02-30')).toBe(false)
    expect(isIsoDate('2026-13-01')).toBe(false)
    expect(isIsoDate('2026-04-31')).toBe(false)
    expect(isIsoDate('2026-3-10')).toBe(false)
    expect(isIsoDate('2026-03-10T00:00:00Z')).toBe(false)
    expect(isIsoDate('')).toBe(false)
  })
})

describe('todayIn', () => {
  it('half an hour before midnight UTC: already tomorrow in Tokyo, still today in Los Angeles', () => {
    const now = new Date('2026-03-09T23:30:00Z')
    expect(todayIn('UTC', now)).toBe('2026-03-09')
    expect(todayIn('Asia/Tokyo', now)).toBe('2026-03-10')
    expect(todayIn('America/Los_Angeles', now)).toBe('2026-03-09')
  })

  it('half an hour after midnight UTC: new day in London, still yesterday in Los Angeles', () => {
    const now = new Date('2026-03-10T00:30:00Z')
    expect(todayIn('UTC', now)).toBe('2026-03-10')
    expect(todayIn('Europe/London', now)).toBe('2026-03-10')
    expect(todayIn('America/Los_Angeles', now)).toBe('2026-03-09')
  })

  it('across a year end', () => {
    const now = new Date('2026-12-31T20:00:00Z')
    expect(todayIn('Pacific/Auckland', now)).toBe('2027-01-01')
    expect(todayIn('America/New_York', now)).toBe('2026-12-31')
  })
})
