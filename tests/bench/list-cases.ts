// The list requests the console can make: every sort and filter each list page offers, first and last
// page, the palette's searches, Triage by each reason and the record routes. Records are picked from
// the database so the cases hold at any scale.
import type Database from 'better-sqlite3'
import { DELAY_AGREEMENTS, DETECTOR_STATES, DUE_STATUSES, ENVIRONMENTS, EVENT_KINDS, HOUSINGS, LOOP_VERDICTS, REASON_CODES } from '~/domain/vocabulary'

export interface ListCase {
  name: string
  /** Path and query, as the browser asks for it. */
  path: string
}

const DEVICE_SORTS = ['tag', 'site', 'customer', 'position', 'state', 'due', 'nextDueOn', 'environment', 'delay', 'loop', 'risk', 'lastFunctionalOn']
const DEVICE_FILTERS: Record<string, readonly string[]> = {
  state: DETECTOR_STATES,
  due: DUE_STATUSES,
  environment: ENVIRONMENTS,
  housing: HOUSINGS,
  delay: DELAY_AGREEMENTS,
  loop: LOOP_VERDICTS,
}
// Sorts no index serves are offered only over a few thousand rows (`costlySorts`): timed within one customer.
const NARROW: Record<string, string[]> = {
  '/api/sites': ['units', 'detectors', 'overdue', 'nextVisitOn', 'monitoring'],
  '/api/visits': ['technician', 'detectors', 'notified'],
}
const LISTS: Array<{ path: string; sorts: string[]; filters: Record<string, readonly string[]> }> = [
  { path: '/api/devices', sorts: DEVICE_SORTS, filters: DEVICE_FILTERS },
  { path: '/api/customers', sorts: ['name', 'kind', 'sites', 'detectors', 'overdue', 'inTrouble'], filters: { kind: ['restaurant', 'retail', 'office', 'school', 'healthcare'] } },
  {
    path: '/api/sites',
    sorts: ['name', 'customer', 'city', 'region', 'codeBasis', 'delayPolicySeconds'],
    filters: { codeBasis: ['imc', 'nfpa90a'] },
  },
  {
    path: '/api/visits',
    sorts: ['scheduledOn', 'kind', 'status', 'site', 'city', 'customer'],
    filters: { status: ['planned', 'notified', 'in-progress', 'done', 'cancelled'], kind: ['inspection', 'test', 'cleaning', 'repair', 'commissioning'] },
  },
  { path: '/api/events', sorts: ['occurredAt'], filters: { kind: EVENT_KINDS } },
  // The orders the Triage page offers; the other detector orders only over few rows (`costlySorts`).
  { path: '/api/triage', sorts: ['risk', 'tag', 'site', 'customer', 'state', 'due'], filters: { reason: REASON_CODES, acknowledged: ['only', 'all'] } },
]

const one = <T>(db: Database.Database, sql: string, ...params: unknown[]) => db.prepare(sql).get(...params) as T

/** A page from the end: the list's total less one page, read from the first page's answer. */
export type LastPage = (path: string) => Promise<number | null>

