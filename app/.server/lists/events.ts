import { eq, gte, inArray, lt, lte, or, sql } from 'drizzle-orm'
import { z } from 'zod'
import { addDays } from '~/domain/dates'
import { EVENT_KINDS } from '~/domain/vocabulary'
import type { Db } from '../db'
import { detectors, events, sites, users } from '../schema'
import { ftsIds, ftsQuery, idParam, inList, isoDate, multi, orNull, pagingSchema, sitesOfCustomer, type ListRow, type ListSpec } from '../list-query'

const SORTS = {
  occurredAt: events.occurredAt,
  kind: events.kind,
  detail: events.detail,
  detector: detectors.tag,
  site: sites.name,
  by: users.name,
}

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
// A broad word's events are counted this far only (a few ms on the time index), shown as "more than".
export const BROAD_COUNT_CAP = 10_000

/** Whether `q` matches so many detectors that its events are best found in time order. */
export function searchIsBroad(db: Db, q: string): boolean {
  const fts = ftsQuery(q)
  if (!fts) return false
  const n = db.get<{ n: number }>(sql`select count(*) as n from ${ftsIds('detector', fts, BROAD_DETECTORS + 1)}`).n
  return n > BROAD_DETECTORS
}

const select = {
  id: events.id,
  occurredAt: events.occurredAt,
  kind: events.kind,
  detail: events.detail,
  detectorId: events.detectorId,
  detectorTag: orNull(detectors.tag),
  siteId: events.siteId,
  site: sites.name,
  // The site's IANA zone: a list shows each event on its site's clock, as the record pages do.
  timeZone: orNull(sites.timeZone),
  userId: events.userId,
  by: orNull(users.name),
}
export type EventListRow = ListRow<typeof select>

const isDay = (v: string) => v.length === 10
// Stored instants are `toISOString()` text; an offset or missing milliseconds would compare wrongly.
const instant = (v: string) => new Date(v).toISOString()

export const eventList: ListSpec<EventQuery, typeof select> = {
  table: events,
  // Left joins on primary keys (detector and user may be absent): SQLite drops them from the id walk
  // whenever the sort and filters use none of their columns.
  from: (q) =>
    q
      .leftJoin(detectors, eq(detectors.id, events.detectorId))
      .leftJoin(sites, eq(sites.id, events.siteId))
      .leftJoin(users, eq(users.id, events.userId)),
  select,
  sorts: SORTS,
  defaultSort: { key: 'occurredAt', dir: 'desc' },
  // Within one site or detector only (eventQuery): a few hundred rows, sorted whole.
  sortJoins: {
    detector: (q) => q.leftJoin(detectors, eq(detectors.id, events.detectorId)),
    site: (q) => q.leftJoin(sites, eq(sites.id, events.siteId)),
    by: (q) => q.leftJoin(users, eq(users.id, events.userId)),
  },
  countCap: (f) => (f.broad ? BROAD_COUNT_CAP : null),
  where(f) {
    const fts = f.q ? ftsQuery(f.q) : null
    return [
      inList(events.kind, f.kind),
      f.site ? eq(events.siteId, f.site) : undefined,
      f.detector ? eq(events.detectorId, f.detector) : undefined,
      f.customer ? inArray(events.siteId, sitesOfCustomer(f.customer)) : undefined,
      f.from ? gte(events.occurredAt, isDay(f.from) ? f.from : instant(f.from)) : undefined,
      f.to ? (isDay(f.to) ? lt(events.occurredAt, addDays(f.to, 1)) : lte(events.occurredAt, instant(f.to))) : undefined,
      // Raw SQL for the FTS5 match, and for the unary plus that keeps SQLite from answering the term
      // through an index (see BROAD_DETECTORS).
      fts && f.broad ? sql`(+${events.detectorId} in ${ftsIds('detector', fts)} or +${events.siteId} in ${ftsIds('site', fts)})` : undefined,
      fts && !f.broad ? or(inArray(events.detectorId, ftsIds('detector', fts)), inArray(events.siteId, ftsIds('site', fts))) : undefined,
    ]
  },
}
