import { z } from 'zod'
import { units } from '../schema'
import { ftsIds, ftsQuery, idParam, multi, pagingSchema, type ListSpec, whereBuilder } from '../list-query'

// Rides detectors_unit_idx: one short index range per unit.
const DETECTORS = '(select count(*) from detectors x where x.unit_id = t.id)'

const SORTS = {
  id: 't.id',
  tag: 't.tag',
  site: 's.name',
  customer: 'c.name',
  kind: 't.kind',
  location: 't.location',
  shutdownInput: 't.shutdown_input',
  supplyCfm: 't.supply_cfm',
  returnCfm: 't.return_cfm',
  storeysServed: 't.storeys_served',
  detectors: DETECTORS,
} as const

export const unitQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  site: idParam.optional(),
  customer: idParam.optional(),
  kind: multi(units.kind.enumValues),
  shutdownInput: multi(units.shutdownInput.enumValues),
})
export type UnitQuery = z.infer<typeof unitQuery>

export interface UnitListRow {
  id: number
  tag: string
  siteId: number
  site: string
  city: string
  customerId: number
  customer: string
  kind: string
  location: string | null
  shutdownInput: string
  supplyCfm: number
  returnCfm: number
  storeysServed: number
  detectors: number
}

export const unitList: ListSpec<UnitQuery> = {
  // Left joins on primary keys (the keys are NOT NULL foreign keys, so no row is lost): SQLite drops
  // them from the id walk whenever the sort and filters use none of their columns.
  from: 'units t left join sites s on s.id = t.site_id left join customers c on c.id = s.customer_id',
  select: {
    id: 't.id',
    tag: 't.tag',
    siteId: 't.site_id',
    site: 's.name',
    city: 's.city',
    customerId: 's.customer_id',
    customer: 'c.name',
    kind: 't.kind',
    location: 't.location',
    shutdownInput: 't.shutdown_input',
    supplyCfm: 't.supply_cfm',
    returnCfm: 't.return_cfm',
    storeysServed: 't.storeys_served',
    detectors: DETECTORS,
  },
  sorts: SORTS,
  defaultSort: { key: 'site', dir: 'asc' },
  countedAs: 'units',
  where(f) {
    const { add, list, done } = whereBuilder()
    const fts = f.q ? ftsQuery(f.q) : null
    if (fts) add(`t.id in (${ftsIds('unit')})`, fts)
    if (f.site) add('t.site_id = ?', f.site)
    if (f.customer) add('t.site_id in (select id from sites where customer_id = ?)', f.customer)
    list('t.kind', f.kind)
    list('t.shutdown_input', f.shutdownInput)
    return done()
  },
}
