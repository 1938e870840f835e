import { z } from 'zod'
import { sites } from '../schema'
import { ftsIds, ftsQuery, idParam, multi, pagingSchema, type ListSpec, whereBuilder } from '../list-query'

// Counts ride detectors_site_idx and units_site_idx, the next visit visits_site_idx. The overdue
// count also reads each detector's row for its status: sorting all 15,000 stress-scale sites by it
// costs ~80 ms (an index on detectors (site_id, due_status) made it ~13 ms).
const UNITS = '(select count(*) from units x where x.site_id = t.id)'
const DETECTORS = '(select count(*) from detectors x where x.site_id = t.id)'
const OVERDUE = `(select count(*) from detectors x where x.site_id = t.id and x.due_status = 'overdue')`
// `@today` is the office's day, set by the route: the next visit still to come.
const NEXT_VISIT = `(select min(v.scheduled_on) from visits v
  where v.site_id = t.id and v.scheduled_on >= @today and v.status in ('planned', 'notified'))`

const SORTS = {
  id: 't.id',
  name: 't.name',
  customer: 'c.name',
  street: 't.street',
  city: 't.city',
  region: 't.region',
  codeBasis: 't.code_basis',
  monitoring: 'm.name',
  delayPolicySeconds: 't.delay_policy_seconds',
  units: UNITS,
  detectors: DETECTORS,
  overdue: OVERDUE,
  nextVisitOn: NEXT_VISIT,
} as const

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

export interface SiteListRow {
  id: number
  name: string
  customerId: number
  customer: string
  street: string
  city: string
  region: string
  codeBasis: string
  monitoringId: number | null
  monitoring: string | null
  delayPolicySeconds: number
  units: number
  detectors: number
  overdue: number
  nextVisitOn: string | null
}

export const siteList: ListSpec<SiteQuery> = {
  // Left joins on primary keys (the customer is a NOT NULL foreign key, so no row is lost): SQLite
  // drops them from the id walk whenever the sort and filters use none of their columns.
  from: 'sites t left join customers c on c.id = t.customer_id left join monitoring_companies m on m.id = t.monitoring_company_id',
  select: {
    id: 't.id',
    name: 't.name',
    customerId: 't.customer_id',
    customer: 'c.name',
    street: 't.street',
    city: 't.city',
    region: 't.region',
    codeBasis: 't.code_basis',
    monitoringId: 't.monitoring_company_id',
    monitoring: 'm.name',
    delayPolicySeconds: 't.delay_policy_seconds',
    units: UNITS,
    detectors: DETECTORS,
    overdue: OVERDUE,
    nextVisitOn: NEXT_VISIT,
  },
  sorts: SORTS,
  defaultSort: { key: 'name', dir: 'asc' },
  countedAs: 'sites',
  named: (f) => ({ today: f.today }),
  where(f) {
    const { add, list, done } = whereBuilder()
    const fts = f.q ? ftsQuery(f.q) : null
    if (fts) add(`t.id in (${ftsIds('site')})`, fts)
    if (f.customer) add('t.customer_id = ?', f.customer)
    list('t.region', f.region)
    list('t.code_basis', f.codeBasis)
    if (f.monitoring) add('t.monitoring_company_id = ?', f.monitoring)
    if (f.delayPolicy !== undefined) add('t.delay_policy_seconds = ?', f.delayPolicy)
    return done()
  },
}
