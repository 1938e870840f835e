import { and, asc, Column, count, desc, eq, getTableName, inArray, is, SQL, sql } from 'drizzle-orm'
import type { SelectResultFields } from 'drizzle-orm/query-builders/select.types'
import { alias, QueryBuilder, SQLiteSyncDialect, type SelectedFields, type SQLiteColumn, type SQLiteSelect, type SQLiteTable } from 'drizzle-orm/sqlite-core'
import { z } from 'zod'
import { dateProblem } from '~/domain/dates'
import type { Db } from './db'
import { perDb } from './repos/statements'
import { sites, tableCounts } from './schema'

/** A select from a list's table (better-sqlite3 answers synchronously). */
type ListSelect = SQLiteSelect<string, 'sync'>

/**
 * One fleet table in Drizzle's terms: what to select, how each visible column sorts, and how filters
 * become conditions. Filtering, sorting and paging all happen in SQLite, over indexes.
 */
export interface ListSpec<F, S extends SelectedFields = SelectedFields> {
  /** The table listed: pages are walked over its `id`, its kept total is `table_counts.name`. */
  table: SQLiteTable & { id: SQLiteColumn }
  /** Applies the joins to a select from `table`. */
  from: (query: ListSelect) => ListSelect
  /** Output field → column or expression; the row type is inferred from it (`ListRow`). */
  select: S
  /** Sort key (the column id the UI shows) → column or expression. */
  sorts: Record<string, SQLiteColumn | SQL>
  defaultSort: { key: string; dir: 'asc' | 'desc' }
  /**
   * Joins the id walk needs for sort keys on another table's column: inner joins on NOT NULL keys,
   * so SQLite may start from that table's index (a left join fixes the listed table as the outer
   * loop and sorts every row). Other walks join nothing.
   */
  sortJoins?: Partial<Record<string, (query: ListSelect) => ListSelect>>
  /**
   * Sort keys no index serves (a count per row, a name on a nullable key): SQLite computes and sorts
   * every matching row. Offered only while the filters leave at most `COSTLY_SORT_ROWS`.
   */
  costlySorts?: readonly string[]
  /**
   * Sort keys whose whole order is worked out once and kept, on the same terms as totals: a count per
   * row over a small table, where counting for every row costs far more than reading the page's rows.
   */
  keptOrders?: readonly string[]
  /** Facts about the filters that need the database (whether a word is broad), added before the query is built. */
  refine?: (db: Db, filters: F) => F
  /** A kept total for some filtered views (a reader of a counter table), or null to count. */
  keptTotal?: (filters: F) => ((db: Db) => number) | null
  /**
   * For filters whose exact count would read a large share of the table (a broad word over millions
   * of events): count no further than this, and report the total as "more than" it.
   */
  countCap?: (filters: F) => number | null
  /**
   * The filters' conditions, all to hold (`undefined` for a filter not given), on the listed table's
   * own columns or through subqueries: totals are counted without the joins.
   */
  where: (filters: F) => Array<SQL | undefined>
  /** Values of the `sql.placeholder`s in `select` and `sorts` (such as the office's day). */
  placeholders?: (filters: F) => Record<string, unknown>
}

/**
 * A list row as selected. Each column keeps its own nullability; a column of a table joined on a
 * key that may be null is selected through `orNull`.
 */
export type ListRow<S extends SelectedFields> = SelectResultFields<S>

/** A column of a table left-joined on a nullable key: null on rows with no such record. */
export function orNull<C extends SQLiteColumn>(column: C) {
  return sql`${column}`.mapWith(column) as SQL<C['_']['data'] | null>
}

// Builds subqueries without a database handle: the specs are module constants (`db.$count` needs one).
const qb = new QueryBuilder()

/** A correlated count as a column: the rows of `table` meeting `condition`. */
export function countOf(table: SQLiteTable, condition: SQL | undefined) {
  return sql<number>`${qb.select({ n: count() }).from(table).where(condition)}`.mapWith(Number)
}

