import { z } from 'zod'
import { customers } from '../schema'
import { ftsIds, ftsQuery, inList, multi, pagingSchema, type ListSpec } from '../list-query'

// Correlated counts, computed only for the rows shown unless the table is sorted by one. Sites and
// detectors are counted within detectors_customer_idx and sites_customer_idx alone; overdue and in
// trouble read every detector row of the customer, so sorting all 320 stress-scale customers by
// them costs ~100 ms (an index on detectors (customer_id, due_status, state) made it ~10 ms).
const count = (from: string, extra = '') => `(select count(*) from ${from} where x.customer_id = t.id${extra})`
const SITES = count('sites x')
const DETECTORS = count('detectors x')
const OVERDUE = count('detectors x', ` and x.due_status = 'overdue'`)
const IN_TROUBLE = count('detectors x', ` and x.state = 'trouble'`)

const SORTS = {
  id: 't.id',
  name: 't.name',
  kind: 't.kind',
  sites: SITES,
  detectors: DETECTORS,
  overdue: OVERDUE,
  inTrouble: IN_TROUBLE,
} as const

export const customerQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  kind: multi(customers.kind.enumValues),
})
export type CustomerQuery = z.infer<typeof customerQuery>

export interface CustomerListRow {
  id: number
  name: string
  kind: string
  sites: number
  detectors: number
  overdue: number
  inTrouble: number
}

export const customerList: ListSpec<CustomerQuery> = {
  from: 'customers t',
  select: {
    id: 't.id',
    name: 't.name',
    kind: 't.kind',
    sites: SITES,
    detectors: DETECTORS,
    overdue: OVERDUE,
    inTrouble: IN_TROUBLE,
  },
  sorts: SORTS,
  defaultSort: { key: 'name', dir: 'asc' },
  countedAs: 'customers',
  where(f) {
    const clauses: string[] = []
    const params: unknown[] = []
    const fts = f.q ? ftsQuery(f.q) : null
    if (fts) {
      clauses.push(`t.id in (${ftsIds('customer')})`)
      params.push(fts)
    }
    if (f.kind?.length) {
      const l = inList('t.kind', f.kind)
      clauses.push(l.clause)
      params.push(...l.params)
    }
    return { clauses, params }
  },
}
