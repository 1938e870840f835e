import { z } from 'zod'
import { addDays } from '~/domain/dates'
import type { Db } from '../db'
import { EVENT_KINDS } from '~/domain/vocabulary'
import { ftsIds, ftsQuery, idParam, inList, isoDate, multi, pagingSchema, type ListSpec, whereBuilder } from '../list-query'

const SORTS = {
  occurredAt: 't.occurred_at',
  kind: 't.kind',
  detail: 't.detail',
  detector: 'd.tag',
  site: 's.name',
  by: 'u.name',
} as const

// Millions of rows: occurredAt is served by events_time_idx (and by the site, detector and kind
// indexes, which all end in occurred_at). Any other order sorts every event: over the 2.1 million
// at stress scale, site or detail took 200–260 ms a page and a deep page by kind ~1 s, warm. So
// they are offered only within one detector or one site, where a few hundred rows are sorted.
const INDEXED_SORTS: readonly string[] = ['occurredAt']

/** A day (whole UTC day) or an instant with its offset. */
const bound = z.union([isoDate, z.iso.datetime({ offset: true })], { error: 'Use YYYY-MM-DD or an ISO 8601 date-time' })

export const eventQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>])
  .extend({
    kind: multi(EVENT_KINDS),
    site: idParam.optional(),
    detector: idParam.optional(),
    customer: idParam.optional(),
    from: bound.optional(),
    to: bound.optional(),
  })
  .superRefine((f, ctx) => {
    if (f.sort && !INDEXED_SORTS.includes(f.sort) && f.detector === undefined && f.site === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['sort'],
        message: `Sorting events by ${f.sort} needs a detector or site filter; across all events only occurredAt is offered.`,
      })
    }
  })
// `broad` is set by the route (`searchIsBroad`), never taken from the client.
export type EventQuery = z.infer<typeof eventQuery> & { broad?: boolean }

// Words matching more detectors than this match a large share of all events. Their newest events
// are then found soonest by walking events_time_idx and testing each against the matches (25 ms for
// 'rtu', 75% of 2.1 million events) than by gathering every match through the detector index and
// sorting it (360 ms). For a narrow search (a street, a serial) the index is right, and far faster.
const BROAD_DETECTORS = 1000

/** Whether `q` matches so many detectors that its events are best found in time order. */
export function searchIsBroad(db: Db, q: string): boolean {
  const fts = ftsQuery(q)
  if (!fts) return false
  const sql = `select count(*) as n from (${ftsIds('detector')} limit ${BROAD_DETECTORS + 1})`
  return (db.$client.prepare(sql).get(fts) as { n: number }).n > BROAD_DETECTORS
}

export interface EventListRow {
  id: number
  occurredAt: string
  kind: string
  detail: string | null
  detectorId: number | null
  detectorTag: string | null
  siteId: number
  site: string
  userId: number | null
  by: string | null
}

const isDay = (v: string) => v.length === 10
// Stored instants are `toISOString()` text; an offset or missing milliseconds would compare wrongly.
const instant = (v: string) => new Date(v).toISOString()

export const eventList: ListSpec<EventQuery> = {
  // Left joins on primary keys (detector and user may be absent): SQLite drops them from the id walk
  // whenever the sort and filters use none of their columns.
  from: 'events t left join detectors d on d.id = t.detector_id left join sites s on s.id = t.site_id left join users u on u.id = t.user_id',
  select: {
    id: 't.id',
    occurredAt: 't.occurred_at',
    kind: 't.kind',
    detail: 't.detail',
    detectorId: 't.detector_id',
    detectorTag: 'd.tag',
    siteId: 't.site_id',
    site: 's.name',
    userId: 't.user_id',
    by: 'u.name',
  },
  sorts: SORTS,
  defaultSort: { key: 'occurredAt', dir: 'desc' },
  countedAs: 'events',
  where(f) {
    const { add, done } = whereBuilder()
    if (f.kind?.length) {
      const l = inList('t.kind', f.kind)
      add(l.clause, ...l.params)
    }
    if (f.site) add('t.site_id = ?', f.site)
    if (f.detector) add('t.detector_id = ?', f.detector)
    if (f.customer) add('t.site_id in (select id from sites where customer_id = ?)', f.customer)
    if (f.from) add('t.occurred_at >= ?', isDay(f.from) ? f.from : instant(f.from))
    if (f.to) {
      if (isDay(f.to)) add('t.occurred_at < ?', addDays(f.to, 1))
      else add('t.occurred_at <= ?', instant(f.to))
    }
    const fts = f.q ? ftsQuery(f.q) : null
    if (fts) {
      // A unary plus keeps SQLite from answering the term through an index (see BROAD_DETECTORS).
      const col = (name: string) => (f.broad ? `+t.${name}` : `t.${name}`)
      add(`(${col('detector_id')} in (${ftsIds('detector')}) or ${col('site_id')} in (${ftsIds('site')}))`, fts, fts)
    }
    return done()
  },
}
