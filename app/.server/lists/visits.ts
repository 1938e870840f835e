import { asc, desc, eq, gte, inArray, lte } from 'drizzle-orm'
import { z } from 'zod'
import type { Db } from '../db'
import { customers, notifications, sites, users, visitDetectors, visits } from '../schema'
import { countOf, existsIn, ftsIds, ftsQuery, idParam, inList, isoDate, multi, orNull, pagingSchema, sitesOfCustomer, type ListRow, type ListSpec } from '../list-query'

// visit_detectors' primary key and notifications_visit_idx both lead with visit_id.
const DETECTORS = countOf(visitDetectors, eq(visitDetectors.visitId, visits.id))
const NOTIFIED = existsIn(notifications, eq(notifications.visitId, visits.id))

const SORTS = {
  id: visits.id,
  scheduledOn: visits.scheduledOn,
  kind: visits.kind,
  status: visits.status,
  site: sites.name,
  city: sites.city,
  customer: customers.name,
  technician: users.name,
  detectors: DETECTORS,
  notified: NOTIFIED,
}

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

const select = {
  id: visits.id,
  scheduledOn: visits.scheduledOn,
  kind: visits.kind,
  status: visits.status,
  siteId: visits.siteId,
  site: sites.name,
  city: sites.city,
  customerId: sites.customerId,
  customer: customers.name,
  technicianId: visits.technicianId,
  technician: orNull(users.name),
  detectors: DETECTORS,
  notified: NOTIFIED,
}
export type VisitListRow = ListRow<typeof select>

export const visitList: ListSpec<VisitQuery, typeof select> = {
  table: visits,
  // Left joins on primary keys (the keys are NOT NULL foreign keys, so no row is lost): SQLite drops
  // them from the id walk whenever the sort and filters use none of their columns.
  from: (q) =>
    q
      .leftJoin(sites, eq(sites.id, visits.siteId))
      .leftJoin(customers, eq(customers.id, sites.customerId))
      .leftJoin(users, eq(users.id, visits.technicianId)),
  select,
  sorts: SORTS,
  defaultSort: { key: 'scheduledOn', dir: 'desc' },
  sortJoins: {
    site: (q) => q.innerJoin(sites, eq(sites.id, visits.siteId)),
    city: (q) => q.innerJoin(sites, eq(sites.id, visits.siteId)),
    customer: (q) => q.innerJoin(sites, eq(sites.id, visits.siteId)).innerJoin(customers, eq(customers.id, sites.customerId)),
    technician: (q) => q.leftJoin(users, eq(users.id, visits.technicianId)),
  },
  // A name on a nullable key and counts per visit: over a period's or a site's visits, not all.
  costlySorts: ['technician', 'detectors', 'notified'],
  where(f) {
    const fts = f.q ? ftsQuery(f.q) : null
    return [
      fts ? inArray(visits.siteId, ftsIds('site', fts)) : undefined,
      inList(visits.status, f.status),
      inList(visits.kind, f.kind),
      f.site ? eq(visits.siteId, f.site) : undefined,
      f.customer ? inArray(visits.siteId, sitesOfCustomer(f.customer)) : undefined,
      f.technician ? eq(visits.technicianId, f.technician) : undefined,
      f.from ? gte(visits.scheduledOn, f.from) : undefined,
      f.to ? lte(visits.scheduledOn, f.to) : undefined,
    ]
  },
}

/** Technicians to filter visits by: active ones first, then those who have left (their visits remain). */
export function technicianOptions(db: Db): Array<{ id: number; name: string; active: boolean }> {
  return db
    .select({ id: users.id, name: users.name, active: users.active })
    .from(users)
    .where(eq(users.role, 'technician'))
    .orderBy(desc(users.active), asc(users.name))
    .all()
}
