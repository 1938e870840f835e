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
// Candidates read per kind, in rowid order. Every candidate matches every word typed, so what sets
// them apart is where the words fall (title or detail) and how long the title is: ranked here, from
// the row's own text. bm25() would work out each word's rarity by reading its whole list of matches,
// once per kind (3–4 ms each for a common prefix at stress scale), to rank rows that all share it.
const CANDIDATES = 250

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

// FTS5's MATCH and the kind-in-rowid test have no word in the query builder: raw SQL, prepared once.
const candidateStatements = perDb((db: Db) =>
  Object.fromEntries(
    searchKinds.map((kind) => [
      kind,
      db.$client.prepare<[string], Candidate>(
        `select rowid / 4 as id, title from search_index where search_index match ? and ${ftsKindRows(kind)} limit ${CANDIDATES}`,
      ),
    ]),
  ) as Record<SearchKind, Statement<[string], Candidate>>,
)

interface Candidate {
  id: number
  title: string
}

/**
 * As `ftsQuery`, but a one-character word matches a whole token (the 's' of 'rtu 1 s'): a
 * one-character prefix has no prefix index and expands to every token with that letter (~40 ms a kind).
 */
export function paletteQuery(text: string): string | null {
  const terms = ftsQuery(text)?.split(' ')
  return terms ? terms.map((t) => (/^"[^"]"\*$/u.test(t) ? t.slice(0, -1) : t)).join(' ') : null
}

/** Words only, lower case, without accents (as the index's tokenizer reads them): 'Zq 7', 'zq-7' and 'ZQ-7' all read as the tag ZQ-7. */
const wordList = (text: string) =>
  text
    .normalize('NFD')
    .replace(/\p{M}/gu, '')
    .toLowerCase()
    .split(/[^\p{L}\p{N}]+/u)
    .filter(Boolean)
const words = (text: string) => wordList(text).join(' ')

/** The FTS query's terms: each a word, matched whole or (with `*`) as the start of a word. */
const termsOf = (fts: string) => fts.split(' ').map((t) => ({ word: t.replace(/^"|"\*?$/g, ''), prefix: t.endsWith('*') }))

/**
 * The palette's search: per kind, a title typed in full (an exact tag) first, then by how many of the
 * words typed are in the title (the others matched on the details: street, town, site), shorter
 * titles (closer to what was typed) before longer, then the oldest record.
 */
export function search(db: Db, q: string): SearchResult {
  const fts = paletteQuery(q)
  if (!fts) return { q, groups: [] }
  const typed = words(q)
  const terms = termsOf(fts)
  const inTitle = (title: string[]) => terms.filter((t) => title.some((w) => (t.prefix ? w.startsWith(t.word) : w === t.word))).length
  const candidates = candidateStatements(db)
  const groups = searchKinds.map((kind) => {
    const ranked = candidates[kind].all(fts).map((c) => {
      const title = wordList(c.title)
      return { ...c, exact: title.join(' ') === typed ? 0 : 1, inTitle: inTitle(title), length: title.length }
    })
    const best = ranked.sort((a, b) => a.exact - b.exact || b.inTitle - a.inTitle || a.length - b.length || a.title.length - b.title.length || a.id - b.id).slice(0, PER_KIND)
    if (best.length === 0) return { kind, items: [] }
    const k = DETAILS[kind]
    const details = new Map(k.details(db, best.map((b) => b.id)).map((d) => [d.id, d.detail]))
    return { kind, items: best.map((b) => ({ id: b.id, title: b.title, detail: details.get(b.id) ?? '', href: `${k.href}/${b.id}` })) }
  })
  return { q, groups: groups.filter((g) => g.items.length > 0) }
}
