import { asc } from 'drizzle-orm'
import { calendarFor, type WorkCalendar } from '~/domain/calendar'
import { weekday, type IsoDate } from '~/domain/dates'
import type { Db } from '../db'
import { closedDays, observedHolidays } from '../schema'

export interface CompanyCalendar {
  /** The working days of one site region under the company's calendar. Throws for an unknown region. */
  forRegion(region: string): WorkCalendar
  /** Why a day is not worked in a region ("company closed: Stocktake", a holiday's name, "a weekend day"), or null. */
  dayOff(region: string, date: IsoDate): string | null
}

/**
 * The company's calendar as kept on the admin page: a public holiday is a day off only where it is
 * listed as observed, for the site's region (US-TX) or its whole country (US); closed days are off
 * everywhere. Read once per bulk request.
 */
export function loadCompanyCalendar(db: Db): CompanyCalendar {
  const observed = db.select().from(observedHolidays).all()
  const closed = db.select().from(closedDays).orderBy(asc(closedDays.day)).all()
  const closedLabel = new Map(closed.map((c) => [c.day, c.label]))
  const closedList = closed.map((c) => c.day)
  const byRegion = new Map<string, WorkCalendar>()

  const forRegion = (region: string): WorkCalendar => {
    const key = region.trim().toUpperCase()
    let cal = byRegion.get(key)
    if (!cal) {
      const country = key.split('-')[0]
      const names = observed.filter((o) => o.region.toUpperCase() === key || o.region.toUpperCase() === country).map((o) => o.name)
      cal = calendarFor(key, { observedHolidays: names, extraClosedDays: closedList })
      byRegion.set(key, cal)
    }
    return cal
  }
  return {
    forRegion,
    dayOff(region, date) {
      const cal = forRegion(region)
      if (cal.isWorkingDay(date)) return null
      const label = closedLabel.get(date)
      if (label !== undefined) return `company closed: ${label}`
      const day = weekday(date)
      if (day === 0 || day === 6) return 'a weekend day'
      return cal.holidayName(date) ?? 'not a working day'
    },
  }
}
