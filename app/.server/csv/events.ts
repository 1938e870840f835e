import { and, eq, sql } from 'drizzle-orm'
import { createHash } from 'node:crypto'
import { eventInstant, type EventRow } from '~/domain/import-schemas'
import type { EVENT_KINDS } from '~/domain/vocabulary'
import type { Db } from '../db'
import { rederive } from '../derivation'
import { customers, detectors, events, sites } from '../schema'
import type { ParsedRow, Problem } from './parse-rows'

const lower = (s: string) => s.toLowerCase()

export interface EventCounts {
  rows: number
  eventsAdded: number
  alreadyPresent: number
  duplicateRows: number
  skippedRows: number
}

interface NewEvent {
  siteId: number
  detectorId: number | null
  occurredAt: string
  kind: (typeof EVENT_KINDS)[number]
  detail: string | null
  sourceKey: string
}

export interface EventPlan {
  events: NewEvent[]
  counts: EventCounts
  problems: Problem[]
  notes: Problem[]
}

/**
 * The key that makes a second import of the same row add nothing: the file's own event id within its
 * source when it has one, else a hash of the row's content as stored (site, detector, instant, kind,
 * detail), so the same signal from two files is one event.
 */
function sourceKey(source: string, e: Omit<NewEvent, 'sourceKey'>, eventId: string | undefined): string {
  if (eventId) return `id:${lower(source)}:${eventId}`
  const text = JSON.stringify([e.siteId, e.detectorId, e.occurredAt, e.kind, e.detail ?? ''])
  return `h:${createHash('sha256').update(text).digest('hex').slice(0, 32)}`
}

/** Works out which rows add events, without writing; each row's site and detector must be found. */
export function planEvents(db: Db, source: string, rows: Array<ParsedRow<EventRow>>, skipped: number): EventPlan {
  const allSites = db
    .select({ id: sites.id, name: sites.name, account: sites.monitoringAccount, timeZone: sites.timeZone, customer: customers.name })
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .all()
  const byAccount = new Map<string, (typeof allSites)[number]>()
  const byName = new Map<string, Array<(typeof allSites)[number]>>()
  for (const s of allSites) {
    if (s.account) byAccount.set(lower(s.account), s)
    byName.set(lower(s.name), [...(byName.get(lower(s.name)) ?? []), s])
  }
  const tagsOf = new Map<number, Map<string, number[]>>()
  const detectorsAt = (siteId: number) => {
    let tags = tagsOf.get(siteId)
    if (!tags) {
      tags = new Map()
      for (const d of db.select({ id: detectors.id, tag: detectors.tag }).from(detectors).where(eq(detectors.siteId, siteId)).all()) {
        tags.set(lower(d.tag), [...(tags.get(lower(d.tag)) ?? []), d.id])
      }
      tagsOf.set(siteId, tags)
    }
    return tags
  }
  const keyTaken = db
    .select({ id: events.id })
    .from(events)
    .where(eq(events.sourceKey, sql.placeholder('key')))
    .prepare()
  // The same event already stored by the console or an import without a key (events_site_idx).
  const sameStored = db
    .select({ id: events.id })
    .from(events)
    .where(
      and(
        eq(events.siteId, sql.placeholder('site')),
        eq(events.occurredAt, sql.placeholder('at')),
        eq(events.kind, sql.placeholder('kind')),
        sql`${events.detectorId} is ${sql.placeholder('detector')}`,
        sql`coalesce(${events.detail}, '') = ${sql.placeholder('detail')}`,
      ),
    )
    .limit(1)
    .prepare()

  const planned: NewEvent[] = []
  const problems: Problem[] = []
  const notes: Problem[] = []
  const inFile = new Map<string, number>()
  const counts: EventCounts = { rows: rows.length + skipped, eventsAdded: 0, alreadyPresent: 0, duplicateRows: 0, skippedRows: skipped }
  const skippedRows = new Set<number>()
  for (const { row, data } of rows) {
    const complain = (field: keyof EventRow, problem: string) => {
      problems.push({ row, column: field, value: String(data[field] ?? ''), problem })
      skippedRows.add(row)
    }
    let site: (typeof allSites)[number] | undefined
    if (data.account !== undefined) {
      site = byAccount.get(lower(data.account))
      if (!site) {
        complain('account', 'No site has this monitoring account')
        continue
      }
    } else {
      const named = (byName.get(lower(data.site!)) ?? []).filter((s) => data.customer === undefined || lower(s.customer) === lower(data.customer))
      if (named.length !== 1) {
        complain('site', named.length === 0 ? 'No site of this name' + (data.customer ? ' for this customer' : '') : `${named.length} sites have this name; add the customer or the monitoring account`)
        continue
      }
      site = named[0]
    }
    let detectorId: number | null = null
    if (data.detector !== undefined) {
      const ids = detectorsAt(site.id).get(lower(data.detector)) ?? []
      if (ids.length !== 1) {
        complain('detector', ids.length === 0 ? `No detector with this tag at ${site.name}` : `${ids.length} detectors at ${site.name} have this tag`)
        continue
      }
      detectorId = ids[0]
    }
    const event = { siteId: site.id, detectorId, occurredAt: eventInstant(data.occurredAt as string, site.timeZone), kind: data.kind!, detail: data.detail ?? null }
    const key = sourceKey(source, event, data.eventId)
    const earlier = inFile.get(key)
    if (earlier !== undefined) {
      counts.duplicateRows++
      notes.push({ row, column: null, value: '', problem: `Same event as row ${earlier}; the row adds nothing` })
      continue
    }
    inFile.set(key, row)
    const present =
      keyTaken.get({ key }) ?? sameStored.get({ site: event.siteId, at: event.occurredAt, kind: event.kind, detector: event.detectorId, detail: event.detail ?? '' })
    if (present) {
      counts.alreadyPresent++
      continue
    }
    planned.push({ ...event, sourceKey: key })
  }
  counts.eventsAdded = planned.length
  counts.skippedRows += skippedRows.size
  return { events: planned, counts, problems, notes }
}

/** Writes the planned events (inside the caller's transaction) and re-derives their detectors. */
export function applyEvents(db: Db, plan: EventPlan, today: string) {
  for (let i = 0; i < plan.events.length; i += 500) db.insert(events).values(plan.events.slice(i, i + 500)).run()
  const touched = [...new Set(plan.events.map((e) => e.detectorId).filter((id): id is number => id !== null))]
  for (let i = 0; i < touched.length; i += 500) rederive(db, touched.slice(i, i + 500), today)
}