export function listCases(db: Database.Database): { lists: ListCase[]; records: ListCase[]; searches: ListCase[] } {
  const lists: ListCase[] = []
  for (const list of LISTS) {
    const name = list.path.replace('/api/', '')
    for (const sort of list.sorts) {
      for (const dir of ['asc', 'desc']) lists.push({ name: `api ${name} sort=${sort} ${dir}`, path: `${list.path}?sort=${sort}&dir=${dir}&limit=100` })
    }
    for (const [param, values] of Object.entries(list.filters)) {
      for (const v of values) lists.push({ name: `api ${name} ${param}=${v}`, path: `${list.path}?${param}=${v}&limit=100` })
    }
  }
  const customer = one<{ id: number }>(db, 'select customer_id as id from sites group by customer_id order by count(*) desc limit 1').id
  const site = one<{ id: number }>(db, 'select site_id as id from detectors where customer_id = ? group by site_id order by count(*) desc limit 1', customer).id
  const unit = one<{ id: number }>(db, 'select id from units where site_id = ? order by id limit 1', site).id
  const detector = one<{ id: number }>(db, 'select id from detectors where site_id = ? order by id limit 1', site).id
  const visit = one<{ id: number }>(db, 'select visit_id as id from visit_detectors group by visit_id order by count(*) desc limit 1').id
  const tech = one<{ id: number }>(db, "select id from users where role = 'technician' order by id limit 1").id
  const street = one<{ street: string }>(db, 'select street from sites where id = ?', site).street
  const city = one<{ city: string }>(db, 'select city from sites where id = ?', site).city
  const tag = one<{ tag: string }>(db, 'select tag from detectors where id = ?', detector).tag
  // Filters reached from a record's counts (a customer's, a site's, a unit's detectors…).
  lists.push(
    { name: `api devices customer=${customer}`, path: `/api/devices?customer=${customer}&limit=100` },
    { name: `api devices site=${site}`, path: `/api/devices?site=${site}&limit=100` },
    { name: `api devices unit=${unit}`, path: `/api/devices?unit=${unit}&limit=100` },
    { name: `api sites customer=${customer}`, path: `/api/sites?customer=${customer}&limit=100` },
    { name: `api units site=${site}`, path: `/api/units?site=${site}&limit=100` },
    { name: `api units customer=${customer}`, path: `/api/units?customer=${customer}&limit=100` },
    { name: `api visits site=${site}`, path: `/api/visits?site=${site}&limit=100` },
    { name: `api visits customer=${customer}`, path: `/api/visits?customer=${customer}&limit=100` },
    { name: `api visits technician=${tech}`, path: `/api/visits?technician=${tech}&limit=100` },
    { name: 'api visits from..to (a month)', path: '/api/visits?from=2026-06-01&to=2026-06-30&limit=100' },
    { name: `api events site=${site}`, path: `/api/events?site=${site}&limit=100` },
    { name: `api events detector=${detector}`, path: `/api/events?detector=${detector}&limit=100` },
    { name: `api events customer=${customer}`, path: `/api/events?customer=${customer}&limit=100` },
    { name: 'api events from..to (a week)', path: '/api/events?from=2026-06-01&to=2026-06-07&limit=100' },
    { name: `api triage customer=${customer}`, path: `/api/triage?customer=${customer}&limit=100` },
  )
  for (const [path, sorts] of Object.entries(NARROW)) {
    for (const sort of sorts) lists.push({ name: `api ${path.replace('/api/', '')} customer=${customer} sort=${sort} desc`, path: `${path}?customer=${customer}&sort=${sort}&dir=desc&limit=100` })
  }
  for (const sort of ['kind', 'detail', 'detector', 'site', 'by']) lists.push({ name: `api events site=${site} sort=${sort}`, path: `/api/events?site=${site}&sort=${sort}&limit=100` })

  // Search: one, two and three letters, and whole words, in the palette and in each list's box.
  const words = [street.slice(0, 1), street.slice(0, 2), street.slice(0, 3), street.split(' ').slice(0, 2).join(' '), city, tag, 'rtu']
  const searches: ListCase[] = []
  for (const w of words) {
    const q = encodeURIComponent(w.toLowerCase())
    searches.push({ name: `search palette q=${w}`, path: `/api/search?q=${q}` })
    for (const list of ['devices', 'events', 'sites', 'customers', 'visits', 'triage']) searches.push({ name: `search ${list} q=${w}`, path: `/api/${list}?q=${q}&limit=100` })
  }
  const records: ListCase[] = [
    { name: `record customer ${customer}`, path: `/api/customers/${customer}` },
    { name: `record site ${site}`, path: `/api/sites/${site}` },
    { name: `record unit ${unit}`, path: `/api/units/${unit}` },
    { name: `record detector ${detector}`, path: `/api/devices/${detector}` },
    { name: `record visit ${visit}`, path: `/api/visits/${visit}` },
  ]
  return { lists, records, searches }
}
