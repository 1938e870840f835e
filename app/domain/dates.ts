// Calendar days as 'YYYY-MM-DD', computed in UTC so the server's own time zone never shifts a date.
export type IsoDate = string

const DAY_MS = 86_400_000

export function toUtc(date: IsoDate): number {
  // Read by position when the date has its usual shape: this runs for every date of every row of a
  // list page, and splitting made arrays each time.
  if (date.length === 10 && date[4] === '-' && date[7] === '-') return Date.UTC(+date.slice(0, 4), +date.slice(5, 7) - 1, +date.slice(8, 10))
  const [y, m, d] = date.split('-').map(Number)
  return Date.UTC(y, m - 1, d)
}

export function fromUtc(ms: number): IsoDate {
  return new Date(ms).toISOString().slice(0, 10)
}

export function addDays(date: IsoDate, days: number): IsoDate {
  return fromUtc(toUtc(date) + days * DAY_MS)
}

/** Adds calendar months, clamping to the month's last day (Jan 31 + 1 month = Feb 28/29). */
export function addMonths(date: IsoDate, months: number): IsoDate {
  const [y, m, d] = date.split('-').map(Number)
  const first = new Date(Date.UTC(y, m - 1 + months, 1))
  const lastDay = new Date(Date.UTC(first.getUTCFullYear(), first.getUTCMonth() + 1, 0)).getUTCDate()
  first.setUTCDate(Math.min(d, lastDay))
  return fromUtc(first.getTime())
}

export function addYears(date: IsoDate, years: number): IsoDate {
  return addMonths(date, years * 12)
}

/** Whole days from a to b (positive when b is later). */
export function daysBetween(a: IsoDate, b: IsoDate): number {
  return Math.round((toUtc(b) - toUtc(a)) / DAY_MS)
}

/** Day of week, 0 = Sunday. */
export function weekday(date: IsoDate): number {
  return new Date(toUtc(date)).getUTCDay()
}

export function isIsoDate(value: string): boolean {
  return /^\d{4}-\d{2}-\d{2}$/.test(value) && fromUtc(toUtc(value)) === value
}

// Dates people type or send: wide enough for any detector record or booking, narrow enough that a
// slipped digit (2062 for 2026, 0226) is caught instead of stored.
export const EARLIEST_DATE: IsoDate = '1990-01-01'
export const LATEST_DATE: IsoDate = '2100-12-31'

/** Why a typed date is not acceptable, in words for the person who typed it; null when it is fine. */
export function dateProblem(value: string): string | null {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(value)) return 'Use YYYY-MM-DD'
  if (!isIsoDate(value)) return `${value} is not a day in the calendar`
  if (value < EARLIEST_DATE || value > LATEST_DATE) return `Use a date between ${EARLIEST_DATE} and ${LATEST_DATE}`
  return null
}

/** Today's calendar date in an IANA time zone. */
export function todayIn(timeZone: string, now: Date = new Date()): IsoDate {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now)
}
