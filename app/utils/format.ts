const counts = new Intl.NumberFormat('en-US')

export const formatCount = (n: number) => counts.format(n)

export const percent = (part: number, whole: number) =>
  whole === 0 ? '0%' : `${((100 * part) / whole).toFixed(part * 1000 < whole ? 1 : 0)}%`

/** '2026-12-01' → 'Tue 1 Dec 2026', read as a calendar day (no time zone shift). */
export function formatDay(iso: string) {
  return new Intl.DateTimeFormat('en-GB', {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    timeZone: 'UTC',
  }).format(new Date(`${iso}T00:00:00Z`))
}
