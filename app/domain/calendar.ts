import Holidays from 'date-holidays'
import { addDays, isIsoDate, weekday, type IsoDate } from './dates'

/** Working days for one site region: weekends, public holidays and any extra closed days are off. */
export interface WorkCalendar {
  readonly region: string
  isWorkingDay(date: IsoDate): boolean
  /** The public holiday on that date, or null. */
  holidayName(date: IsoDate): string | null
  /** The same day when it is a working day, else the first working day after it. */
  nextWorkingDay(date: IsoDate): IsoDate
  /**
   * Steps n working days forward (n < 0: back); the start day itself is not counted.
   * n = 0 gives nextWorkingDay(date), so the result is always a working day.
   */
  addWorkingDays(date: IsoDate, n: number): IsoDate
  /** Every working day from `from` to `to`, both included; empty when `to` is before `from`. */
  workingDaysBetween(from: IsoDate, to: IsoDate): IsoDate[]
}

export interface CalendarOptions {
  /** Days of the week that are worked, 0 = Sunday. Monday to Friday unless given. */
  workingWeekdays?: number[]
  /** Further days off for this calendar (shutdowns, company days). */
  extraClosedDays?: IsoDate[]
  /**
   * Names of the region's public holidays the company takes off. When given, only these are days
   * off and every other public holiday is worked; when left out, every public holiday is off.
   */
  observedHolidays?: readonly string[]
}

const MON_TO_FRI = [1, 2, 3, 4, 5]
// A search that finds no working day within ten years has a calendar with no working days at all.
const MAX_SEARCH_DAYS = 3660
const MAX_REMEMBERED = 20_000

// One Holidays instance and one holiday map per region and year, shared by every calendar: the
// planner asks about the same few regions thousands of times.
const instances = new Map<string, Holidays>()
const yearCache = new Map<string, Map<IsoDate, string>>()
// Checked region names, and the plain Mon–Fri calendar of each: listing date-holidays' countries
// costs far more than a calendar look-up, so it is done once per region name.
const known = new Map<string, { key: string; parts: string[] }>()
const plainCalendars = new Map<string, WorkCalendar>()
let directory: Holidays | null = null

/** 'us-tx' → { key: 'US-TX', parts: ['US', 'TX'] }; throws when date-holidays does not know it. */
function parseRegion(region: string): { key: string; parts: string[] } {
  const hit = known.get(region)
  if (hit) return hit
  const parts = region.trim().toUpperCase().split('-').filter(Boolean)
  const key = parts.join('-')
  if (parts.length < 1 || parts.length > 3) throw new Error(`Unknown holiday region '${region}'`)
  directory ??= new Holidays()
  const [country, state] = parts
  if (!(country in (directory.getCountries() ?? {}))) throw new Error(`Unknown holiday region '${region}'`)
  if (state !== undefined && !(state in (directory.getStates(country) ?? {}))) {
    throw new Error(`Unknown holiday region '${region}'`)
  }
  known.set(region, { key, parts })
  return { key, parts }
}

function instanceFor(key: string, parts: string[]): Holidays {
  let hd = instances.get(key)
  if (!hd) {
    const [country, state, sub] = parts
    hd = state === undefined ? new Holidays(country) : sub === undefined ? new Holidays(country, state) : new Holidays(country, state, sub)
    instances.set(key, hd)
  }
  return hd
}

/**
 * Public holidays (type 'public' only: observances, optional, bank and school days stay working)
 * whose dates fall in `year`. Dates come from the holiday's own 'YYYY-MM-DD hh:mm:ss' text, never
 * from its Date objects, so the server's time zone cannot move a holiday onto the next day.
 * Neighbouring years are read too: a substitute day can fall in the year before its holiday (New
 * Year's Day on a Saturday), and this way it counts whichever year's list carries it.
 */
