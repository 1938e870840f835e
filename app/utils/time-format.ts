// Instants at a site read in the site's own zone, with the zone's abbreviation beside every time, so a
// trouble at 23:30 PDT is never mistaken for the office's (or the server's) clock. en-US names the US
// zones by their usual letters (PDT, CST, MST); zones it has no letters for read as "GMT+2".

const cache = new Map<string, Intl.DateTimeFormat>()

function formatter(kind: 'time' | 'dateTime' | 'day', timeZone: string): Intl.DateTimeFormat {
  const key = `${kind} ${timeZone}`
  let f = cache.get(key)
  if (!f) {
    const clock = { hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZoneName: 'short' } as const
    const date = { day: 'numeric', month: 'short', year: 'numeric' } as const
    f = new Intl.DateTimeFormat('en-US', {
      timeZone,
      ...(kind === 'time' ? clock : kind === 'dateTime' ? { ...date, ...clock } : { year: 'numeric', month: '2-digit', day: '2-digit' }),
    })
    cache.set(key, f)
  }
  return f
}

const partsOf = (kind: 'time' | 'dateTime' | 'day', iso: string, timeZone: string) =>
  Object.fromEntries(formatter(kind, timeZone).formatToParts(new Date(iso)).map((p) => [p.type, p.value]))

/** "14:05 PDT": the time of an instant on the site's clock, with its zone. */
export function siteTime(iso: string, timeZone: string): string {
  const p = partsOf('time', iso, timeZone)
  return `${p.hour}:${p.minute} ${p.timeZoneName}`
}

/** "3 Jun 2026, 14:05 PDT": day and time on the site's clock, with its zone. */
export function siteDateTime(iso: string, timeZone: string): string {
  const p = partsOf('dateTime', iso, timeZone)
  return `${p.day} ${p.month} ${p.year}, ${p.hour}:${p.minute} ${p.timeZoneName}`
}

/** "2026-06-03": the site's calendar day of an instant. */
export function siteDay(iso: string, timeZone: string): string {
  const p = partsOf('day', iso, timeZone)
  return `${p.year}-${p.month}-${p.day}`
}
