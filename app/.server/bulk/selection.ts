import { and, asc } from 'drizzle-orm'
import { z } from 'zod'
import type { Db } from '../db'
import { idParam, type ListSpec } from '../list-query'
import { deviceList, deviceQuery } from '../lists/devices'
import { visitList, visitQuery } from '../lists/visits'
import { BulkError, type BulkEntity } from './action'

/** The most ids one request may name; a bigger set is sent as the list's filter. */
const MAX_IDS = 100_000

const filterValue = z.union([z.string().max(2_000), z.array(z.string().max(2_000)).max(50)])

/**
 * What a bulk request works on: the rows picked by hand (`ids`), or everything a list's filter
 * matches (`filter`: the list page's query string, or the same as an object), resolved here with
 * the list's own conditions so the browser never has to hold the ids.
 */
export const selectionSchema = z.object({
  ids: z.array(idParam).min(1, 'Select at least one record').max(MAX_IDS, `Select at most ${MAX_IDS} records by id; send the filter instead`).optional(),
  filter: z.union([z.string().max(4_000), z.record(z.string(), filterValue)]).optional(),
})
export type Selection = z.infer<typeof selectionSchema>

// Each entity is selected through the list that shows it, so "all matching" means what the page showed.
const LISTS = {
  visit: { spec: visitList as ListSpec<unknown>, query: visitQuery as z.ZodType },
  detector: { spec: deviceList as ListSpec<unknown>, query: deviceQuery as z.ZodType },
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

/** The ids of the selected records, ascending and without repeats. */
export function resolveSelection(db: Db, entity: BulkEntity, selection: Selection): number[] {
  if ((selection.ids === undefined) === (selection.filter === undefined)) {
    throw new BulkError(400, 'Send either ids or a filter, not both or neither')
  }
  if (selection.ids) return [...new Set(selection.ids)].sort((a, b) => a - b)
  const { spec, query } = LISTS[entity]
  const raw = filterObject(selection.filter!)
  // Paging and sort do not narrow a selection: "all matching" means every page.
  for (const k of ['offset', 'limit', 'sort', 'dir']) delete raw[k]
  const parsed = query.safeParse(raw)
  if (!parsed.success) {
    throw new BulkError(400, `The filter is not valid: ${parsed.error.issues.map((i) => `${i.path.join('.') || 'filter'}: ${i.message}`).join('; ')}`)
  }
  const conditions = spec.where(parsed.data).filter((c) => c !== undefined)
  // The filters read the listed table's own columns and subqueries, so no join is needed here.
  return db
    .select({ id: spec.table.id })
    .from(spec.table)
    .where(conditions.length ? and(...conditions) : undefined)
    .orderBy(asc(spec.table.id))
    .all()
    .map((r) => r.id as number)
}
