import { and, asc, count, inArray, sql, type SQL } from 'drizzle-orm'
import { z } from 'zod'
import type { Db } from '../db'
import { idParam, type ListSpec } from '../list-query'
import { customerList, customerQuery } from '../lists/customers'
import { deviceList, deviceQuery } from '../lists/devices'
import { eventList, eventQuery } from '../lists/events'
import { siteList, siteQuery } from '../lists/sites'
import { visitList, visitQuery } from '../lists/visits'
import { detectors, events } from '../schema'
import { BulkError, type BulkEntity, type ThroughList } from './action'

/** The most ids one request may name; a bigger set is sent as the list's filter. */
const MAX_IDS = 100_000

const filterValue = z.union([z.string().max(2_000), z.array(z.string().max(2_000)).max(50)])

/** Lists whose rows stand for detectors: a selection there acts on those detectors. */
export const THROUGH_LISTS = ['sites', 'customers', 'events'] as const satisfies readonly ThroughList[]

/**
 * What a bulk request works on: the rows picked by hand (`ids`), or everything a list's filter
 * matches (`filter`: the list page's query string, or the same as an object), resolved here with
 * the list's own conditions so the browser never has to hold the ids. `list` names the list the
 * rows were picked on when it is not the action's own: sites, customers or events, whose rows are
 * turned into their detectors here, in SQL.
 */
export const selectionSchema = z.object({
  ids: z.array(idParam).min(1, 'Select at least one record').max(MAX_IDS, `Select at most ${MAX_IDS} records by id; send the filter instead`).optional(),
  filter: z.union([z.string().max(4_000), z.record(z.string(), filterValue)]).optional(),
  list: z.enum(THROUGH_LISTS, { error: `The list is one of ${THROUGH_LISTS.join(', ')}` }).optional(),
})
export type Selection = z.infer<typeof selectionSchema>

/** What a selection made on another list stood for, for the preview to say. */
export interface Through {
  list: ThroughList
  /** Rows of that list selected (that still exist). */
  records: number
  /** Detectors they stand for. */
  detectors: number
  /** Events of the selection that belong to a whole site, not one detector (events only). */
  withoutDetector?: number
}

// Each entity is selected through the list that shows it, so "all matching" means what the page showed.
const LISTS = {
  visit: { spec: visitList as ListSpec<unknown>, query: visitQuery as z.ZodType },
  detector: { spec: deviceList as ListSpec<unknown>, query: deviceQuery as z.ZodType },
  sites: { spec: siteList as ListSpec<unknown>, query: siteQuery as z.ZodType },
  customers: { spec: customerList as ListSpec<unknown>, query: customerQuery as z.ZodType },
  events: { spec: eventList as ListSpec<unknown>, query: eventQuery as z.ZodType },
} as const

function filterObject(filter: NonNullable<Selection['filter']>): Record<string, string | string[]> {
  if (typeof filter !== 'string') return filter
  const raw: Record<string, string | string[]> = {}
  // Same reading as the list routes: a key given twice becomes a list.
  for (const [k, v] of new URLSearchParams(filter.startsWith('?') ? filter.slice(1) : filter)) {
    const prev = raw[k]
    raw[k] = prev === undefined ? v : Array.isArray(prev) ? [...prev, v] : [prev, v]
  }
  return raw
}

/** The condition on a list's table that the selection stands for: its ids, or its filter's conditions. */
function rowsCondition(list: keyof typeof LISTS, selection: Selection): SQL | undefined {
  if ((selection.ids === undefined) === (selection.filter === undefined)) {
    throw new BulkError(400, 'Send either ids or a filter, not both or neither')
  }
  const { spec, query } = LISTS[list]
  // Raw SQL: the ids as one JSON value, so a selection of any size binds one parameter.
  if (selection.ids) return sql`${spec.table.id} in (select value from json_each(${JSON.stringify(selection.ids)}))`
  const raw = filterObject(selection.filter!)
  // Paging and sort do not narrow a selection: "all matching" means every page.
  for (const k of ['offset', 'limit', 'sort', 'dir']) delete raw[k]
  const parsed = query.safeParse(raw)
  if (!parsed.success) {
    throw new BulkError(400, `The filter is not valid: ${parsed.error.issues.map((i) => `${i.path.join('.') || 'filter'}: ${i.message}`).join('; ')}`)
  }
  const conditions = spec.where(parsed.data).filter((c) => c !== undefined)
  return conditions.length ? and(...conditions) : undefined
}

/** The ids of the selected records, ascending and without repeats. */
export function resolveSelection(db: Db, entity: BulkEntity, selection: Selection): number[] {
  return resolveScope(db, entity, selection).ids
}

/**
 * The ids of the selected records, ascending and without repeats, and, for a selection made on
 * the sites, customers or events list, how many of those rows it held and how many detectors they
 * stand for. Everything is worked out in SQL: the rows of the other list are never read out.
 */
export function resolveScope(db: Db, entity: BulkEntity, selection: Selection): { ids: number[]; through?: Through } {
  const list = selection.list
  if (!list) {
    if (selection.ids && selection.filter === undefined) return { ids: [...new Set(selection.ids)].sort((a, b) => a - b) }
    const { spec } = LISTS[entity]
    // The filters read the listed table's own columns and subqueries, so no join is needed here.
    const where = rowsCondition(entity, selection)
    const rows = db.select({ id: spec.table.id }).from(spec.table).where(where).orderBy(asc(spec.table.id)).all()
    return { ids: rows.map((r) => r.id as number) }
  }
  if (entity !== 'detector') throw new BulkError(400, `A selection of ${list} acts on their detectors; this action changes visits`)
  const where = rowsCondition(list, selection)
  const { spec } = LISTS[list]
  let ids: number[]
  let records: number
  let withoutDetector: number | undefined
  if (list === 'events') {
    // One pass over the events: each names at most one detector, and those of a whole site (no
    // detector) are counted apart. Grouping reads each selected event's row once: the 64,000 trouble
    // events of the demo scale in ~0.37 s, against ~0.93 s when counted and listed apart.
    const groups = db.select({ id: events.detectorId, n: count() }).from(events).where(where).groupBy(events.detectorId).orderBy(asc(events.detectorId)).all()
    records = groups.reduce((sum, g) => sum + g.n, 0)
    withoutDetector = groups.find((g) => g.id === null)?.n ?? 0
    ids = groups.flatMap((g) => (g.id === null ? [] : [g.id]))
  } else {
    records = db.select({ n: count() }).from(spec.table).where(where).get()?.n ?? 0
    const picked = db.select({ id: spec.table.id }).from(spec.table).where(where)
    ids = db
      .select({ id: detectors.id })
      .from(detectors)
      .where(inArray(list === 'sites' ? detectors.siteId : detectors.customerId, picked))
      .orderBy(asc(detectors.id))
      .all()
      .map((r) => r.id)
  }
  return { ids, through: { list, records, detectors: ids.length, ...(withoutDetector !== undefined ? { withoutDetector } : {}) } }
}
