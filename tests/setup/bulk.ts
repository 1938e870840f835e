import type { Db } from '~/.server/db'
import type { BulkContext } from '~/.server/bulk/action'
import { loadCompanyCalendar } from '~/.server/bulk/calendar'


/** Books `n` planned visits at one site on `date`, each with `detectors` of the site's detectors. */
export function makeVisits(db: Db, o: { n: number; siteId: number; date: string; technicianId: number | null; detectors?: number }): number[] {
  const q = db.$client
  const pool = (q.prepare('select id from detectors where site_id = ? order by id').all(o.siteId) as Array<{ id: number }>).map((r) => r.id)
  const insert = q.prepare("insert into visits (site_id, kind, scheduled_on, technician_id, status) values (?, 'test', ?, ?, 'planned')")
  const item = q.prepare("insert into visit_detectors (visit_id, detector_id, tasks) values (?, ?, 'visual,functional')")
  const ids: number[] = []
  for (let i = 0; i < o.n; i++) {
    const id = Number(insert.run(o.siteId, o.date, o.technicianId).lastInsertRowid)
    for (let k = 0; k < (o.detectors ?? 1); k++) item.run(id, pool[(i + k) % pool.length])
    ids.push(id)
  }
  return ids
}

/** A context as the route builds it, for a user picked by e-mail. */
export function contextFor(db: Db, email: string, today: string): BulkContext {
  const actor = db.$client.prepare('select id, role from users where email = ?').get(email) as BulkContext['actor']
  return { actor, today, calendar: loadCompanyCalendar(db), now: '2026-06-15T14:00:00.000Z' }
}
