import { and, asc, count, desc, eq, getTableName, inArray, sql, type SQL } from 'drizzle-orm'
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
}

/** Turns free text into an FTS5 prefix query: each word must match the start of a token. */
export function ftsQuery(text: string): string | null {
  const words = text
    .toLowerCase()
    .split(/[^\p{L}\p{N}]+/u)
    .filter(Boolean)
    .slice(0, 8)
  return words.length ? words.map((w) => `"${w}"*`).join(' ') : null
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

type PageStatement = { all: (values: Record<string, unknown>) => unknown[] }
// Per database and list: the prepared page statements by sort, direction and filter text.
const pageStatements = perDb(() => new WeakMap<object, Map<string, PageStatement>>())
const MAX_STATEMENTS = 200

/** The sort key and direction a list request asks for, else the list's default. */
export function listOrder(spec: Pick<ListSpec<never>, 'sorts' | 'defaultSort'>, params: Pick<Paging, 'sort' | 'dir'>) {
  const key = params.sort && spec.sorts[params.sort] ? params.sort : spec.defaultSort.key
  const dir = params.dir ?? (params.sort ? 'asc' : spec.defaultSort.dir)
  return { key, dir }
}

export function runList<F extends Paging, S extends SelectedFields>(db: Db, spec: ListSpec<F, S>, params: F): ListResult<ListRow<S>> {
  const { table } = spec
  const conditions = spec.where(params).filter((c) => c !== undefined)
  const where = conditions.length ? and(...conditions) : undefined
  const filter = where ? dialect.sqlToQuery(where) : { sql: '', params: [] }
  const { key, dir } = listOrder(spec, params)

  const lists = pageStatements(db)
  const statements = lists.get(spec) ?? new Map<string, PageStatement>()
  lists.set(spec, statements)
  const shape = `${key} ${dir} ${filter.sql}`
  let statement = statements.get(shape)
  if (!statement) {
    const shared = where && parameterized(filter.sql, filter.params)
    const by = dir === 'asc' ? asc : desc
    // The id breaks ties so paging is stable.
    const order = [by(spec.sorts[key]), by(table.id)]
    // Page over ids first (an index walk), then fetch the full rows for just that window.
    const window = spec
      .from(db.select({ id: table.id }).from(table).$dynamic())
      .where(shared ?? where)
      .orderBy(...order)
      .limit(sql.placeholder('limit'))
      .offset(sql.placeholder('offset'))
    // Widened to any selection for the join function; the rows are typed from `spec.select` below.
    const selection: SelectedFields = spec.select
    statement = spec.from(db.select(selection).from(table).$dynamic()).where(inArray(table.id, window)).orderBy(...order).prepare()
    if (shared !== null) {
      // Every distinct filter shape adds one: keep the newest couple of hundred.
      if (statements.size >= MAX_STATEMENTS) statements.delete(statements.keys().next().value as string)
      statements.set(shape, statement)
    }
  }
  const values: Record<string, unknown> = { ...spec.placeholders?.(params), limit: params.limit, offset: params.offset }
  filter.params.forEach((value, i) => (values[`w${i}`] = value))
  const rows = statement.all(values) as ListRow<S>[]

  let total: number
  let totalCapped = false
  const kept = spec.keptTotal?.(params)
  const cap = spec.countCap?.(params) ?? null
  if (!where) {
    total = keptRows(db).get({ name: getTableName(table) })?.rows ?? 0
  } else if (kept) {
    total = kept(db)
  } else if (cap !== null) {
    // Counts the first cap + 1 matches only: a few ms however many there are.
    const first = db.select({ one: sql`1` }).from(table).where(where).limit(cap + 1).as('first')
    const n = db.select({ n: count() }).from(first).get()?.n ?? 0
    totalCapped = n > cap
    total = Math.min(n, cap)
  } else {
    const cacheKey = `${getTableName(table)}|${filter.sql}|${JSON.stringify(filter.params)}`
    const hit = totals.get(cacheKey)
    if (hit && hit.version === writeVersion && Date.now() - hit.at < TOTAL_TTL_MS) {
      total = hit.total
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
  return { rows, total, offset: params.offset, limit: params.limit, totalCapped }
}

/** Parses a list route's query string: 400 with the issues on anything it does not accept. */
export function parseQuery<S extends z.ZodType>(schema: S, request: Request): z.infer<S> {
  const url = new URL(request.url)
  const raw: Record<string, string | string[]> = {}
  for (const [k, v] of url.searchParams) {
    const prev = raw[k]
    raw[k] = prev === undefined ? v : Array.isArray(prev) ? [...prev, v] : [prev, v]
  }
  const parsed = schema.safeParse(raw)
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