/** Whether any row of `table` meets `condition`, as a column (SQLite answers 0 or 1). */
export function existsIn(table: SQLiteTable, condition: SQL | undefined) {
  return sql`exists ${qb.select({ one: sql`1` }).from(table).where(condition)}`.mapWith((v: number) => v === 1)
}

// Its own name: the lists that filter by customer also join `sites` for the rows' names.
const customerSite = alias(sites, 'customer_site')

/** The ids of one customer's sites, for `inArray(table.siteId, …)`. */
export function sitesOfCustomer(customer: number) {
  return qb.select({ id: customerSite.id }).from(customerSite).where(eq(customerSite.customerId, customer))
}

/** `column in (…)` for a multi filter, or nothing when the filter is not given. */
export function inList<C extends SQLiteColumn>(column: C, values: ReadonlyArray<C['_']['data']> | undefined) {
  return values?.length ? inArray(column, values) : undefined
}

export const MAX_LIMIT = 500

/** Paging and sorting parameters shared by every list route. */
export function pagingSchema(sortKeys: readonly [string, ...string[]]) {
  return z.object({
    q: z.string().trim().max(200).optional(),
    sort: z.enum(sortKeys).optional(),
    dir: z.enum(['asc', 'desc']).optional(),
    offset: wholeNumber(0, 10_000_000).default(0),
    limit: wholeNumber(1, MAX_LIMIT).default(100),
  })
}

export interface ListResult<Row> {
  rows: Row[]
  total: number
  offset: number
  limit: number
  /** True when counting stopped at its cap: there are more than `total` matching rows. */
  totalCapped: boolean
}

// Filtered totals cost a count over the matching rows (tens of ms on millions of events), so each
// filter's total is kept for a short while; a page request then costs only its indexed window. A kept
// total is exact: every write in this process that can change a list drops them all (listsChanged);
// the time limit covers the rare write from outside it (a script run against the live file).
const TOTAL_TTL_MS = 30_000
const totals = new Map<string, { total: number; at: number; version: number }>()
const MAX_CACHED = 500
let writeVersion = 0

/** Call after a write that can change list membership: cached totals are dropped at once. */
export function listsChanged() {
  writeVersion++
  totals.clear()
  anchorsByList.clear()
  orders.clear()
}

/**
 * Turns free text into an FTS5 query: each word must match the start of a token, and a word of one
 * character a whole token (the S of RTU-1-S). The index keeps prefixes of two and three characters
 * (drizzle/0001_search_and_counts.sql); a one-character prefix has none, and would merge the lists
 * of every token starting with it (60–150 ms over the fleet's words, for a match no one wants).
 */
export function ftsQuery(text: string): string | null {
  const words = text
    .toLowerCase()
    .split(/[^\p{L}\p{N}]+/u)
    .filter(Boolean)
    .slice(0, 8)
  return words.length ? words.map((w) => ([...w].length === 1 ? `"${w}"` : `"${w}"*`)).join(' ') : null
}

// search_index rowids are id * 4 + kind (drizzle/0001_search_and_counts.sql).
const FTS_KINDS = { customer: [0, 'customers'], site: [1, 'sites'], unit: [2, 'units'], detector: [3, 'detectors'] } as const
export type FtsKind = keyof typeof FTS_KINDS

/**
 * Keeps the search_index rows of one kind. Both tests are on the rowid, so neither reads a stored
 * column of the matches; and as no row of a kind lies past its table's highest id, FTS5 stops the
 * scan there (a customer search reads only the first few hundred rowids of each word's list).
 */
export function ftsKindRows(kind: FtsKind): string {
  const [code, table] = FTS_KINDS[kind]
  return `rowid % 4 = ${code} and rowid <= (select max(id) from ${table}) * 4 + 3`
}

/**
 * The ids of one kind matching an `ftsQuery`, the first `limit` of them if given, as a parenthesized
 * subquery. Raw SQL: the builder has no word for an FTS5 MATCH.
 */
export function ftsIds(kind: FtsKind, match: string, limit?: number): SQL {
  const first = limit === undefined ? undefined : sql` limit ${limit}`
  return sql`(select rowid / 4 from search_index where search_index match ${match} and ${sql.raw(ftsKindRows(kind))}${first})`
}

