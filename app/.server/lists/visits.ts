import { z } from 'zod'
import type { Db } from '../db'
import { visits } from '../schema'
import { ftsIds, ftsQuery, idParam, isoDate, multi, pagingSchema, type ListSpec, whereBuilder } from '../list-query'

// visit_detectors' primary key and notifications_visit_idx both lead with visit_id.
const DETECTORS = '(select count(*) from visit_detectors x where x.visit_id = t.id)'
const NOTIFIED = 'exists (select 1 from notifications n where n.visit_id = t.id)'

const SORTS = {
  id: 't.id',
  scheduledOn: 't.scheduled_on',
  kind: 't.kind',
  status: 't.status',
  site: 's.name',
  city: 's.city',
  customer: 'c.name',
  technician: 'u.name',
  detectors: DETECTORS,
  notified: NOTIFIED,
} as const

export const visitQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  status: multi(visits.status.enumValues),
  kind: multi(visits.kind.enumValues),
  site: idParam.optional(),
  customer: idParam.optional(),
  technician: idParam.optional(),
  from: isoDate.optional(),
  to: isoDate.optional(),
}).refine((f) => !f.from || !f.to || f.from <= f.to, { path: ['to'], message: 'The end date comes before the start date' })
export type VisitQuery = z.infer<typeof visitQuery>

/** As SQLite returns it: `notified` is 0 or 1 until `asVisitRow`. */
export type VisitListRowRaw = Omit<VisitListRow, 'notified'> & { notified: number }
export const asVisitRow = (r: VisitListRowRaw): VisitListRow => ({ ...r, notified: r.notified === 1 })

export interface VisitListRow {
  id: number
  scheduledOn: string
  kind: string
  status: string
  siteId: number
  site: string
  city: string
  customerId: number
  customer: string
  technicianId: number | null
  technician: string | null
  detectors: number
  notified: boolean
}

export const visitList: ListSpec<VisitQuery> = {
  // Left joins on primary keys (the keys are NOT NULL foreign keys, so no row is lost): SQLite drops
  // them from the id walk whenever the sort and filters use none of their columns.
  from: 'visits t left join sites s on s.id = t.site_id left join customers c on c.id = s.customer_id left join users u on u.id = t.technician_id',
  select: {
    id: 't.id',
    scheduledOn: 't.scheduled_on',
    kind: 't.kind',
    status: 't.status',
    siteId: 't.site_id',
    site: 's.name',
    city: 's.city',
    customerId: 's.customer_id',
    customer: 'c.name',
    technicianId: 't.technician_id',
    technician: 'u.name',
    detectors: DETECTORS,
    notified: NOTIFIED,
  },
  sorts: SORTS,
  defaultSort: { key: 'scheduledOn', dir: 'desc' },
  countedAs: 'visits',
  where(f) {
    const { add, list, done } = whereBuilder()
    const fts = f.q ? ftsQuery(f.q) : null
    if (fts) add(`t.site_id in (${ftsIds('site')})`, fts)
    list('t.status', f.status)
    list('t.kind', f.kind)
    if (f.site) add('t.site_id = ?', f.site)
    if (f.customer) add('t.site_id in (select id from sites where customer_id = ?)', f.customer)
    if (f.technician) add('t.technician_id = ?', f.technician)
    if (f.from) add('t.scheduled_on >= ?', f.from)
    if (f.to) add('t.scheduled_on <= ?', f.to)
    return done()
  },
}

/** Technicians to filter visits by: active ones first, then those who have left (their visits remain). */
export function technicianOptions(db: Db): Array<{ id: number; name: string; active: boolean }> {
  const rows = db.$client
    .prepare("select id, name, active from users where role = 'technician' order by active desc, name")
    .all() as Array<{ id: number; name: string; active: number }>
  return rows.map((r) => ({ ...r, active: r.active === 1 }))
}
