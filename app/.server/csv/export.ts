import Database from 'better-sqlite3'
import { stringify } from 'csv-stringify'
import { and, Column, eq, fillPlaceholders, is, SQL } from 'drizzle-orm'
import type { SelectedFields } from 'drizzle-orm/sqlite-core'
import { Readable } from 'node:stream'
import type { ReadableStream as WebStream } from 'node:stream/web'
import { z } from 'zod'
import type { Db } from '../db'
import { listOrder, orderBy, parseQuery, type ListSpec } from '../list-query'
import { customerList, customerQuery } from '../lists/customers'
import { deviceList, deviceQuery } from '../lists/devices'
import { eventList, eventQuery, searchIsBroad } from '../lists/events'
import { siteList, siteQuery } from '../lists/sites'
import { triageQuery, triageSpec } from '../lists/triage'
import { unitList, unitQuery } from '../lists/units'
import { visitList, visitQuery } from '../lists/visits'
import { customers, detectorModels, detectors, monitoringCompanies, sites, units } from '../schema'
import { officeToday } from '../today'
import { safeCell } from './cells'

// The detectors' file carries, beside the list's columns, every field an inventory import reads, so
// an exported fleet can be brought back in (or into another copy) as it is.
const inventorySelect = {
  ...deviceList.select,
  customerKind: customers.kind,
  street: sites.street,
  region: sites.region,
  postalCode: sites.postalCode,
  timeZone: sites.timeZone,
  jurisdiction: sites.jurisdiction,
  ahjName: sites.ahjName,
  codeBasis: sites.codeBasis,
  monitoring: monitoringCompanies.name,
  monitoringAccount: sites.monitoringAccount,
  unitKind: units.kind,
  shutdownInput: units.shutdownInput,
  supplyCfm: units.supplyCfm,
  returnCfm: units.returnCfm,
  ductShape: units.ductShape,
  serial: detectors.serial,
  model: detectorModels.name,
  eolOhms: detectors.eolOhms,
  eolPlacement: detectors.eolPlacement,
  alarmTerminal: detectors.alarmTerminal,
  supervisoryTerminal: detectors.supervisoryTerminal,
  conductorAwg: detectors.conductorAwg,
  conductorStranded: detectors.conductorStranded,
  runFeet: detectors.runFeet,
}
const detectorsWithInventory: ListSpec<z.infer<typeof deviceQuery>> = {
  ...deviceList,
  from: (q) =>
    deviceList
      .from(q)
      .leftJoin(detectorModels, eq(detectorModels.id, detectors.modelId))
      .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId)),
  select: inventorySelect,
}

// Events carry the customer and monitoring account too, so an events file names its sites plainly.
const eventsWithSites: ListSpec<z.infer<typeof eventQuery> & { broad?: boolean }> = {
  ...eventList,
  from: (q) => eventList.from(q).leftJoin(customers, eq(customers.id, sites.customerId)),
  select: { ...eventList.select, customer: customers.name, account: sites.monitoringAccount },
}

const triageWithReasons: ListSpec<z.infer<typeof triageQuery>> = {
  ...triageSpec,
  select: { ...triageSpec.select, reasons: detectors.riskReasons },
}

interface ExportList {
  spec: ListSpec<never>
  /** The list route's own query schema and what its route adds (the office day, the search breadth). */
  parse: (db: Db, request: Request) => Record<string, unknown>
  /** Per-cell tidying after decoding (stored code lists shown as plain text). */
  tidy?: (key: string, value: unknown) => unknown
}

/** One list: its spec with the parse its route uses, the types tied together here and erased after. */
function entry<F>(spec: ListSpec<F>, parse: (db: Db, request: Request) => F, tidy?: ExportList['tidy']): ExportList {
  return { spec: spec as unknown as ListSpec<never>, parse: parse as ExportList['parse'], tidy }
}

// Each list as its route reads it: the same schema, the same spec, the same additions.
const LISTS: Record<ExportListName, ExportList> = {
  detectors: entry(detectorsWithInventory, (_db, r) => parseQuery(deviceQuery, r)),
  sites: entry(siteList, (_db, r) => ({ ...parseQuery(siteQuery, r), today: officeToday() })),
  customers: entry(customerList, (_db, r) => parseQuery(customerQuery, r)),
  units: entry(unitList, (_db, r) => parseQuery(unitQuery, r)),
  visits: entry(visitList, (_db, r) => parseQuery(visitQuery, r)),
  events: entry(eventsWithSites, (db, r) => {
    const q = parseQuery(eventQuery, r)
    return { ...q, broad: q.q ? searchIsBroad(db, q.q) : false }
  }),
  triage: entry(triageWithReasons, (_db, r) => parseQuery(triageQuery, r), (key, value) =>
    key === 'reasons' && typeof value === 'string' ? value.split(',').filter(Boolean).join(' ') : value,
  ),
}