// A word matching more detectors than this matches a large share of them: its rows are found sooner
// by walking the list's order and testing each against the matches than by fetching every match and
// sorting them.
const BROAD_MATCHES = 1000

/** Whether `q` matches so many records of a kind that its list is best walked in the list's order. */
export function wordIsBroad(db: Db, kind: FtsKind, q: string | undefined): boolean {
  const fts = q ? ftsQuery(q) : null
  if (!fts) return false
  return db.get<{ n: number }>(sql`select count(*) as n from ${ftsIds(kind, fts, BROAD_MATCHES + 1)}`).n > BROAD_MATCHES
}

type Paging = { q?: string; sort?: string; dir?: 'asc' | 'desc'; offset: number; limit: number }

// Read on every unfiltered page: prepared once per database.
const keptRows = perDb((db) =>
  db
    .select({ rows: tableCounts.rows })
    .from(tableCounts)
    .where(eq(tableCounts.name, sql.placeholder('name')))
    .prepare(),
)

// Renders the filters alone, to key the statement cache: rendering the whole page statement costs
// ~150 µs and preparing it 25–100 µs, against ~400 µs to run an indexed page at demo scale.
const dialect = new SQLiteSyncDialect()

/**
 * The filters' text with each value a numbered placeholder (`w0`, `w1`…), so that requests that
 * differ only in values share one prepared statement. Null when the text holds a `?` that is not a
 * parameter.
 */
function parameterized(text: string, values: unknown[]): SQL | null {
  const parts = text.split('?')
  if (parts.length !== values.length + 1) return null
  return sql.join(parts.map((part, i) => (i === 0 ? sql.raw(part) : sql`${sql.placeholder(`w${i - 1}`)}${sql.raw(part)}`)))
}

/**
 * A prepared page statement and how to read its rows: it is run for raw value arrays, each field
 * decoded by its own column or expression (looked up once here, not per value per row as the ORM's
 * row mapper does: that lookup cost more than the SQL of an indexed page), and the order terms follow
 * the fields, undecoded, for anchors.
 */
interface PageStatement {
  values: (values: Record<string, unknown>) => unknown[][]
  names: string[]
  decoders: Array<{ mapFromDriverValue: (value: unknown) => unknown }>
}

/** The decoder of a selected field, as the ORM picks it: a column decodes its own values. */
function decoderOf(field: unknown): PageStatement['decoders'][number] {
  // An expression's decoder is the one `mapWith` set (the ORM keeps it on the SQL, untyped).
  const decoderOfSql = (q: SQL) => (q as unknown as { decoder: PageStatement['decoders'][number] }).decoder
  if (is(field, Column)) return field
  if (is(field, SQL)) return decoderOfSql(field)
  if (is(field, SQL.Aliased)) return decoderOfSql(field.sql)
  throw new Error('A list selects columns and expressions only, each at the top level')
}
// Per database and list: the prepared page statements by sort, direction, anchor and filter text.
const pageStatements = perDb(() => new WeakMap<object, Map<string, PageStatement>>())
const MAX_STATEMENTS = 200

/** The sort key and direction a list request asks for, else the list's default. */
export function listOrder(spec: Pick<ListSpec<never>, 'sorts' | 'defaultSort'>, params: Pick<Paging, 'sort' | 'dir'>) {
  const key = params.sort && spec.sorts[params.sort] ? params.sort : spec.defaultSort.key
  const dir = params.dir ?? (params.sort ? 'asc' : spec.defaultSort.dir)
  return { key, dir }
}

/**
 * The expressions a list is ordered by: the sort key, then the id, so paging is stable. An index on
 * the key's column alone holds exactly this order (SQLite ends every index with the rowid).
 */
export function orderTerms(spec: Pick<ListSpec<never>, 'sorts' | 'table'>, key: string): Array<SQLiteColumn | SQL> {
  return [spec.sorts[key], spec.table.id]
}

/** `ORDER BY` for a list's key and direction (the CSV export walks the same order). */
export function orderBy(spec: Pick<ListSpec<never>, 'sorts' | 'table'>, key: string, dir: 'asc' | 'desc') {
  const by = dir === 'asc' ? asc : desc
  return orderTerms(spec, key).map((term) => by(term))
}