function publicHolidays(key: string, parts: string[], year: number): Map<IsoDate, string> {
  const cacheKey = `${key}:${year}`
  const cached = yearCache.get(cacheKey)
  if (cached) return cached
  const hd = instanceFor(key, parts)
  const days = new Map<IsoDate, string>()
  for (const y of [year - 1, year, year + 1]) {
    for (const h of hd.getHolidays(y) ?? []) {
      if (h.type !== 'public') continue
      const first = h.date.slice(0, 10)
      // A holiday that lasts more than a day (end − start) covers each of its days.
      const hours = Number(h.date.slice(11, 13)) || 0
      const lasts = h.start && h.end ? h.end.getTime() - h.start.getTime() : 0
      const span = Math.max(1, Math.round((hours * 3_600_000 + lasts) / 86_400_000))
      for (let i = 0; i < span; i++) {
        const day = i === 0 ? first : addDays(first, i)
        if (Number(day.slice(0, 4)) === year && !days.has(day)) days.set(day, h.name)
      }
    }
  }
  yearCache.set(cacheKey, days)
  return days
}

export function calendarFor(region: string, o: CalendarOptions = {}): WorkCalendar {
  const { key, parts } = parseRegion(region)
  const plain = o.workingWeekdays === undefined && o.extraClosedDays === undefined && o.observedHolidays === undefined
  const cached = plain ? plainCalendars.get(key) : undefined
  if (cached) return cached
  const cal = buildCalendar(key, parts, o)
  if (plain) plainCalendars.set(key, cal)
  return cal
}

function buildCalendar(key: string, parts: string[], o: CalendarOptions): WorkCalendar {
  const weekdays = new Set(o.workingWeekdays ?? MON_TO_FRI)
  if (weekdays.size === 0 || ![...weekdays].every((d) => Number.isInteger(d) && d >= 0 && d <= 6)) {
    throw new Error('A calendar needs at least one working weekday (0 = Sunday … 6 = Saturday)')
  }
  const closed = new Set(o.extraClosedDays ?? [])
  const observed = o.observedHolidays === undefined ? null : new Set(o.observedHolidays)

  const check = (date: IsoDate) => {
    if (!isIsoDate(date)) throw new Error(`Not a date: '${date}'`)
  }
  const holidayOn = (date: IsoDate) => publicHolidays(key, parts, Number(date.slice(0, 4))).get(date) ?? null
  const holidayName = (date: IsoDate): string | null => {
    check(date)
    return holidayOn(date)
  }
  // The planner asks about the same few hundred dates over and over: remember each answer.
  const answers = new Map<IsoDate, boolean>()
  const isWorkingDay = (date: IsoDate): boolean => {
    let working = answers.get(date)
    if (working === undefined) {
      check(date)
      const holiday = holidayOn(date)
      // A substitute day ('Independence Day (substitute day)') goes with the holiday it stands for.
      const off = holiday !== null && (observed === null || observed.has(holiday) || observed.has(holiday.replace(/ \(.*\)$/, '')))
      working = weekdays.has(weekday(date)) && !closed.has(date) && !off
      answers.set(date, working)
    }
    return working
  }

  // Moves one calendar day at a time in `step` direction until a working day is reached.
  const seek = (date: IsoDate, step: 1 | -1): IsoDate => {
    let d = date
    for (let i = 0; i < MAX_SEARCH_DAYS; i++) {
      if (isWorkingDay(d)) return d
      d = addDays(d, step)
    }
    throw new Error(`No working day within ten years of ${date} in ${key}`)
  }

  // A bulk shift asks the same (date, n) for thousands of visits, each step a date parsed and
  // printed again: remember each answer too, within a bound for a calendar kept all process long.
  const stepped = new Map<string, IsoDate>()
  const addWorkingDays = (date: IsoDate, n: number): IsoDate => {
    if (!Number.isInteger(n)) throw new Error(`Working days must be a whole number, got ${n}`)
    const memo = `${date}|${n}`
    let d = stepped.get(memo)
    if (d === undefined) {
      if (n === 0) d = seek(date, 1)
      else {
        const step = n > 0 ? 1 : -1
        d = date
        for (let left = Math.abs(n); left > 0; left--) d = seek(addDays(d, step), step)
      }
      if (stepped.size >= MAX_REMEMBERED) stepped.clear()
      stepped.set(memo, d)
    }
    return d
  }

  return {
    region: key,
    isWorkingDay,
    holidayName,
    nextWorkingDay: (date) => seek(date, 1),
    addWorkingDays,
    workingDaysBetween(from, to) {
      check(from)
      check(to)
      const out: IsoDate[] = []
      for (let d = from; d <= to; d = addDays(d, 1)) if (isWorkingDay(d)) out.push(d)
      return out
    },
  }
}
