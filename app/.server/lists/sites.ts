import { and, eq, gte, inArray, min, sql } from 'drizzle-orm'
import { QueryBuilder } from 'drizzle-orm/sqlite-core'
import { z } from 'zod'
import { customers, detectors, monitoringCompanies, sites, units, visits } from '../schema'
import { countOf, ftsIds, ftsQuery, idParam, inList, multi, orNull, pagingSchema, type ListRow, type ListSpec } from '../list-query'

// Correlated figures, computed only for the rows shown unless the table is sorted by one. Counts
// ride detectors_site_idx and units_site_idx, the next visit visits_site_idx. The overdue count also
// reads each detector's row for its status: sorting all 15,000 stress-scale sites by it costs ~80 ms
// (an index on detectors (site_id, due_status) made it ~13 ms).
const UNITS = countOf(units, eq(units.siteId, sites.id))
const DETECTORS = countOf(detectors, eq(detectors.siteId, sites.id))
const OVERDUE = countOf(detectors, and(eq(detectors.siteId, sites.id), eq(detectors.dueStatus, 'overdue')))
// The next visit still to come from the office's day (`today`, set by the route). Wrapped in `sql`:
// a scalar subquery as a column.
const NEXT_VISIT = sql<string | null>`${new QueryBuilder()
  .select({ on: min(visits.scheduledOn) })
  .from(visits)
  .where(and(eq(visits.siteId, sites.id), gte(visits.scheduledOn, sql.placeholder('today')), inArray(visits.status, ['planned', 'notified'])))}`

const SORTS = {
  id: sites.id,
  name: sites.name,
  customer: customers.name,
  street: sites.street,
  city: sites.city,
  region: sites.region,
  codeBasis: sites.codeBasis,
  monitoring: monitoringCompanies.name,
  delayPolicySeconds: sites.delayPolicySeconds,
  units: UNITS,
  detectors: DETECTORS,
  overdue: OVERDUE,
  nextVisitOn: NEXT_VISIT,
}

/** One or more subdivision codes such as `US-OR`, repeated or comma separated. */
const regions = z.preprocess(
  (v) => (v === undefined || v === '' ? undefined : (Array.isArray(v) ? v : [v]).flatMap((s) => String(s).split(',')).filter(Boolean)),
  z
    .array(z.string().regex(/^[A-Z]{2}-[A-Z0-9]{1,3}$/, 'Use a subdivision code such as US-OR'))
    .min(1)
    .max(60)
    .optional(),
)

export const siteQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  customer: idParam.optional(),
  region: regions,
  codeBasis: multi(sites.codeBasis.enumValues),
  monitoring: idParam.optional(),
  delayPolicy: z.coerce.number().int().min(0).max(86_400).optional(),
})
// `today` is added by the route from the office's calendar, never taken from the client.
export type SiteQuery = z.infer<typeof siteQuery> & { today: string }

const select = {
  id: sites.id,
  name: sites.name,
  customerId: sites.customerId,
  customer: customers.name,
  street: sites.street,
  city: sites.city,
  region: sites.region,
  codeBasis: sites.codeBasis,
  monitoringId: sites.monitoringCompanyId,
  monitoring: orNull(monitoringCompanies.name),
  delayPolicySeconds: sites.delayPolicySeconds,
  units: UNITS,
  detectors: DETECTORS,
  overdue: OVERDUE,
  nextVisitOn: NEXT_VISIT,
}
export type SiteListRow = ListRow<typeof select>

export const siteList: ListSpec<SiteQuery, typeof select> = {
  table: sites,
  // Left joins on primary keys (the customer is a NOT NULL foreign key, so no row is lost): SQLite
  // drops them from the id walk whenever the sort and filters use none of their columns.
  from: (q) =>
    q.leftJoin(customers, eq(customers.id, sites.customerId)).leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId)),
  select,
  sorts: SORTS,
  defaultSort: { key: 'name', dir: 'asc' },
  sortJoins: {
    customer: (q) => q.innerJoin(customers, eq(customers.id, sites.customerId)),
    monitoring: (q) => q.leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId)),
  },
  // Counted per site: over a customer's sites, not all of them.
  // The monitoring company is a name on a nullable key: every site is sorted by it.
  costlySorts: ['units', 'detectors', 'overdue', 'nextVisitOn', 'monitoring'],
  placeholders: (f) => ({ today: f.today }),
  where(f) {
    const fts = f.q ? ftsQuery(f.q) : null
    return [
      fts ? inArray(sites.id, ftsIds('site', fts)) : undefined,
      f.customer ? eq(sites.customerId, f.customer) : undefined,
      inList(sites.region, f.region),
      inList(sites.codeBasis, f.codeBasis),
      f.monitoring ? eq(sites.monitoringCompanyId, f.monitoring) : undefined,
      f.delayPolicy !== undefined ? eq(sites.delayPolicySeconds, f.delayPolicy) : undefined,
    ]
  },
}