// Anchors: the sort values of rows already served, by their place in the list, per list, filter and
// sort. A page next to one is read from it by its sort values (keyset paging: an index seek, then
// the page) instead of walking every row before it; a page nearer the end than the start is walked
// from the end. So scrolling on through a deep list, or jumping to its end, costs what the first
// page does. Kept on the same terms as totals: dropped on any write here, and after 30 s.
interface Anchors {
  at: number
  version: number
  rows: Map<number, unknown[]>
}
const anchorsByList = new Map<string, Anchors>()
const MAX_ANCHOR_LISTS = 200
const MAX_ANCHORS = 5_000

/** Where a page is read from: the list's start or end, or just past a served row. */
interface Walk {
  /** Walks the list's order backwards (the page's rows are then put back in order). */
  reversed: boolean
  /** Rows to skip from where the walk starts. */
  skip: number
  /** The sort values of the row the walk starts after, if from an anchor. */
  after: unknown[] | null
}

/**
 * The cheapest walk to rows [offset, offset + limit): from the start, from the end (when the total is
 * known exactly), or on from the nearest anchor on either side.
 */
function chooseWalk(offset: number, limit: number, total: number | null, anchors: Map<number, unknown[]> | undefined): Walk {
  let best: Walk & { cost: number } = { reversed: false, skip: offset, after: null, cost: offset }
  if (total !== null) {
    const fromEnd = Math.max(0, total - offset - limit)
    if (fromEnd < best.cost) best = { reversed: true, skip: fromEnd, after: null, cost: fromEnd }
  }
  for (const [at, values] of anchors ?? []) {
    if (at < offset && offset - at - 1 < best.cost) best = { reversed: false, skip: offset - at - 1, after: values, cost: offset - at - 1 }
    if (at >= offset + limit && at - offset - limit < best.cost) best = { reversed: true, skip: at - offset - limit, after: values, cost: at - offset - limit }
  }
  return best
}

/** Whether SQLite can seek to an anchor of this order: every term a column the walk reads, none null where it matters. */
function anchorable(spec: Pick<ListSpec<never>, 'table'>, terms: Array<SQLiteColumn | SQL>) {
  // A term on a joined table would make SQLite choose its plan across both tables, badly; an
  // expression (a count) has no index to seek in; a nullable column sorts its nulls apart.
  return terms.every((t) => is(t, Column) && t.table === spec.table && t.notNull)
}

/** Rows a sort without an index may order: computed and sorted whole, in about 10 ms. */
export const COSTLY_SORT_ROWS = 5_000

function filtersOf<F>(spec: ListSpec<F>, params: F) {
  const conditions = spec.where(params).filter((c) => c !== undefined)
  const where = conditions.length ? and(...conditions) : undefined
  return { where, filter: where ? dialect.sqlToQuery(where) : { sql: '', params: [] as unknown[] } }
}

/** The sort keys a list offers with these filters: every indexed one, the rest only over few rows. */
export function offeredSorts<F extends Paging>(db: Db, spec: ListSpec<F>, query: F): string[] {
  const params = spec.refine ? spec.refine(db, query) : query
  const { where, filter } = filtersOf(spec, params)
  const few = () => listTotal(db, spec, params, where, filter).total <= COSTLY_SORT_ROWS
  let small: boolean | undefined
  return Object.keys(spec.sorts).filter((k) => !spec.costlySorts?.includes(k) || (small ??= few()))
}

