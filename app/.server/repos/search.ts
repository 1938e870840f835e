import type { Statement } from 'better-sqlite3'
import { eq, inArray } from 'drizzle-orm'
import type { Db } from '../db'
import { ftsKindRows, ftsQuery } from '../list-query'
import { customers, detectors, sites, units } from '../schema'
import { perDb } from './statements'

export const searchKinds = ['customer', 'site', 'unit', 'detector'] as const
export type SearchKind = (typeof searchKinds)[number]

export interface SearchItem {
  id: number
  title: string
  detail: string
  href: string
}

export interface SearchResult {
  q: string
  /** Kinds in a fixed order; a kind with no match is left out. */
  groups: Array<{ kind: SearchKind; items: SearchItem[] }>
}

export const PER_KIND = 8
// bm25 costs a few microseconds a row: ranking every match of a common prefix ('rtu' matches
// ~150,000 rows at stress scale) took ~150 ms, ranking the first 1,000 of a kind takes ~5 ms.
// Below the cap the ranking is exact; above it, it ranks the first matches in rowid order.
const CANDIDATES = 1000

// What a person needs to tell two hits apart (tags repeat from site to site), read from the record.
const DETAILS: Record<SearchKind, { href: string; details: (db: Db, ids: number[]) => Array<{ id: number; detail: string }> }> = {
  customer: {
    href: '/customers',
    details: (db, ids) => db.select({ id: customers.id, detail: customers.kind }).from(customers).where(inArray(customers.id, ids)).all(),
  },
  site: {
    href: '/sites',
    details: (db, ids) =>
      db
        .select({ id: sites.id, street: sites.street, city: sites.city })
        .from(sites)
        .where(inArray(sites.id, ids))
        .all()
        .map((s) => ({ id: s.id, detail: `${s.street}, ${s.city}` })),
  },
  unit: {
    href: '/units',
    details: (db, ids) =>
      db
        .select({ id: units.id, site: sites.name, location: units.location })
        .from(units)
        .innerJoin(sites, eq(sites.id, units.siteId))
        .where(inArray(units.id, ids))
        .all()
        .map((u) => ({ id: u.id, detail: u.location ? `${u.site} · ${u.location}` : u.site })),
  },
  detector: {
    href: '/devices',
    details: (db, ids) =>
      db
        .select({ id: detectors.id, site: sites.name, unit: units.tag, position: detectors.position })
        .from(detectors)
        .innerJoin(sites, eq(sites.id, detectors.siteId))
        .innerJoin(units, eq(units.id, detectors.unitId))
        .where(inArray(detectors.id, ids))
        .all()
        .map((d) => ({ id: d.id, detail: `${d.site} · ${d.unit} ${d.position}` })),
  },
}

// FTS5's MATCH, bm25() and the kind-in-rowid test have no word in the query builder: raw SQL, prepared once.
const candidateStatements = perDb((db: Db) =>
  Object.fromEntries(
    searchKinds.map((kind) => [
      kind,
      db.$client.prepare<[string], { id: number; title: string; score: number }>(
        `select rowid / 4 as id, title, bm25(search_index, 0, 0, 4, 1) as score
         from search_index where search_index match ? and ${ftsKindRows(kind)} limit ${CANDIDATES}`,
      ),
    ]),
  ) as Record<SearchKind, Statement<[string], { id: number; title: string; score: number }>>,
)

/**
 * As `ftsQuery`, but a one-character word matches a whole token (the 's' of 'rtu 1 s'): a
 * one-character prefix has no prefix index and expands to every token with that letter (~40 ms a kind).
 */
export function paletteQuery(text: string): string | null {
  const terms = ftsQuery(text)?.split(' ')
  return terms ? terms.map((t) => (/^"[^"]"\*$/u.test(t) ? t.slice(0, -1) : t)).join(' ') : null
}

/** Words only, lower case: 'Zq 7', 'zq-7' and 'ZQ-7' all read as the tag ZQ-7. */
const words = (text: string) => text.toLowerCase().split(/[^\p{L}\p{N}]+/u).filter(Boolean).join(' ')

/**
 * The palette's search: per kind, the best matches by bm25 with titles weighted over details, and a
 * title typed in full (an exact tag) ahead of the rest.
 */
export function search(db: Db, q: string): SearchResult {
  const fts = paletteQuery(q)
  if (!fts) return { q, groups: [] }
  const typed = words(q)
  const candidates = candidateStatements(db)
  const groups = searchKinds.map((kind) => {
    const ranked = candidates[kind].all(fts).map((c) => ({ ...c, exact: words(c.title) === typed ? 0 : 1 }))
    const best = ranked.sort((a, b) => a.exact - b.exact || a.score - b.score || a.id - b.id).slice(0, PER_KIND)
    if (best.length === 0) return { kind, items: [] }
    const k = DETAILS[kind]
    const details = new Map(k.details(db, best.map((b) => b.id)).map((d) => [d.id, d.detail]))
    return { kind, items: best.map((b) => ({ id: b.id, title: b.title, detail: details.get(b.id) ?? '', href: `${k.href}/${b.id}` })) }
  })
  return { q, groups: groups.filter((g) => g.items.length > 0) }
}
