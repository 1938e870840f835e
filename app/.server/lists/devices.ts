import { eq, gte, inArray, lte, sql, type SQL } from 'drizzle-orm'
import { z } from 'zod'
import { DETECTOR_STATES, DUE_STATUSES, ENVIRONMENTS, HOUSINGS, DELAY_AGREEMENTS, LOOP_VERDICTS, POSITIONS } from '~/domain/vocabulary'
import { customers, detectors, sites, units } from '../schema'
import { ftsIds, ftsQuery, idParam, inList, isoDate, multi, pagingSchema, wordIsBroad, type ListRow, type ListSpec } from '../list-query'

const select = {
  id: detectors.id,
  tag: detectors.tag,
  siteId: detectors.siteId,
  site: sites.name,
  city: sites.city,
  customerId: detectors.customerId,
  customer: customers.name,
  unitId: detectors.unitId,
  unit: units.tag,
  position: detectors.position,
  state: detectors.state,
  due: detectors.dueStatus,
  nextDueOn: detectors.nextDueOn,
  environment: detectors.environment,
  housing: detectors.housing,
  delay: detectors.delayAgreement,
  loop: detectors.loopVerdict,
  risk: detectors.riskScore,
  lastFunctionalOn: detectors.lastFunctionalOn,
  installedOn: detectors.installedOn,
}
// A column's id is its field and its sort key: each sortable column sorts by the column it shows.
const SORTABLE = ['tag', 'site', 'customer', 'unit', 'position', 'state', 'due', 'nextDueOn', 'environment', 'housing', 'delay', 'loop', 'risk', 'lastFunctionalOn', 'installedOn'] as const
const SORTS = Object.fromEntries(SORTABLE.map((k) => [k, select[k]])) as Pick<typeof select, (typeof SORTABLE)[number]>

export const deviceQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  state: multi(DETECTOR_STATES),
  due: multi(DUE_STATUSES),
  environment: multi(ENVIRONMENTS),
  housing: multi(HOUSINGS),
  delay: multi(DELAY_AGREEMENTS),
  loop: multi(LOOP_VERDICTS),
  position: multi(POSITIONS),
  customer: idParam.optional(),
  site: idParam.optional(),
  unit: idParam.optional(),
  assignedTo: idParam.optional(),
  nextDueFrom: isoDate.optional(),
  nextDueTo: isoDate.optional(),
  installedFrom: isoDate.optional(),
  installedTo: isoDate.optional(),
  minRisk: z.coerce.number().int().min(0).optional(),
})
// `broad` is set from the database (`wordIsBroad`), never taken from the client.
export type DeviceQuery = z.infer<typeof deviceQuery> & { broad?: boolean }

export type DeviceListRow = ListRow<typeof select>

/**
 * Detectors whose words (tag, serial, site, unit…) start with those of `q`. A broad word (most of the
 * fleet's detectors hold "rtu") is tested row by row along the list's order: the unary plus keeps
 * SQLite from fetching every match first and sorting them (180 ms, against 20 ms for the walk).
 */
export function detectorSearch(q: string | undefined, broad = false): SQL | undefined {
  const fts = q ? ftsQuery(q) : null
  if (!fts) return undefined
  // Raw SQL for the unary plus, which the builder has no word for.
  return broad ? sql`+${detectors.id} in ${ftsIds('detector', fts)}` : inArray(detectors.id, ftsIds('detector', fts))
}

export const deviceList: ListSpec<DeviceQuery, typeof select> = {
  table: detectors,
  // Left joins, though every detector has all three (NOT NULL foreign keys): SQLite drops an unused
  // left join, so paging and counting over detectors alone stay on the detectors indexes.
  from: (q) =>
    q
      .leftJoin(sites, eq(sites.id, detectors.siteId))
      .leftJoin(customers, eq(customers.id, detectors.customerId))
      .leftJoin(units, eq(units.id, detectors.unitId)),
  select,
  sorts: SORTS,
  defaultSort: { key: 'risk', dir: 'desc' },
  sortJoins: {
    site: (q) => q.innerJoin(sites, eq(sites.id, detectors.siteId)),
    customer: (q) => q.innerJoin(customers, eq(customers.id, detectors.customerId)),
    unit: (q) => q.innerJoin(units, eq(units.id, detectors.unitId)),
  },
  refine: (db, f) => ({ ...f, broad: wordIsBroad(db, 'detector', f.q) }),
  where: (f) => [
    detectorSearch(f.q, f.broad),
    inList(detectors.state, f.state),
    inList(detectors.dueStatus, f.due),
    inList(detectors.environment, f.environment),
    inList(detectors.housing, f.housing),
    inList(detectors.delayAgreement, f.delay),
    inList(detectors.loopVerdict, f.loop),
    inList(detectors.position, f.position),
    f.customer ? eq(detectors.customerId, f.customer) : undefined,
    f.site ? eq(detectors.siteId, f.site) : undefined,
    f.unit ? eq(detectors.unitId, f.unit) : undefined,
    f.assignedTo ? eq(detectors.assignedTo, f.assignedTo) : undefined,
    f.nextDueFrom ? gte(detectors.nextDueOn, f.nextDueFrom) : undefined,
    f.nextDueTo ? lte(detectors.nextDueOn, f.nextDueTo) : undefined,
    f.installedFrom ? gte(detectors.installedOn, f.installedFrom) : undefined,
    f.installedTo ? lte(detectors.installedOn, f.installedTo) : undefined,
    f.minRisk !== undefined ? gte(detectors.riskScore, f.minRisk) : undefined,
  ],
}
