import { z } from 'zod'
import { ftsIds, ftsQuery, inList, multi, pagingSchema, type ListSpec } from '../list-query'

export const customerKinds = ['restaurant', 'retail', 'office', 'school', 'healthcare'] as const

// A few hundred customers: correlated counts over detectors_customer_idx and sites_customer_idx
// cost a handful of milliseconds even when the whole table is sorted by one of them.
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
  kind: multi(customerKinds),
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
