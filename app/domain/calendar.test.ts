import Holidays from 'date-holidays'
import { describe, expect, it } from 'vitest'
import { calendarFor } from './calendar'
import { addDays } from './dates'

// The reference is date-holidays itself: its 'public' holidays, dated by the date part of `date`.
function publicHolidaysOf(country: string, state: string, year: number) {
  return new Holidays(country, state)
    .getHolidays(year)
    .filter((h) => h.type === 'public')
    .map((h) => ({ date: h.date.slice(0, 10), name: h.name }))
    .filter((h) => h.date.startsWith(String(year)))
}

describe('calendarFor: holidays from date-holidays', () => {
  for (const [region, year] of [['US-TX', 2026], ['US-OR', 2027], ['US-NY', 2026]] as const) {
    it(`every public holiday of ${region} ${year} is a day off, with its name`, () => {
      const cal = calendarFor(region)
      const [country, state] = region.split('-')
      const list = publicHolidaysOf(country, state, year)
      expect(list.length).toBeGreaterThan(8)
      for (const h of list) {
        expect(cal.isWorkingDay(h.date), h.date).toBe(false)
        expect(list.filter((x) => x.date === h.date).map((x) => x.name)).toContain(cal.holidayName(h.date))
      }
    })

    it(`every other Monday–Friday of ${region} ${year} is a working day`, () => {
      const cal = calendarFor(region)
      const [country, state] = region.split('-')
      const off = new Set(publicHolidaysOf(country, state, year).map((h) => h.date))
      for (let d = `${year}-01-01`; d <= `${year}-12-31`; d = addDays(d, 1)) {
        const wd = new Date(`${d}T00:00:00Z`).getUTCDay()
        expect(cal.isWorkingDay(d), d).toBe(wd >= 1 && wd <= 5 && !off.has(d))
      }
    })
  }

  it('counts a substitute day as off: Independence Day 2026 falls on a Saturday, Friday is off', () => {
    expect(calendarFor('US-TX').isWorkingDay('2026-07-03')).toBe(false)
    expect(calendarFor('US-TX').holidayName('2026-07-03')).toMatch(/Independence Day/)
  })

  it("keeps a substitute day that falls in the year before: 2027-12-31 for New Year's Day 2028", () => {
    expect(calendarFor('US-OR').isWorkingDay('2027-12-31')).toBe(false)
  })

  it('keeps observances as working days (Texas Independence Day, Good Friday in Texas)', () => {
    const tx = calendarFor('US-TX')
    expect(tx.isWorkingDay('2026-03-02')).toBe(true) // a Monday; 'observance' in date-holidays
    expect(tx.isWorkingDay('2026-04-03')).toBe(true) // a Friday; 'observance' in date-holidays
    expect(tx.holidayName('2026-03-02')).toBeNull()
  })

  it('a plain Tuesday is a working day with no holiday name', () => {
    for (const region of ['US-TX', 'US-OR']) {
      expect(calendarFor(region).isWorkingDay('2026-03-10')).toBe(true)
      expect(calendarFor(region).holidayName('2026-03-10')).toBeNull()
    }
  })

  it('weekends are off', () => {
    const cal = calendarFor('US-OR')
    expect(cal.isWorkingDay('2026-03-07')).toBe(false) // Saturday
    expect(cal.isWorkingDay('2026-03-08')).toBe(false) // Sunday
  })

  it('regions differ: the day after Thanksgiving 2026 is public in Texas, not in Oregon', () => {
    expect(calendarFor('US-TX').isWorkingDay('2026-11-27')).toBe(false)
    expect(calendarFor('US-OR').isWorkingDay('2026-11-27')).toBe(true)
  })

  it('accepts lower case and rejects regions date-holidays does not know', () => {
    expect(calendarFor('us-tx').region).toBe('US-TX')
    expect(() => calendarFor('US-ZZ')).toThrow(/Unknown holiday region/)
    expect(() => calendarFor('XX-YY')).toThrow(/Unknown holiday region/)
    expect(() => calendarFor('')).toThrow(/Unknown holiday region/)
  })

  it('rejects text that is not a date', () => {
    expect(() => calendarFor('US-TX').isWorkingDay('2026-02-30')).toThrow(/Not a date/)
  })
})

