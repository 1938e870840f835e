import type { Db } from '../db'
import { ftsKindRows, ftsQuery } from '../list-query'

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
const KINDS: Record<SearchKind, { href: string; join: string; detail: string }> = {
  customer: { href: '/customers', join: 'join customers x on x.id = r.value', detail: 'x.kind' },
  site: { href: '/sites', join: 'join sites x on x.id = r.value', detail: `x.street || ', ' || x.city` },
  unit: {
    href: '/units',
    join: 'join units x on x.id = r.value join sites s on s.id = x.site_id',
    detail: `s.name || coalesce(' · ' || x.location, '')`,
  },
  detector: {
    href: '/devices',
    join: 'join detectors x on x.id = r.value join sites s on s.id = x.site_id join units u on u.id = x.unit_id',
    detail: `s.name || ' · ' || u.tag || ' ' || x.position`,
  },
}

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
  const groups = searchKinds.map((kind) => {
    const k = KINDS[kind]
    const candidates = db.$client
      .prepare(
        `select rowid / 4 as id, title, bm25(search_index, 0, 0, 4, 1) as score
         from search_index where search_index match ? and ${ftsKindRows(kind)} limit ${CANDIDATES}`,
      )
      .all(fts) as Array<{ id: number; title: string; score: number }>
    const ranked = candidates.map((c) => ({ ...c, exact: words(c.title) === typed ? 0 : 1 }))
    const best = ranked.sort((a, b) => a.exact - b.exact || a.score - b.score || a.id - b.id).slice(0, PER_KIND)
    if (best.length === 0) return { kind, items: [] }
    const details = new Map(
      (
        db.$client
          .prepare(`select r.value as id, ${k.detail} as detail from json_each(?) r ${k.join}`)
          .all(JSON.stringify(best.map((b) => b.id))) as Array<{ id: number; detail: string | null }>
      ).map((d) => [d.id, d.detail ?? '']),
    )
    return { kind, items: best.map((b) => ({ id: b.id, title: b.title, detail: details.get(b.id) ?? '', href: `${k.href}/${b.id}` })) }
  })
  return { q, groups: groups.filter((g) => g.items.length > 0) }
}
