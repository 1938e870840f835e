import { and, asc, count, inArray, isNotNull, isNull, sql, type SQL } from 'drizzle-orm'
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
  const records = db.select({ n: count() }).from(spec.table).where(where).get()?.n ?? 0
  let ids: number[]
  let withoutDetector: number | undefined
  if (list === 'events') {
    // An event names at most one detector; events of a whole site stand for none and are counted apart.
    ids = db
      .selectDistinct({ id: events.detectorId })
      .from(events)
      .where(and(isNotNull(events.detectorId), where))
      .orderBy(asc(events.detectorId))
      .all()
      .map((r) => r.id as number)
    withoutDetector = db.select({ n: count() }).from(events).where(and(isNull(events.detectorId), where)).get()?.n ?? 0
  } else {
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
