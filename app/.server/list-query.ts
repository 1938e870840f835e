import { z } from 'zod'
import { dateProblem } from '~/domain/dates'
import type { Db } from './db'

/**
 * One fleet table as SQL: what to select, how each visible column sorts, and how filters become
 * WHERE clauses. Filtering, sorting and paging all happen in SQLite, over indexes.
 */
export interface ListSpec<F> {
  /** FROM clause with its joins; the main table's alias is `t`. */
  from: string
  /** Output field → SQL expression. */
  select: Record<string, string>
  /** Sort key (the column id the UI shows) → SQL expression. */
  sorts: Record<string, string>
  defaultSort: { key: string; dir: 'asc' | 'desc' }
  /** Kept row total for the unfiltered table (`table_counts.name`). */
  countedAs: string
  /** A kept total for some filtered views (a reader of a counter table), or null to count. */
  keptTotal?: (filters: F) => ((db: Db) => number) | null
  where: (filters: F) => { clauses: string[]; params: unknown[] }
  /**
   * Named parameters (`@name`) for `select` and `sorts`, which are fixed strings: a positional `?`
   * there would shift the WHERE clause's own parameters.
   */
  named?: (filters: F) => Record<string, unknown>
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
  /** False when the total came from the per-filter cache and rows may have changed since. */
  totalExact: boolean
}

// Filtered totals cost a count over the matching rows (tens of ms on millions of events), so each
// filter's total is kept for a short while; a page request then costs only its indexed window.
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

/** Subquery of the ids of one kind matching an `ftsQuery` (its one parameter). */
export function ftsIds(kind: FtsKind): string {
  return `select rowid / 4 from search_index where search_index match ? and ${ftsKindRows(kind)}`
}

export function runList<F extends { q?: string; sort?: string; dir?: 'asc' | 'desc'; offset: number; limit: number }, Row>(
  db: Db,
  spec: ListSpec<F>,
  params: F,
): ListResult<Row> {
  const q = db.$client
  const { clauses, params: values } = spec.where(params)
  const named = spec.named ? [spec.named(params)] : []
  const where = clauses.length ? `where ${clauses.join(' and ')}` : ''
  const key = params.sort && spec.sorts[params.sort] ? params.sort : spec.defaultSort.key
  const dir = params.dir ?? (params.sort ? 'asc' : spec.defaultSort.dir)
  // The id breaks ties so paging is stable.
  const order = `order by ${spec.sorts[key]} ${dir}, t.id ${dir}`
  const columns = Object.entries(spec.select)
    .map(([alias, expr]) => `${expr} as "${alias}"`)
    .join(', ')
  // Page over ids first (an index walk), then fetch the full rows for just that window.
  const rows = q
    .prepare(
      `select ${columns} from ${spec.from} where t.id in (select t.id from ${spec.from} ${where} ${order} limit ? offset ?) ${order}`,
    )
    .all(...named, ...values, params.limit, params.offset) as Row[]

  let total: number
  let totalExact = true
  const kept = spec.keptTotal?.(params)
  if (clauses.length === 0) {
    total = (q.prepare('select rows from table_counts where name = ?').get(spec.countedAs) as { rows: number }).rows
  } else if (kept) {
    total = kept(db)
  } else {
    const cacheKey = `${spec.from}|${where}|${JSON.stringify(values)}|${JSON.stringify(named)}`
    const hit = totals.get(cacheKey)
    if (hit && hit.version === writeVersion && Date.now() - hit.at < TOTAL_TTL_MS) {
      total = hit.total
      totalExact = false
    } else {
      // Counted over a subquery that cannot be flattened (`limit -1`): SQLite drops unused left joins
      // from a plain select but not from an aggregate, where they cost a lookup per row (3 s, not
      // 30 ms, over 440,000 events).
      const sql = `select count(*) as n from (select t.id from ${spec.from} ${where} limit -1)`
      total = (q.prepare(sql).get(...named, ...values) as { n: number }).n
      // Every distinct filter adds an entry: keep the newest few hundred.
      if (totals.size >= MAX_CACHED) totals.delete(totals.keys().next().value as string)
      totals.set(cacheKey, { total, at: Date.now(), version: writeVersion })
    }
  }
  return { rows, total, offset: params.offset, limit: params.limit, totalExact }
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

/** `col in (?, ?, …)` with its parameters, for a multi filter. */
export function inList(expr: string, values: readonly unknown[]) {
  return { clause: `${expr} in (${values.map(() => '?').join(', ')})`, params: [...values] }
}

const cache = new Map<string, { value: unknown; at: number; version: number }>()

/** A value computed at most once per `ttlMs`, dropped at once by `listsChanged`. */
export function cached<T>(key: string, ttlMs: number, compute: () => T): T {
  const hit = cache.get(key)
  if (hit && hit.version === writeVersion && Date.now() - hit.at < ttlMs) return hit.value as T
  const value = compute()
  if (cache.size >= MAX_CACHED) cache.delete(cache.keys().next().value as string)
  cache.set(key, { value, at: Date.now(), version: writeVersion })
  return value
}

/** Collects WHERE clauses and their parameters in step: `add` one, or `list` an IN over a multi filter. */
export function whereBuilder() {
  const clauses: string[] = []
  const params: unknown[] = []
  const add = (clause: string, ...p: unknown[]) => {
    clauses.push(clause)
    params.push(...p)
  }
  const list = (expr: string, values?: readonly unknown[]) => {
    if (!values?.length) return
    const l = inList(expr, values)
    add(l.clause, ...l.params)
  }
  return { add, list, done: () => ({ clauses, params }) }
}