describe('calendarFor: stepping through working days', () => {
  const tx = calendarFor('US-TX')
  const or = calendarFor('US-OR')

  it('nextWorkingDay keeps a working day and skips a holiday weekend', () => {
    expect(tx.nextWorkingDay('2026-03-10')).toBe('2026-03-10')
    // Sat 26 Dec is also public in Texas (day after Christmas); Sun 27; Mon 28.
    expect(tx.nextWorkingDay('2026-12-25')).toBe('2026-12-28')
  })

  it('addWorkingDays crosses Thanksgiving and the weekend after it', () => {
    expect(tx.addWorkingDays('2026-11-25', 1)).toBe('2026-11-30') // Thu, Fri public; Sat, Sun
    expect(or.addWorkingDays('2026-11-25', 1)).toBe('2026-11-27') // only Thursday off in Oregon
  })

  it('addWorkingDays crosses Memorial Day weekend both ways', () => {
    expect(or.addWorkingDays('2026-05-22', 1)).toBe('2026-05-26')
    expect(or.addWorkingDays('2026-05-26', -1)).toBe('2026-05-22')
    expect(or.addWorkingDays('2026-05-26', -3)).toBe('2026-05-20')
    expect(or.addWorkingDays('2026-05-20', 3)).toBe('2026-05-26')
  })

  it('addWorkingDays with 0 gives the day itself or the next working day', () => {
    expect(or.addWorkingDays('2026-03-10', 0)).toBe('2026-03-10')
    expect(or.addWorkingDays('2026-03-07', 0)).toBe('2026-03-09')
    expect(() => or.addWorkingDays('2026-03-10', 1.5)).toThrow()
  })

  it('addWorkingDays from a day off counts from the next working day forward, previous one back', () => {
    expect(or.addWorkingDays('2026-03-07', 1)).toBe('2026-03-09') // Saturday + 1 → Monday
    expect(or.addWorkingDays('2026-03-07', -1)).toBe('2026-03-06') // Saturday − 1 → Friday
  })

  it('addWorkingDays over a year matches the count of working days', () => {
    const days = or.workingDaysBetween('2026-01-02', '2026-12-31')
    expect(or.addWorkingDays('2026-01-02', days.length - 1)).toBe(days.at(-1))
    expect(or.addWorkingDays(days.at(-1)!, -(days.length - 1))).toBe('2026-01-02')
  })

  it('workingDaysBetween includes both ends and skips days off', () => {
    expect(tx.workingDaysBetween('2026-11-23', '2026-11-30')).toEqual(['2026-11-23', '2026-11-24', '2026-11-25', '2026-11-30'])
    expect(tx.workingDaysBetween('2026-11-30', '2026-11-23')).toEqual([])
    expect(tx.workingDaysBetween('2026-11-26', '2026-11-26')).toEqual([])
  })
})

describe('calendarFor: options', () => {
  it('workingWeekdays can add Saturday', () => {
    const cal = calendarFor('US-OR', { workingWeekdays: [1, 2, 3, 4, 5, 6] })
    expect(cal.isWorkingDay('2026-03-07')).toBe(true)
    expect(cal.isWorkingDay('2026-03-08')).toBe(false)
    expect(cal.isWorkingDay('2026-07-04')).toBe(false) // a Saturday holiday is still off
  })

  it('extraClosedDays are off without touching other calendars', () => {
    const cal = calendarFor('US-OR', { extraClosedDays: ['2026-03-10'] })
    expect(cal.isWorkingDay('2026-03-10')).toBe(false)
    expect(cal.addWorkingDays('2026-03-09', 1)).toBe('2026-03-11')
    expect(calendarFor('US-OR').isWorkingDay('2026-03-10')).toBe(true)
  })

  it('refuses a week with no working day, or weekday numbers outside 0–6', () => {
    expect(() => calendarFor('US-OR', { workingWeekdays: [] })).toThrow()
    expect(() => calendarFor('US-OR', { workingWeekdays: [1, 7] })).toThrow()
  })
})

describe('calendarFor: the server time zone does not move holidays', () => {
  // Regions not used above, so their holiday lists are built while TZ is set here.
  for (const [tz, region] of [['Pacific/Kiritimati', 'US-HI'], ['Pacific/Pago_Pago', 'US-AK']] as const) {
    it(`${region} with the process in ${tz}`, () => {
      const before = process.env.TZ
      process.env.TZ = tz
      try {
        // The switch took hold: the process is a long way from UTC (+14 h / −11 h).
        expect(Math.abs(new Date('2026-12-25T00:00:00Z').getTimezoneOffset())).toBeGreaterThanOrEqual(660)
        const cal = calendarFor(region)
        expect(cal.isWorkingDay('2026-12-24')).toBe(true)
        expect(cal.isWorkingDay('2026-12-25')).toBe(false)
        expect(cal.isWorkingDay('2026-11-26')).toBe(false)
        expect(cal.isWorkingDay('2026-11-25')).toBe(true)
        expect(cal.isWorkingDay('2027-01-01')).toBe(false)
        expect(cal.isWorkingDay('2026-12-31')).toBe(true)
      } finally {
        if (before === undefined) delete process.env.TZ
        else process.env.TZ = before
      }
    })
  }
})

describe('calendarFor: the company calendar', () => {
  it('takes off only the observed public holidays and works the rest', () => {
    const cal = calendarFor('US-TX', { observedHolidays: ['Independence Day'] })
    expect(cal.isWorkingDay('2026-07-03')).toBe(false) // the substitute day goes with its holiday
    expect(cal.isWorkingDay('2026-06-19')).toBe(true) // Juneteenth: a public holiday the company works
    expect(cal.addWorkingDays('2026-06-18', 1)).toBe('2026-06-19')
    expect(calendarFor('US-TX').isWorkingDay('2026-06-19')).toBe(false)
  })

  it('adds company closed days on top', () => {
    const cal = calendarFor('US-TX', { observedHolidays: [], extraClosedDays: ['2026-06-17'] })
    expect(cal.isWorkingDay('2026-06-17')).toBe(false)
    expect(cal.addWorkingDays('2026-06-16', 1)).toBe('2026-06-18')
    expect(cal.isWorkingDay('2026-07-03')).toBe(true)
  })
})
