import { describe, expect, it } from 'vitest'
import { addDays } from '~/domain/dates'
import { useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'

// Expectations come from plain SQL written here, not from the list specs.
describe('console lists: visit filters, the visits page default, background refreshes, first rows in the HTML', () => {
  const t = useSeededServer('small')
  const sql = () => t.data.db.$client
  const cookieFor = async (email: string, o: { lastSeenAt?: Date } = {}) => (await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, email), o))
  const get = (path: string, cookie: string, headers: Record<string, string> = {}) =>
    fetch(t.server.url + path, { redirect: 'manual', headers: { Cookie: cookie, Accept: 'application/json', ...headers } })

  it('filters visits by technician and date range, soonest first', async () => {
    const { cookie } = await cookieFor('office@ductkeeper.test')
    const tech = sql().prepare("select technician_id as id from visits where technician_id is not null group by technician_id order by count(*) desc limit 1").get() as { id: number }
    const to = addDays(TEST_TODAY, 30)
    const expected = (sql().prepare('select id from visits where technician_id = ? and scheduled_on >= ? and scheduled_on <= ? order by scheduled_on, id').all(tech.id, TEST_TODAY, to) as Array<{ id: number }>).map((r) => r.id)
    const all = (sql().prepare('select count(*) as n from visits where technician_id = ?').get(tech.id) as { n: number }).n
    expect(expected.length).toBeGreaterThan(0)
    expect(expected.length).toBeLessThan(all)
    const res = await get(`/api/visits?technician=${tech.id}&from=${TEST_TODAY}&to=${to}&sort=scheduledOn&dir=asc`, cookie)
    expect(res.status).toBe(200)
    const page = (await res.json()) as { rows: Array<{ id: number; technicianId: number; scheduledOn: string }>; total: number }
    expect(page.rows.map((r) => r.id)).toEqual(expected)
    expect(page.total).toBe(expected.length)

    const bad = await get(`/api/visits?from=${to}&to=${TEST_TODAY}`, cookie)
    expect(bad.status).toBe(400)
    expect((await bad.json()).issues).toEqual([{ path: 'to', message: 'The end date comes before the start date' }])
    expect((await get('/api/visits?technician=abc', cookie)).status).toBe(400)
    expect((await get('/api/visits?from=15-06-2026', cookie)).status).toBe(400)
  })

  it('opens the bare visits page on today’s work, soonest first, and leaves any other query alone', async () => {
    const { cookie } = await cookieFor('office@ductkeeper.test')
    const bare = await get('/visits', cookie, { Accept: 'text/html' })
    expect(bare.status).toBe(302)
    expect(bare.headers.get('location')).toBe(`/visits?from=${TEST_TODAY}&sort=scheduledOn&dir=asc`)
    const kept = await get('/visits?sort=scheduledOn&dir=asc', cookie, { Accept: 'text/html' })
    expect(kept.status).toBe(200)
    await kept.body?.cancel()
  })

  it('does not count a background refresh as activity, and refuses it once the session is idle', async () => {
    const seen = (id: string) => (sql().prepare('select last_seen_at as at from sessions where id = ?').get(id) as { at: string }).at
    const fiveMinutesAgo = new Date(Date.now() - 5 * 60_000)
    const s = await cookieFor('lead@ductkeeper.test', { lastSeenAt: fiveMinutesAgo })

    const background = await get('/api/triage?limit=1', s.cookie, { 'X-Background-Refresh': '1' })
    expect(background.status).toBe(200)
    expect((await background.json()).counts.open).toBeGreaterThan(0)
    expect(seen(s.id)).toBe(fiveMinutesAgo.toISOString())

    // A request a person made moves the idle timer on.
    expect((await get('/api/triage?limit=1', s.cookie)).status).toBe(200)
    expect(Date.parse(seen(s.id))).toBeGreaterThan(fiveMinutesAgo.getTime() + 4 * 60_000)

    // Past the idle limit (60 minutes by default) the refresh is told to sign in, as any request is.
    const idle = await cookieFor('lead@ductkeeper.test', { lastSeenAt: new Date(Date.now() - 61 * 60_000) })
    const refused = await get('/api/triage?limit=1', idle.cookie, { 'X-Background-Refresh': '1' })
    expect(refused.status).toBe(401)
    expect(await refused.json()).toEqual({ error: 'Sign in or send a valid API token.' })
  })

  /** The body rows of a list page's HTML as text, in order: what a person sees before any script runs. */
  const rowsOf = (html: string) =>
    [...html.matchAll(/<div role="row"[^>]*aria-rowindex="(\d+)"[^>]*>([\s\S]*?)(?=<div role="row"|<\/div><\/div><\/div>)/g)].map((m) => ({
      index: Number(m[1]),
      text: m[2].replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ').trim(),
    }))
  const page = async (path: string, cookie: string) => {
    const res = await get(path, cookie, { Accept: 'text/html' })
    expect(res.status).toBe(200)
    // React marks the joins between pieces of text with empty comments.
    return (await res.text()).replace(/<!-- -->/g, '')
  }

  it('puts the first rows of the filtered detectors in the page’s own HTML', async () => {
    const { cookie } = await cookieFor('office@ductkeeper.test')
    const expected = sql().prepare("select tag from detectors where state = 'trouble' order by tag, id").all() as Array<{ tag: string }>
    expect(expected.length).toBeGreaterThan(1)
    const html = await page('/devices?state=trouble&sort=tag&dir=asc', cookie)
    const rows = rowsOf(html)
    expect(rows.length).toBeGreaterThan(1)
    expect(rows.map((r) => r.index)).toEqual(rows.map((_, i) => i + 2))
    // Each row is the detector at its place in the list, and every one is in trouble.
    rows.forEach((r, i) => {
      expect(r.text.startsWith(expected[i].tag + ' ')).toBe(true)
      expect(r.text).toContain('Trouble')
      expect(r.text).not.toContain('Loading')
    })
    expect(html).toContain(`${expected.length} detectors`)
  })

  it('puts the first events of a kind in the page’s own HTML, newest first', async () => {
    const { cookie } = await cookieFor('office@ductkeeper.test')
    const expected = sql().prepare("select e.occurred_at as at, s.time_zone as zone from events e join sites s on s.id = e.site_id where e.kind = 'alarm' order by e.occurred_at desc, e.id desc").all() as Array<{ at: string; zone: string }>
    expect(expected.length).toBeGreaterThan(1)
    // Each on its site's calendar and clock, with the zone's letters, by the runtime's own zone data.
    const onSiteClock = ({ at, zone }: { at: string; zone: string }) => {
      const options = { timeZone: zone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZoneName: 'short' } as const
      const p = Object.fromEntries(new Intl.DateTimeFormat('en-US', options).formatToParts(new Date(at)).map((x) => [x.type, x.value]))
      return `${p.day} ${p.month} ${p.year}, ${p.hour}:${p.minute} ${p.timeZoneName}`
    }
    const rows = rowsOf(await page('/events?kind=alarm', cookie))
    expect(rows.length).toBeGreaterThan(1)
    rows.forEach((r, i) => {
      expect(r.text.startsWith(onSiteClock(expected[i]))).toBe(true)
      expect(r.text).toMatch(/ alarm /)
    })
  })

  it('puts the queue’s open total, its reason counts and its first rows in Triage’s own HTML', async () => {
    const { cookie } = await cookieFor('lead@ductkeeper.test')
    const open = (sql().prepare("select count(*) as n from detectors where risk_score > 0 and acknowledged_at is null").get() as { n: number }).n
    const trouble = (sql().prepare("select count(*) as n from detectors where state = 'trouble' and risk_score > 0 and acknowledged_at is null").get() as { n: number }).n
    const worst = sql().prepare('select tag, risk_score as risk from detectors where risk_score > 0 and acknowledged_at is null order by risk_score desc, id desc limit 5').all() as Array<{ tag: string; risk: number }>
    expect(open).toBeGreaterThan(5)
    const html = await page('/triage', cookie)
    // Read from the kept totals on the server: no "Loading…" in place of the counts before scripts run.
    expect(html).toContain(`${open.toLocaleString('en-US')} open · ranked by risk`)
    expect(html).toMatch(new RegExp(`In trouble <span[^>]*>${trouble.toLocaleString('en-US')}</span>`))
    const rows = rowsOf(html)
    expect(rows.length).toBeGreaterThan(3)
    rows.slice(0, worst.length).forEach((r, i) => expect(r.text.startsWith(`${worst[i].risk} ${worst[i].tag} `)).toBe(true))

    // A row of the queue carries what the queue shows, its reasons in words, not the fields they came from.
    const api = (await (await get('/api/triage?limit=1', cookie)).json()) as { rows: Array<Record<string, unknown>> }
    expect(Object.keys(api.rows[0]).sort()).toEqual(
      ['id', 'tag', 'risk', 'siteId', 'site', 'city', 'customerId', 'customer', 'unitId', 'unit', 'position', 'state', 'due', 'assignee', 'acknowledgedAt', 'followUp', 'reasons'].sort(),
    )
  })

  it('says what was wrong with a refused address in the page’s HTML, with a way back, instead of failing', async () => {
    const { cookie } = await cookieFor('office@ductkeeper.test')
    const html = await page('/devices?state=melted', cookie)
    expect(html).toContain('asks for something the list of detectors cannot show')
    expect(html).toContain('“melted” is not a state this list knows')
    expect(html).toMatch(/href="\/devices"[^>]*>Reset the view/)
    expect(rowsOf(html)).toEqual([])
  })
})