export function runList<F extends Paging, S extends SelectedFields>(db: Db, spec: ListSpec<F, S>, query: F): ListResult<ListRow<S>> {
  const { table } = spec
  const params = spec.refine ? spec.refine(db, query) : query
  const { where, filter } = filtersOf(spec, params)
  const { key, dir } = listOrder(spec, params)
  const { total, totalCapped } = listTotal(db, spec, params, where, filter)
  if (spec.costlySorts?.includes(key) && (totalCapped || total > COSTLY_SORT_ROWS)) {
    throw Response.json(
      { error: 'Invalid query', issues: [{ path: 'sort', message: `Sorting by ${key} needs filters that leave at most ${COSTLY_SORT_ROWS.toLocaleString('en-US')} rows; this view has ${total.toLocaleString('en-US')}.` }] },
      { status: 400 },
    )
  }

  const terms = orderTerms(spec, key)
  const placeholders = spec.placeholders?.(params) ?? {}
  const listKey = `${getTableName(table)}|${key} ${dir}|${filter.sql}|${JSON.stringify(filter.params)}|${JSON.stringify(placeholders)}`
  const canAnchor = anchorable(spec, terms)
  let anchors = canAnchor ? anchorsByList.get(listKey) : undefined
  if (anchors && (anchors.version !== writeVersion || Date.now() - anchors.at > TOTAL_TTL_MS)) {
    anchorsByList.delete(listKey)
    anchors = undefined
  }

  const limit = totalCapped ? params.limit : Math.max(0, Math.min(params.limit, total - params.offset))
  if (limit === 0) return { rows: [], total, offset: params.offset, limit: params.limit, totalCapped }
  if (spec.keptOrders?.includes(key)) {
    const ids = keptOrder(db, spec, listKey, where, key, dir, placeholders).slice(params.offset, params.offset + limit)
    return { rows: rowsInOrder(db, spec, ids, placeholders), total, offset: params.offset, limit: params.limit, totalCapped }
  }
  const walk = chooseWalk(params.offset, limit, totalCapped ? null : total, anchors?.rows)
  // The direction SQLite walks in: the list's, or the other way for a walk from the end.
  const walkDir = walk.reversed === (dir === 'asc') ? 'desc' : 'asc'

  const lists = pageStatements(db)
  const statements = lists.get(spec) ?? new Map<string, PageStatement>()
  lists.set(spec, statements)
  const shape = `${key} ${walkDir} ${walk.after ? 'after' : 'start'} ${filter.sql}`
  let statement = statements.get(shape)
  if (!statement) {
    const shared = where && parameterized(filter.sql, filter.params)
    // Past an anchor: a row value comparison that SQLite answers with a seek in the (key, …, id) index.
    const after = walk.after
      ? sql`(${sql.join(terms, sql`, `)}) ${sql.raw(walkDir === 'asc' ? '>' : '<')} (${sql.join(
          terms.map((_, i) => sql.placeholder(`a${i}`)),
          sql`, `,
        )})`
      : undefined
    const order = orderBy(spec, key, walkDir)
    const join = spec.sortJoins?.[key] ?? ((q: ListSelect) => q)
    // Page over ids first (an index walk), then fetch the full rows for just that window.
    const window = join(db.select({ id: table.id }).from(table).$dynamic())
      .where(and(shared ?? where, after))
      .orderBy(...order)
      .limit(sql.placeholder('limit'))
      .offset(sql.placeholder('offset'))
    // Widened to any selection for the join function; the rows are typed from `spec.select` below.
    // The order's terms come back too (unmapped, as stored), to anchor later pages on.
    const selection: SelectedFields = { ...spec.select, ...Object.fromEntries(terms.map((t, i) => [`__order${i}`, sql`${t}`])) }
    const prepared = spec.from(db.select(selection).from(table).$dynamic()).where(inArray(table.id, window)).orderBy(...order).prepare()
    // The columns come back in the selection's order (the ORM builds the select list from its entries).
    statement = { values: (v) => prepared.values(v), names: Object.keys(spec.select), decoders: Object.values(spec.select).map(decoderOf) }
    if (shared !== null) {
      // Every distinct filter shape adds one: keep the newest couple of hundred.
      if (statements.size >= MAX_STATEMENTS) statements.delete(statements.keys().next().value as string)
      statements.set(shape, statement)
    }
  }
  const values: Record<string, unknown> = { ...placeholders, limit, offset: walk.skip }
  filter.params.forEach((value, i) => (values[`w${i}`] = value))
  walk.after?.forEach((value, i) => (values[`a${i}`] = value))
  const found = statement.values(values)
  if (walk.reversed) found.reverse()

  const { names, decoders } = statement
  const width = names.length
  const rows = found.map((raw) => {
    const out: Record<string, unknown> = {}
    for (let i = 0; i < width; i++) out[names[i]] = raw[i] === null ? null : decoders[i].mapFromDriverValue(raw[i])
    return out as ListRow<S>
  })
  if (canAnchor && found.length) {
    if (!anchors) {
      if (anchorsByList.size >= MAX_ANCHOR_LISTS) anchorsByList.delete(anchorsByList.keys().next().value as string)
      anchors = { at: Date.now(), version: writeVersion, rows: new Map() }
      anchorsByList.set(listKey, anchors)
    }
    if (anchors.rows.size < MAX_ANCHORS) {
      const valuesOf = (raw: unknown[]) => raw.slice(width, width + terms.length)
      anchors.rows.set(params.offset, valuesOf(found[0]))
      anchors.rows.set(params.offset + found.length - 1, valuesOf(found[found.length - 1]))
    }
  }
  return { rows, total, offset: params.offset, limit: params.limit, totalCapped }
}

