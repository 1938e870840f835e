import { eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { customers, detectors, sites, units } from '../schema'
import { countOf, ftsIds, ftsQuery, idParam, inList, multi, pagingSchema, sitesOfCustomer, type ListSpec } from '../list-query'

// Rides detectors_unit_idx: one short index range per unit.
const DETECTORS = countOf(detectors, eq(detectors.unitId, units.id))

const SORTS = {
  id: units.id,
  tag: units.tag,
  site: sites.name,
  customer: customers.name,
  kind: units.kind,
  location: units.location,
  shutdownInput: units.shutdownInput,
  supplyCfm: units.supplyCfm,
  returnCfm: units.returnCfm,
  storeysServed: units.storeysServed,
  detectors: DETECTORS,
}

export const unitQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  site: idParam.optional(),
  customer: idParam.optional(),
  kind: multi(units.kind.enumValues),
  shutdownInput: multi(units.shutdownInput.enumValues),
})
export type UnitQuery = z.infer<typeof unitQuery>

const select = {
  id: units.id,
  tag: units.tag,
  siteId: units.siteId,
  site: sites.name,
  city: sites.city,
  customerId: sites.customerId,
  customer: customers.name,
  kind: units.kind,
  location: units.location,
  shutdownInput: units.shutdownInput,
  supplyCfm: units.supplyCfm,
  returnCfm: units.returnCfm,
  storeysServed: units.storeysServed,
  detectors: DETECTORS,
}

export const unitList: ListSpec<UnitQuery, typeof select> = {
  table: units,
  // Left joins on primary keys (the keys are NOT NULL foreign keys, so no row is lost): SQLite drops
  // them from the id walk whenever the sort and filters use none of their columns.
  from: (q) => q.leftJoin(sites, eq(sites.id, units.siteId)).leftJoin(customers, eq(customers.id, sites.customerId)),
  select,
  sorts: SORTS,
  defaultSort: { key: 'site', dir: 'asc' },
  sortJoins: {
    site: (q) => q.innerJoin(sites, eq(sites.id, units.siteId)),
    customer: (q) => q.innerJoin(sites, eq(sites.id, units.siteId)).innerJoin(customers, eq(customers.id, sites.customerId)),
  },
  // Units are listed within a site or a customer; these orders have no index over all of them.
  costlySorts: ['kind', 'location', 'shutdownInput', 'supplyCfm', 'returnCfm', 'storeysServed', 'detectors'],
  where(f) {
    const fts = f.q ? ftsQuery(f.q) : null
    return [
      fts ? inArray(units.id, ftsIds('unit', fts)) : undefined,
      f.site ? eq(units.siteId, f.site) : undefined,
      f.customer ? inArray(units.siteId, sitesOfCustomer(f.customer)) : undefined,
      inList(units.kind, f.kind),
      inList(units.shutdownInput, f.shutdownInput),
    ]
  },
}
