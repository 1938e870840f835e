import type { Db } from '../db'
import { ftsQuery } from '../list-query'

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
// Ranking every match of a common prefix ('rtu' matches ~150,000 rows at stress scale) costs
// ~150 ms; ranking the first 2,000 matches of a kind costs a few. Below the cap the ranking is exact.
const CANDIDATES = 2000

// What a person needs to tell two hits apart (tags repeat from site to site), read from the record.
const KINDS: Record<SearchKind, { code: number; href: string; join: string; detail: string }> = {
  customer: { code: 0, href: '/customers', join: 'join customers x on x.id = r.id', detail: 'x.kind' },
  site: { code: 1, href: '/sites', join: 'join sites x on x.id = r.id', detail: `x.street || ', ' || x.city` },
  unit: {
    code: 2,
    href: '/units',
    join: 'join units x on x.id = r.id join sites s on s.id = x.site_id',
    detail: `s.name || coalesce(' · ' || x.location, '')`,
  },
  detector: {
    code: 3,
    href: '/devices',
    join: 'join detectors x on x.id = r.id join sites s on s.id = x.site_id join units u on u.id = x.unit_id',
    detail: `s.name || ' · ' || u.tag || ' ' || x.position`,
  },
}

/**
 * As `ftsQuery`, but a one-character word after the first matches a whole token (the 's' of
 * 'rtu 1 s'): a one-character prefix has no prefix index and expands to every token with that letter.
 */
export function paletteQuery(text: string): string | null {
  const words = ftsQuery(text)?.split(' ')
  return words ? words.map((w, i) => (i > 0 && /^"[^"]"\*$/u.test(w) ? w.slice(0, -1) : w)).join(' ') : null
}

/**
 * The palette's search: per kind, the best matches by bm25 with titles weighted over details, and a
 * title typed in full (an exact tag) ahead of the rest. The kind lives in the rowid (id * 4 + kind),
 * so filtering on it reads no stored column of the rows that are not shown.
 */
export function search(db: Db, q: string): SearchResult {
  const fts = paletteQuery(q)
  if (!fts) return { q, groups: [] }
  const groups = searchKinds.map((kind) => {
    const k = KINDS[kind]
    const rows = db.$client
      .prepare(
        `select r.id, r.title, ${k.detail} as detail
         from (select c.rowid / 4 as id, c.title, c.title = ? collate nocase as exact, c.score
               from (select rowid, title, bm25(search_index, 0, 0, 4, 1) as score
                     from search_index where search_index match ? and rowid % 4 = ${k.code} limit ${CANDIDATES}) c
               order by exact desc, c.score, c.rowid limit ${PER_KIND}) r
         ${k.join}
         order by r.exact desc, r.score, r.id`,
      )
      .all(q.trim(), fts) as Array<{ id: number; title: string; detail: string | null }>
    return { kind, items: rows.map((r) => ({ id: r.id, title: r.title, detail: r.detail ?? '', href: `${k.href}/${r.id}` })) }
  })
  return { q, groups: groups.filter((g) => g.items.length > 0) }
}