// Kept orders: every matching id in a costly order, per list, filter and sort, kept on the terms of
// totals (dropped on any write here, and after 30 s).
const orders = new Map<string, { ids: number[]; at: number; version: number }>()
const MAX_ORDERS = 50

/** The ids of every row the filters keep, in the list's order: worked out once, then kept a while. */
function keptOrder<F>(db: Db, spec: ListSpec<F>, listKey: string, where: SQL | undefined, key: string, dir: 'asc' | 'desc', placeholders: Record<string, unknown>) {
  const hit = orders.get(listKey)
  if (hit && hit.version === writeVersion && Date.now() - hit.at < TOTAL_TTL_MS) return hit.ids
  const join = spec.sortJoins?.[key] ?? ((q: ListSelect) => q)
  const found = join(db.select({ id: spec.table.id }).from(spec.table).$dynamic())
    .where(where)
    .orderBy(...orderBy(spec, key, dir))
    .prepare()
    .all(placeholders) as Array<{ id: number }>
  const ids = found.map((r) => r.id)
  if (orders.size >= MAX_ORDERS) orders.delete(orders.keys().next().value as string)
  orders.set(listKey, { ids, at: Date.now(), version: writeVersion })
  return ids
}

/** The rows of these ids, in the ids' order. */
function rowsInOrder<F, S extends SelectedFields>(db: Db, spec: ListSpec<F, S>, ids: number[], placeholders: Record<string, unknown>): Array<ListRow<S>> {
  if (!ids.length) return []
  const found = spec.from(db.select(spec.select as SelectedFields).from(spec.table).$dynamic()).where(inArray(spec.table.id, ids)).prepare().all(placeholders) as Array<Record<string, unknown> & { id: number }>
  const byId = new Map(found.map((r) => [r.id, r]))
  return ids.flatMap((id) => {
    const row = byId.get(id)
    return row ? [row as ListRow<S>] : []
  })
}

