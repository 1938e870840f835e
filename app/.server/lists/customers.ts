import { and, eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { customers, detectors, sites } from '../schema'
import { countOf, ftsIds, ftsQuery, inList, multi, pagingSchema, type ListRow, type ListSpec } from '../list-query'

// Correlated counts, computed only for the rows shown unless the table is sorted by one. Sites and
// detectors are counted within detectors_customer_idx and sites_customer_idx alone; overdue and in
// trouble read every detector row of the customer, so sorting all 320 stress-scale customers by
// them costs ~100 ms (an index on detectors (customer_id, due_status, state) made it ~10 ms).
const SITES = countOf(sites, eq(sites.customerId, customers.id))
const DETECTORS = countOf(detectors, eq(detectors.customerId, customers.id))
const OVERDUE = countOf(detectors, and(eq(detectors.customerId, customers.id), eq(detectors.dueStatus, 'overdue')))
const IN_TROUBLE = countOf(detectors, and(eq(detectors.customerId, customers.id), eq(detectors.state, 'trouble')))

const SORTS = {
  id: customers.id,
  name: customers.name,
  kind: customers.kind,
  sites: SITES,
  detectors: DETECTORS,
  overdue: OVERDUE,
  inTrouble: IN_TROUBLE,
}

export const customerQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  kind: multi(customers.kind.enumValues),
})
export type CustomerQuery = z.infer<typeof customerQuery>

const select = {
  id: customers.id,
  name: customers.name,
  kind: customers.kind,
  sites: SITES,
  detectors: DETECTORS,
  overdue: OVERDUE,
  inTrouble: IN_TROUBLE,
}
export type CustomerListRow = ListRow<typeof select>

export const customerList: ListSpec<CustomerQuery, typeof select> = {
  table: customers,
  from: (q) => q,
  select,
  sorts: SORTS,
  defaultSort: { key: 'name', dir: 'asc' },
  // Each count read for all the customers (detectors and overdue scan the fleet's detector index):
  // 10–15 ms a page at stress scale, against well under one for the page's own rows.
  keptOrders: ['sites', 'detectors', 'overdue', 'inTrouble'],
  where(f) {
    const fts = f.q ? ftsQuery(f.q) : null
    return [fts ? inArray(customers.id, ftsIds('customer', fts)) : undefined, inList(customers.kind, f.kind)]
  },
}
