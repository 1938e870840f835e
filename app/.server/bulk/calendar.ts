import { and, asc, eq, gte } from 'drizzle-orm'
import { z } from 'zod'
import { calendarFor, type WorkCalendar } from '~/domain/calendar'
import { addDays, weekday, type IsoDate } from '~/domain/dates'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { isoDate } from '../list-query'
import { closedDays, observedHolidays } from '../schema'

export interface CompanyCalendar {
  /** The working days of one site region under the company's calendar. Throws for an unknown region. */
  forRegion(region: string): WorkCalendar
  /** Why a day is not worked in a region ("company closed: Stocktake", a holiday's name, "a weekend day"), or null. */
  dayOff(region: string, date: IsoDate): string | null
  /** What it was built from (observed holidays, closed days): two calendars with the same key answer alike. */
  readonly key: string
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
  const key = JSON.stringify([observed.map((o) => `${o.region.toUpperCase()}|${o.name}`).sort(), closed.map((c) => [c.day, c.label])])

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
    key,
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

export interface CalendarPage {
  regions: string[]
  region: string
  year: number
  holidays: Array<{ name: string; dates: string[]; observed: boolean; observedFor: string | null }>
  closed: Array<{ day: string; label: string }>
}

/**
 * The admin page's view: the public holidays of one region (or a whole country) in a year, each
 * marked observed where the company takes it off, and the company's closed days from `from` on.
 */
export function calendarPage(db: Db, region: string | undefined, year: number, from: string): CalendarPage {
  const siteRegions = (db.$client.prepare('select distinct region from sites order by region').all() as Array<{ region: string }>).map((r) => r.region.toUpperCase())
  const countries = [...new Set(siteRegions.map((r) => r.split('-')[0]))]
  const regions = [...countries, ...siteRegions]
  const chosen = region && regions.includes(region.toUpperCase()) ? region.toUpperCase() : (regions[0] ?? 'US')
  const cal = calendarFor(chosen)
  const byName = new Map<string, string[]>()
  for (let d = `${year}-01-01`; d <= `${year}-12-31`; d = addDays(d, 1)) {
    const name = cal.holidayName(d)?.replace(/ \(.*\)$/, '')
    if (name) byName.set(name, [...(byName.get(name) ?? []), d])
  }
  const observed = db.select().from(observedHolidays).all()
  const country = chosen.split('-')[0]
  const holidays = [...byName].map(([name, dates]) => {
    const own = observed.find((o) => o.name === name && o.region.toUpperCase() === chosen)
    const wide = observed.find((o) => o.name === name && o.region.toUpperCase() === country)
    return { name, dates, observed: !!(own ?? wide), observedFor: own ? chosen : wide ? country : null }
  })
  const closed = db
    .select({ day: closedDays.day, label: closedDays.label })
    .from(closedDays)
    .where(gte(closedDays.day, from))
    .orderBy(asc(closedDays.day))
    .all()
  return { regions, region: chosen, year, holidays, closed }
}

export const calendarChange = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('observe'), region: z.string().trim().regex(/^[A-Za-z]{2}(-[A-Za-z0-9]{1,3})?$/, 'A region such as US or US-TX'), name: z.string().trim().min(1).max(120), on: z.enum(['1', '0']) }),
  z.object({ intent: z.literal('close'), day: isoDate, label: z.string().trim().min(2, 'Say why the company is closed').max(120) }),
  z.object({ intent: z.literal('reopen'), day: isoDate }),
])

/** Keeps the company calendar: one change, audited, in one transaction. */
export function changeCalendar(db: Db, actorId: number, c: z.infer<typeof calendarChange>): string {
  return writeTx(db, () => {
    if (c.intent === 'observe') {
      const region = c.region.toUpperCase()
      if (c.on === '1') db.insert(observedHolidays).values({ region, name: c.name }).onConflictDoNothing().run()
      else db.delete(observedHolidays).where(and(eq(observedHolidays.region, region), eq(observedHolidays.name, c.name))).run()
      writeAudit(db, { actorId, action: c.on === '1' ? 'calendar.observe' : 'calendar.work', entity: 'holiday', entityId: `${region}:${c.name}`, after: { region, name: c.name } })
      return c.on === '1' ? `${c.name} is now a day off in ${region}.` : `${c.name} is now worked in ${region}.`
    }
    if (c.intent === 'close') {
      db.insert(closedDays).values({ day: c.day, label: c.label }).onConflictDoUpdate({ target: closedDays.day, set: { label: c.label } }).run()
      writeAudit(db, { actorId, action: 'calendar.close', entity: 'closed_day', entityId: c.day, after: { label: c.label } })
      return `${c.day} is a company closed day: ${c.label}.`
    }
    db.delete(closedDays).where(eq(closedDays.day, c.day)).run()
    writeAudit(db, { actorId, action: 'calendar.reopen', entity: 'closed_day', entityId: c.day })
    return `${c.day} is a working day again.`
  })
}
