// Times on the visit screens are read and typed in the site's own time zone: the technician is there,
// and the monitoring company's window is agreed in local time.

const parts = (d: Date, timeZone: string) => {
  const f = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
  const p = Object.fromEntries(f.formatToParts(d).map((x) => [x.type, x.value]))
  return { date: `${p.year}-${p.month}-${p.day}`, time: `${p.hour}:${p.minute}` }
}

/** An instant as a `datetime-local` value in the site's zone. */
export function toLocalInput(iso: string, timeZone: string): string {
  const p = parts(new Date(iso), timeZone)
  return `${p.date}T${p.time}`
}

/** A `datetime-local` value typed in the site's zone, as an ISO instant (UTC). */
export function fromLocalInput(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value)
  if (!m) return null
  const wall = Date.UTC(+m[1], +m[2] - 1, +m[3], +m[4], +m[5])
  // The zone's offset at that wall time, found by asking what the guess reads as there (twice, for DST edges).
  let guess = wall
  for (let i = 0; i < 2; i++) {
    const p = parts(new Date(guess), timeZone)
    const [y, mo, d] = p.date.split('-').map(Number)
    const [h, mi] = p.time.split(':').map(Number)
    guess += wall - Date.UTC(y, mo - 1, d, h, mi)
  }
  return new Date(guess).toISOString()
}

/** "14:05" or "3 Dec 14:05" when not on the same site day as `ref`. */
export function siteClock(iso: string, timeZone: string, ref?: string): string {
  const p = parts(new Date(iso), timeZone)
  if (ref && parts(new Date(ref), timeZone).date === p.date) return p.time
  const day = new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short' }).format(new Date(iso))
  return `${day} ${p.time}`
}
