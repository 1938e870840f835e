import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

interface Result {
  q: string
  groups: Array<{ kind: string; items: Array<{ id: number; title: string; detail: string; href: string }> }>
}

const KIND_ORDER = ['customer', 'site', 'unit', 'detector']
const HREF = { customer: '/customers/', site: '/sites/', unit: '/units/', detector: '/devices/' } as Record<string, string>

let server: Awaited<ReturnType<typeof startServer>>
let data: ReturnType<typeof seededDb>
let cookie = ''
// Two detectors retagged so that plain bm25 prefers the one that is not the tag typed.
let exactId = 0
let lookalikeId = 0
// Two sites: one named with the words searched, one whose street holds them, the lower id.
let namedSiteId = 0
let streetSiteId = 0

beforeAll(async () => {
  data = seededDb('small')
  const sql = data.db.$client
  ;[exactId, lookalikeId] = (sql.prepare('select id from detectors order by id desc limit 2').all() as Array<{ id: number }>).map((r) => r.id)
  sql.prepare('update detectors set tag = ? where id = ?').run('ZQ-7', exactId)
  sql.prepare('update detectors set tag = ? where id = ?').run('ZQ-7-ZQ-7-ZQ', lookalikeId)
  ;[streetSiteId, namedSiteId] = (sql.prepare('select id from sites order by id limit 2').all() as Array<{ id: number }>).map((r) => r.id)
  sql.prepare('update sites set name = ? where id = ?').run('Quellmoor Depot', namedSiteId)
  sql.prepare('update sites set street = ? where id = ?').run('12 Quellmoor Depot Lane', streetSiteId)
  server = await startServer(data.path)
  cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'manager@ductkeeper.test'))).cookie
})

afterAll(async () => {
  await server?.stop()
  data?.cleanup()
})

const search = async (q: string, withCookie = cookie) => {
  const res = await fetch(`${server.url}/api/search?q=${encodeURIComponent(q)}`, { headers: { Cookie: withCookie } })
  return { status: res.status, body: (await res.json()) as Result & { error?: string; issues?: Array<{ path: string }> } }
}
const group = (r: Result, kind: string) => r.groups.find((g) => g.kind === kind)?.items ?? []

describe('GET /api/search', () => {
  it('finds a site by part of its street address', async () => {
    const site = data.db.$client.prepare('select id, street from sites order by id desc limit 1').get() as { id: number; street: string }
    // '6529 Yarrow Boulevard' → '652 yarrow boul': the start of each word is enough.
    const [number, name, kind] = site.street.split(' ')
    const { status, body } = await search(`${number.slice(0, 3)} ${name.toLowerCase()} ${kind.slice(0, 4)}`)
    expect(status).toBe(200)
    const sites = group(body, 'site')
    expect(sites.map((s) => s.id)).toContain(site.id)
    const hit = sites.find((s) => s.id === site.id)!
    expect(hit.href).toBe(`/sites/${site.id}`)
    expect(hit.detail).toContain(site.street)
  })

  it('groups results by kind, in a fixed order, at most eight each, each linking to its record', async () => {
    const city = (data.db.$client.prepare('select city from sites group by city order by count(*) desc limit 1').get() as { city: string }).city
    const { status, body } = await search(city)
    expect(status).toBe(200)
    expect(body.q).toBe(city)
    const kinds = body.groups.map((g) => g.kind)
    expect(kinds).toEqual(KIND_ORDER.filter((k) => kinds.includes(k)))
    expect(kinds).toEqual(expect.arrayContaining(['site', 'unit', 'detector']))
    for (const g of body.groups) {
      expect(g.items.length).toBeGreaterThan(0)
      expect(g.items.length).toBeLessThanOrEqual(8)
      for (const item of g.items) {
        expect(item.href).toBe(`${HREF[g.kind]}${item.id}`)
        expect(typeof item.title).toBe('string')
        expect(typeof item.detail).toBe('string')
      }
    }
    // Every site hit really is in that town.
    for (const s of group(body, 'site')) {
      expect((data.db.$client.prepare('select city from sites where id = ?').get(s.id) as { city: string }).city).toBe(city)
    }
    // More than eight detectors are in that town: the cap holds.
    const inTown = (data.db.$client.prepare('select count(*) as n from detectors d join sites s on s.id = d.site_id where s.city = ?').get(city) as { n: number }).n
    expect(inTown).toBeGreaterThan(8)
    expect(group(body, 'detector')).toHaveLength(8)
  })

  it('finds customers by name', async () => {
    const { body } = await search('harbor lan')
    expect(group(body, 'customer').map((c) => c.title)).toContain('Harbor Lantern Diners')
  })

  it('puts a detector whose tag is exactly what was typed first', async () => {
    // Plain bm25 ranks the look-alike higher (its title repeats the words) …
    const byScore = data.db.$client
      .prepare(
        `select rowid / 4 as id from search_index where search_index match '"zq"* "7"*' and rowid % 4 = 3
         order by bm25(search_index, 0, 0, 4, 1)`,
      )
      .all() as Array<{ id: number }>
    expect(byScore.map((r) => r.id)).toEqual([lookalikeId, exactId])
    // … but the exact tag, in any case, comes first.
    for (const q of ['zq-7', 'ZQ-7', 'Zq 7']) {
      const detectors = group((await search(q)).body, 'detector')
      expect(detectors.map((d) => d.id), q).toEqual([exactId, lookalikeId])
      expect(detectors[0].title).toBe('ZQ-7')
    }
  })

  it('puts a record named with the words typed before one that holds them only in its details', async () => {
    for (const q of ['quellmoor depot', 'quell dep']) {
      const sites = group((await search(q)).body, 'site')
      expect(sites.map((x) => x.id), q).toEqual([namedSiteId, streetSiteId])
      expect(sites[1].detail).toContain('Quellmoor Depot Lane')
    }
  })

  it('returns no groups for words with nothing to match', async () => {
    expect((await search('zzzzqqq')).body.groups).toEqual([])
    const punctuation = await search('--')
    expect(punctuation.status).toBe(200)
    expect(punctuation.body.groups).toEqual([])
  })

  it('refuses an empty, blank or overlong query with 400 and the issues', async () => {
    for (const q of ['', '   ', 'x'.repeat(101)]) {
      const { status, body } = await search(q)
      expect(status, JSON.stringify(q)).toBe(400)
      expect(body.error).toBe('Invalid query')
      expect(body.issues?.map((i) => i.path)).toEqual(['q'])
    }
    const missing = await fetch(`${server.url}/api/search`, { headers: { Cookie: cookie } })
    expect(missing.status).toBe(400)
    expect((await search('x'.repeat(100))).status).toBe(200)
  })

  it('answers 401 without a session', async () => {
    const { status, body } = await search('harbor', '')
    expect(status).toBe(401)
    expect(body.error).toMatch(/Sign in/)
  })
})