/** The list's total: kept, counted up to a cap, or counted (and kept a while). */
function listTotal<F extends Paging>(db: Db, spec: ListSpec<F>, params: F, where: SQL | undefined, filter: { sql: string; params: unknown[] }) {
  const { table } = spec
  let total: number
  let totalCapped = false
  const kept = spec.keptTotal?.(params)
  const cap = spec.countCap?.(params) ?? null
  if (!where) {
    total = keptRows(db).get({ name: getTableName(table) })?.rows ?? 0
  } else if (kept) {
    total = kept(db)
  } else {
    const cacheKey = `${getTableName(table)}|${cap}|${filter.sql}|${JSON.stringify(filter.params)}`
    const hit = totals.get(cacheKey)
    if (hit && hit.version === writeVersion && Date.now() - hit.at < TOTAL_TTL_MS) {
      total = hit.total
      totalCapped = cap !== null && total > cap
      total = Math.min(total, cap ?? total)
    } else if (cap !== null) {
      // Counts the first cap + 1 matches only (tens of ms for a broad word over millions of events;
      // kept as a total is, since every page of the search would count them again).
      const first = db.select({ one: sql`1` }).from(table).where(where).limit(cap + 1).as('first')
      const n = db.select({ n: count() }).from(first).get()?.n ?? 0
      if (totals.size >= MAX_CACHED) totals.delete(totals.keys().next().value as string)
      totals.set(cacheKey, { total: n, at: Date.now(), version: writeVersion })
      totalCapped = n > cap
      total = Math.min(n, cap)
    } else {
      // Counted over the listed table alone, as the filters read only its columns (and subqueries),
      // and a left join on a key adds no rows. SQLite keeps left joins in an aggregate, where each
      // costs a lookup per row (3 s, not 30 ms, over 440,000 events).
      total = db.select({ n: count() }).from(table).where(where).get()?.n ?? 0
      // Every distinct filter adds an entry: keep the newest few hundred.
      if (totals.size >= MAX_CACHED) totals.delete(totals.keys().next().value as string)
      totals.set(cacheKey, { total, at: Date.now(), version: writeVersion })
    }
  }
  return { total, totalCapped }
}

function rawQuery(request: Request) {
  const raw: Record<string, string | string[]> = {}
  for (const [k, v] of new URL(request.url).searchParams) {
    const prev = raw[k]
    raw[k] = prev === undefined ? v : Array.isArray(prev) ? [...prev, v] : [prev, v]
  }
  return raw
}

/**
 * The sort keys a list page offers for the filters in its address (`offeredSorts`); with filters the
 * list route would refuse, the indexed ones alone.
 */
export function pageSorts<S extends z.ZodType, F extends Paging>(db: Db, spec: ListSpec<F>, schema: S, request: Request, extra: Partial<F> = {}): string[] {
  const parsed = schema.safeParse(rawQuery(request))
  if (!parsed.success) return Object.keys(spec.sorts).filter((k) => !spec.costlySorts?.includes(k))
  return offeredSorts(db, spec, { ...(parsed.data as F), ...extra })
}

/** Parses a list route's query string: 400 with the issues on anything it does not accept. */
export function parseQuery<S extends z.ZodType>(schema: S, request: Request): z.infer<S> {
  const parsed = schema.safeParse(rawQuery(request))
  if (!parsed.success) {
    throw Response.json(
      { error: 'Invalid query', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) },
      { status: 400 },
    )
  }
  return parsed.data
}

/** A filter that takes one or more values: `?state=trouble&state=alarm` or `?state=trouble,alarm`. */
export function multi<T extends readonly [string, ...string[]]>(values: T) {
  return z.preprocess(
    (v) => (v === undefined || v === '' ? undefined : (Array.isArray(v) ? v : [v]).flatMap((s) => String(s).split(',')).filter(Boolean)),
    z.array(z.enum(values)).min(1).max(values.length).optional(),
  )
}

/** A calendar date as YYYY-MM-DD that exists (no 2026-02-30) and lies in the accepted range. */
export const isoDate = z.string().superRefine((value, ctx) => {
  const problem = dateProblem(value)
  if (problem) ctx.addIssue({ code: 'custom', message: problem })
})

// Plain decimal digits only: z.coerce.number() would also take '0x10', '1e2', ' 12', '12.0' and
// 'true', so a mistyped id could quietly select a different record.
const WHOLE = /^(0|[1-9][0-9]{0,15})$/

/** A whole number from `min` to `max` written in plain digits (or sent as a JSON number). */
export function wholeNumber(min: number, max: number, message = `Use a whole number from ${min} to ${max}, in plain digits`) {
  return z
    .union([z.string(), z.number()], { error: message })
    .refine((v) => (typeof v === 'number' ? Number.isSafeInteger(v) : WHOLE.test(v) && Number.isSafeInteger(Number(v))), message)
    .transform(Number)
    .refine((n) => n >= min && n <= max, message)
}

/** A record id: a positive whole number in plain digits, as a path or query parameter or a JSON number. */
export const idParam = wholeNumber(1, Number.MAX_SAFE_INTEGER, 'Use a record number: plain digits, 1 or more')