export const EXPORT_LISTS = ['detectors', 'sites', 'customers', 'units', 'visits', 'events', 'triage'] as const
export const exportListParam = z.enum(EXPORT_LISTS, { error: `Export one of: ${EXPORT_LISTS.join(', ')}` })
export type ExportListName = z.infer<typeof exportListParam>

/** Turns a stored value into what the column means (booleans, mapped SQL), as Drizzle would. */
function decoderOf(field: unknown): (v: unknown) => unknown {
  if (is(field, Column)) return (v) => (v === null ? null : field.mapFromDriverValue(v))
  if (is(field, SQL)) {
    const decoder = (field as unknown as { decoder: { mapFromDriverValue: (v: unknown) => unknown } }).decoder
    return (v) => (v === null ? null : decoder.mapFromDriverValue(v))
  }
  return (v) => v
}

/**
 * The statement for every row of the list's current filter and sort: the list spec's own joins,
 * conditions and order, without the page window.
 */
function fullStatement(db: Db, list: ExportList, params: Record<string, unknown>) {
  const spec = list.spec as unknown as ListSpec<Record<string, unknown>>
  const conditions = spec.where(params).filter((c) => c !== undefined)
  const { key, dir } = listOrder(spec, params as { sort?: string; dir?: 'asc' | 'desc' })
  const selection: SelectedFields = spec.select
  const query = spec
    .from(db.select(selection).from(spec.table).$dynamic())
    .where(conditions.length ? and(...conditions) : undefined)
    .orderBy(...orderBy(spec, key, dir))
    .toSQL()
  return { sql: query.sql, params: fillPlaceholders(query.params, spec.placeholders?.(params) ?? {}), columns: Object.keys(spec.select), decoders: Object.values(spec.select).map(decoderOf) }
}

/**
 * Rows of the statement, read one at a time. A file database gets its own read-only connection: an
 * open iterator keeps its connection busy, and the export hands the event loop back between chunks,
 * when the app's connection must be free for other requests. The read sees one snapshot throughout.
 */
function* walk(db: Db, statement: string, params: unknown[]): Generator<unknown[]> {
  const file = db.$client.name
  const own = file && file !== ':memory:' && !db.$client.memory ? new Database(file, { readonly: true, fileMustExist: true }) : null
  try {
    const prepared = (own ?? db.$client).prepare(statement).raw(true)
    yield* prepared.iterate(...params) as Iterable<unknown[]>
  } finally {
    own?.close()
  }
}

// Cells are cast to text here, so the same rules hold in every list: yes/no for flags, formula
// starts quoted for spreadsheets.
const CAST = {
  boolean: (v: boolean) => (v ? 'yes' : 'no'),
  string: (v: string) => safeCell(v),
}

/**
 * The list as CSV, streamed: rows are read, cast and written in step with the client's reading, so
 * memory stays flat however many rows match. Parses the query as the list route does (400 on error).
 */
export function exportCsv(db: Db, name: ExportListName, request: Request): ReadableStream<Uint8Array> {
  const list = LISTS[name]
  const params = list.parse(db, request)
  const { sql, params: values, columns, decoders } = fullStatement(db, list, params)
  const tidy = list.tidy
  function* records() {
    for (const raw of walk(db, sql, values)) {
      const row = raw.map((v, i) => decoders[i](v))
      yield tidy ? row.map((v, i) => tidy(columns[i], v)) : row
    }
  }
  const csv = stringify({ header: true, columns, cast: CAST, bom: false })
  const source = Readable.from(records(), { highWaterMark: 256 })
  source.on('error', (e) => csv.destroy(e))
  // A client that stops reading ends the walk too, closing the read connection.
  csv.on('close', () => source.destroy())
  source.pipe(csv)
  return Readable.toWeb(csv) as unknown as WebStream<Uint8Array> as unknown as ReadableStream<Uint8Array>
}
