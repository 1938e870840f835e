import { UNSAFE_decodeViaTurboStream as decodeTurboStream } from 'react-router'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { AuditItem } from '~/domain/audit-sentences'
import { sentenceText } from '~/domain/audit-sentences'
import { calendarFor } from '~/domain/calendar'
import { addDays } from '~/domain/dates'
import { useSeededServer } from '#tests/setup/fixture'
import { go, Jar, signInViaProvider } from '#tests/setup/oauth-client'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

type Page = { items: Array<AuditItem & { when: string }>; olderThan: number | null; newerThan: number | null; filters: Record<string, unknown> }

describe('the audit log in sentences, and the admin pages that write it', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  let site: { id: number; name: string; region: string }
  let detectorIds: number[] = []
  let tags: string[] = []
  let visitId = 0
  const q = () => data.db.$client
  const nameOf = (email: string) => (q().prepare('select name from users where email = ?').get(email) as { name: string }).name

  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    for (const who of ['admin', 'lead', 'office', 'manager']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
    site = q()
      .prepare(
        `select s.id, s.name, s.region from sites s join monitoring_companies m on m.id = s.monitoring_company_id
         where (select count(*) from detectors d where d.site_id = s.id and d.acknowledged_at is null and not exists (
           select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))) >= 4
         order by s.id limit 1`,
      )
      .get() as typeof site
    const rows = q()
      .prepare(
        `select d.id, d.tag from detectors d where d.site_id = ? and d.acknowledged_at is null and not exists (
           select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
         order by d.id limit 4`,
      )
      .all(site.id) as Array<{ id: number; tag: string }>
    detectorIds = rows.map((r) => r.id)
    tags = rows.map((r) => r.tag)
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const send = (path: string, who: string, body: Record<string, string> | object, json = false) =>
    fetch(`${server.url}${path}`, {
      method: 'POST',
      headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': json ? 'application/json' : 'application/x-www-form-urlencoded' },
      body: json ? JSON.stringify(body) : new URLSearchParams(body as Record<string, string>),
    })
  // The loader's data as the client receives it on navigation (single fetch), with the page's query.
  const audit = async (query = '', who = 'admin'): Promise<Page> => {
    const params = new URLSearchParams(query.replace(/^\?/, ''))
    params.set('_routes', 'routes/_app.admin.audit')
    const res = await fetch(`${server.url}/admin/audit.data?${params}`, { headers: { Cookie: cookie[who] } })
    expect(res.status).toBe(200)
    const decoded = await decodeTurboStream(res.body!, globalThis)
    return JSON.parse(JSON.stringify((decoded.value as Record<string, { data: Page }>)['routes/_app.admin.audit'].data)) as Page
  }
  const sentences = (page: Page) => page.items.map((i) => sentenceText(i.parts))

  it('records changes of every kind through the app', async () => {
    const lead = nameOf('lead@ductkeeper.test')
    expect(lead).toBeTruthy()
    // Triage: three detectors acknowledged at once, one assigned.
    expect((await send('/api/triage', 'lead', { intent: 'acknowledge', ids: detectorIds.slice(0, 3), note: 'Seen on the roof walk' }, true)).status).toBe(200)
    const techId = userIdByEmail(data.db, 'tech@ductkeeper.test')
    expect((await send('/api/triage', 'lead', { intent: 'assign', ids: [detectorIds[3]], technicianId: techId }, true)).status).toBe(200)
    // A visit booked, rescheduled and cancelled.
    const day = calendarFor(site.region).nextWorkingDay(addDays(TEST_TODAY, 3))
    const booked = await send('/api/visits', 'office', { siteId: site.id, kind: 'test', scheduledOn: day, detectors: [{ detectorId: detectorIds[0], tasks: ['visual', 'functional'] }] }, true)
    expect(booked.status).toBe(201)
    visitId = ((await booked.json()) as { visitId: number }).visitId
    const later = calendarFor(site.region).nextWorkingDay(addDays(day, 7))
    expect((await send(`/api/visits/${visitId}`, 'office', { intent: 'reschedule', version: 1, scheduledOn: later }, true)).status).toBe(200)
    expect((await send(`/api/visits/${visitId}`, 'office', { intent: 'cancel', version: 2, reason: 'Roof access closed for repairs' }, true)).status).toBe(200)
    // People and tokens, as the admin.
    expect((await send('/admin/users', 'admin', { intent: 'invite', email: 'wren.halloway@ductkeeper.test', name: 'Wren Halloway', role: 'office' })).status).toBe(200)
    const wren = userIdByEmail(data.db, 'wren.halloway@ductkeeper.test')
    expect((await send('/admin/users', 'admin', { intent: 'change-role', userId: String(wren), role: 'technician' })).status).toBe(200)
    expect((await send('/admin/users', 'admin', { intent: 'workload', userId: String(wren), regions: 'us-or, US-WA', dailyCapacity: '14', capacityUnit: 'detectors' })).status).toBe(200)
    expect((await send('/admin/users', 'admin', { intent: 'deactivate', userId: String(wren) })).status).toBe(200)
    expect((await send('/admin/tokens', 'admin', { intent: 'create', userId: String(userIdByEmail(data.db, 'office@ductkeeper.test')), name: 'Nightly export', expiresInDays: '30' })).status).toBe(200)
    const token = q().prepare("select id from api_tokens where name = 'Nightly export'").get() as { id: number }
    expect((await send('/admin/tokens', 'admin', { intent: 'revoke', tokenId: String(token.id) })).status).toBe(200)
    // A saved view.
    expect((await send('/api/views', 'lead', { intent: 'save', page: 'devices', name: 'Kitchens overdue', query: 'due=overdue' }, true)).status).toBe(200)
  })

  it('reads each kind of change as a sentence with real names and links, never raw JSON', async () => {
    const page = await audit()
    const text = sentences(page)
    const lead = nameOf('lead@ductkeeper.test')
    const office = nameOf('office@ductkeeper.test')
    const admin = nameOf('admin@ductkeeper.test')
    const tech = nameOf('tech@ductkeeper.test')
    expect(text).toContain(`${lead} acknowledged 3 detectors at ${site.name} with the note “Seen on the roof walk”`)
    expect(text).toContain(`${lead} assigned detector ${tags[3]} at ${site.name} to ${tech}`)
    expect(text.some((s) => s.startsWith(`${office} booked the test visit on `) && s.includes(`at ${site.name} for 1 detector`))).toBe(true)
    expect(text.some((s) => s.startsWith(`${office} moved the test visit on `) && s.includes(' from '))).toBe(true)
    expect(text.some((s) => s.startsWith(`${office} cancelled the test visit`) && s.endsWith('“Roof access closed for repairs”'))).toBe(true)
    expect(text).toContain(`${admin} invited Wren Halloway (wren.halloway@ductkeeper.test) as Office`)
    expect(text).toContain(`${admin} changed the role of Wren Halloway from Office to Technician`)
    expect(text).toContain(`${admin} changed Wren Halloway’s regions and daily capacity`)
    expect(text).toContain(`${admin} deactivated Wren Halloway and ended their sessions and API tokens`)
    expect(text.some((s) => s.startsWith(`${admin} created API token “Nightly export” acting as ${office}, good until `))).toBe(true)
    expect(text).toContain(`${admin} revoked API token “Nightly export”`)
    expect(text).toContain(`${lead} saved the view “Kitchens overdue” on the detectors list`)

    // Three acknowledgements are one item, its records listed with links to each detector.
    const ack = page.items.find((i) => sentenceText(i.parts).includes('acknowledged 3 detectors'))!
    expect(ack.records).toHaveLength(3)
    expect(ack.parts).toContainEqual({ text: site.name, href: `/sites/${site.id}` })
    expect(ack.records.flat()).toContainEqual({ text: tags[0], href: `/devices/${detectorIds[0]}` })
    // Before and after are a table of readable fields, only those that changed.
    const workload = page.items.find((i) => sentenceText(i.parts).includes('regions and daily capacity'))!
    expect(workload.changes).toEqual([
      { field: 'Regions', before: '—', after: 'US-OR, US-WA' },
      { field: 'Daily capacity', before: '—', after: '14' },
    ])
    const cancel = page.items.find((i) => sentenceText(i.parts).includes('cancelled the test visit'))!
    expect(cancel.parts).toContainEqual(expect.objectContaining({ href: `/visits/${visitId}` }))
    expect(cancel.changes).toContainEqual({ field: 'Status', before: 'planned', after: 'cancelled' })

    const everything = JSON.stringify(page.items)
    expect(everything).not.toMatch(/[{[]\\?"(acknowledgedAt|assignedTo|technicianId|userId)\\?"/)
    expect(everything).not.toMatch(/\b(triage|visit|user|token)\.[a-z-]+\b/)

    // The page itself, as HTML, carries the sentences.
    const html = await (await fetch(`${server.url}/admin/audit`, { headers: { Cookie: cookie.admin } })).text()
    expect(html).toContain('acknowledged 3 detectors at')
    expect(html).not.toContain('{&quot;')
  })

  it('records a refused sign-in with the address tried, never a secret', async () => {
    const unknown = await signInViaProvider(server.url, 'visitor@ductkeeper.test')
    expect(unknown.callback.status).toBe(403)
    q().prepare("update users set active = 0 where email = 'manager@ductkeeper.test'").run()
    expect((await signInViaProvider(server.url, 'manager@ductkeeper.test')).callback.status).toBe(403)
    q().prepare("update users set active = 1 where email = 'manager@ductkeeper.test'").run()
    // Replayed callback: the code was spent.
    const first = await signInViaProvider(server.url, 'office@ductkeeper.test')
    const replay = new Jar()
    replay.cookies = new Map(first.oauthCookies)
    expect((await go(replay, first.callbackUrl)).status).toBe(400)

    const rows = q().prepare("select actor_id as actorId, entity_id as entityId, after from audit_log where action = 'session.refused' order by id").all() as Array<{ actorId: number | null; entityId: string | null; after: string }>
    expect(rows.map((r) => JSON.parse(r.after))).toEqual([
      { reason: 'unknown', email: 'visitor@ductkeeper.test' },
      { reason: 'inactive', email: 'manager@ductkeeper.test' },
      { reason: 'failed', email: null },
    ])
    expect(rows[1].entityId).toBe(String(userIdByEmail(data.db, 'manager@ductkeeper.test')))
    const stored = JSON.stringify(q().prepare("select * from audit_log where action like 'session.%'").all())
    const code = new URL(first.callbackUrl).searchParams.get('code')!
    expect(stored).not.toContain(code)
    expect(stored).not.toMatch(/state|access_token|secret/i)

    const text = sentences(await audit())
    expect(text).toContain('Sign-in refused for visitor@ductkeeper.test: not set up in Ductkeeper')
    expect(text).toContain('Sign-in refused for manager@ductkeeper.test: the account is deactivated')
    expect(text.some((s) => s.startsWith('Sign-in refused: the sign-in could not be completed'))).toBe(true)
  })

  it('hides routine sign-ins unless asked, and filters by kind, person and day; Everything clears them all', async () => {
    const office = nameOf('office@ductkeeper.test')
    const plain = sentences(await audit())
    expect(plain.some((s) => s.endsWith(' signed in'))).toBe(false)
    const withSignIns = sentences(await audit('?signins=1'))
    expect(withSignIns).toContain(`${office} signed in`)

    const visits = await audit('?kind=visits')
    expect(visits.items.length).toBeGreaterThanOrEqual(3)
    expect(visits.items.every((i) => i.kind === 'visits')).toBe(true)

    const officeId = userIdByEmail(data.db, 'office@ductkeeper.test')
    const byOffice = await audit(`?actor=${officeId}`)
    expect(byOffice.items.length).toBeGreaterThan(0)
    expect(sentences(byOffice).every((s) => s.startsWith(office))).toBe(true)

    const now = new Date()
    const today = new Intl.DateTimeFormat('en-CA', { timeZone: 'America/Chicago' }).format(now)
    // The seed's history lies before its day (TEST_TODAY); what the app wrote above, today.
    const everything = await audit()
    const written = everything.items.filter((i) => i.at > `${TEST_TODAY}T23:59:59.999Z`)
    expect(written.length).toBeGreaterThan(0)
    expect((await audit(`?from=${today}&to=${today}`)).items.map((i) => i.id)).toEqual(written.map((i) => i.id))
    const older = await audit(`?to=${addDays(today, -2)}`)
    expect(older.items.length).toBeGreaterThan(0)
    expect(older.items.every((i) => i.at <= `${TEST_TODAY}T23:59:59.999Z`)).toBe(true)
    // Nonsense in the query falls back to no filter rather than an error.
    expect(sentences(await audit('?kind=nope&actor=abc&from=2026-13-40'))).toEqual(plain)

    // The "Everything" link is the bare page, whatever was filtered.
    const html = await (await fetch(`${server.url}/admin/audit?kind=visits&actor=${officeId}&signins=1`, { headers: { Cookie: cookie.admin } })).text()
    expect(html).toMatch(/<a[^>]*href="\/admin\/audit"[^>]*>Everything<\/a>/)
  })

  it('pages by id: older pages continue where the last ended, newer come back', async () => {
    const adminId = userIdByEmail(data.db, 'admin@ductkeeper.test')
    const insert = q().prepare("insert into audit_log (actor_id, action, entity, entity_id, before, after, created_at) values (?, 'view.rename', 'saved_view', ?, ?, ?, ?)")
    // Spread over minutes so nothing groups.
    for (let i = 0; i < 150; i++) insert.run(adminId, String(9000 + i), JSON.stringify({ name: `View ${i}` }), JSON.stringify({ name: `View ${i}b` }), new Date(Date.UTC(2026, 0, 1, 0, i)).toISOString())
    const first = await audit('?kind=views')
    expect(first.newerThan).toBeNull()
    expect(first.olderThan).not.toBeNull()
    const second = await audit(`?kind=views&before=${first.olderThan}`)
    const firstIds = first.items.map((i) => i.id)
    expect(second.items.every((i) => i.id < Math.min(...firstIds))).toBe(true)
    const back = await audit(`?kind=views&after=${second.newerThan}`)
    expect(back.items.map((i) => i.id)).toEqual(firstIds)
  })

  it('lets managers and leads read the log, with people unlinked for those who cannot open the users page', async () => {
    const page = await audit('', 'manager')
    const people = page.items.flatMap((i) => i.parts).filter((p) => typeof p === 'object' && p.href?.startsWith('/admin/users'))
    expect(people).toEqual([])
    const adminPage = await audit()
    expect(adminPage.items.flatMap((i) => i.parts).some((p) => typeof p === 'object' && p.href?.startsWith('/admin/users#user-'))).toBe(true)
    expect((await fetch(`${server.url}/admin/audit`, { headers: { Cookie: cookie.office }, redirect: 'manual' })).status).toBe(403)
  })

  it('checks a technician’s regions and capacity: bad input is a 400 with the message beside the field', async () => {
    const tech = String(userIdByEmail(data.db, 'tech@ductkeeper.test'))
    const read = () => q().prepare('select regions, daily_capacity as dailyCapacity, capacity_unit as capacityUnit from users where id = ?').get(tech) as Record<string, unknown>
    const prior = read()
    const bad = await send('/admin/users', 'admin', { intent: 'workload', userId: tech, regions: 'US-OR, Oregon', dailyCapacity: '12', capacityUnit: 'detectors' })
    expect(bad.status).toBe(400)
    expect(await bad.text()).toContain('OREGON is not a region code: use ISO 3166-2, like US-OR')
    const unknown = await send('/admin/users', 'admin', { intent: 'workload', userId: tech, regions: 'US-ZZ', dailyCapacity: '12', capacityUnit: 'detectors' })
    expect(unknown.status).toBe(400)
    expect(await unknown.text()).toContain('US-ZZ: no such region known to the holiday calendar')
    const capacity = await send('/admin/users', 'admin', { intent: 'workload', userId: tech, regions: 'US-OR', dailyCapacity: '0', capacityUnit: 'hours' })
    expect(capacity.status).toBe(400)
    const body = await capacity.text()
    expect(body).toContain('At least 1')
    expect(body).toContain('Choose detectors or visits')
    const notTech = await send('/admin/users', 'admin', { intent: 'workload', userId: String(userIdByEmail(data.db, 'office@ductkeeper.test')), regions: 'US-OR', dailyCapacity: '5', capacityUnit: 'visits' })
    expect(notTech.status).toBe(409)
    expect(read()).toEqual(prior)

    const ok = await send('/admin/users', 'admin', { intent: 'workload', userId: tech, regions: 'us-nv us-id', dailyCapacity: '3', capacityUnit: 'visits' })
    expect(ok.status).toBe(200)
    const wanted = { regions: 'US-NV,US-ID', dailyCapacity: 3, capacityUnit: 'visits' }
    expect(read()).toEqual(wanted)
    // The entry keeps exactly the fields that changed, each before and after.
    const changed = Object.keys(wanted).filter((k) => prior[k] !== wanted[k as keyof typeof wanted])
    const entry = q().prepare("select before, after from audit_log where action = 'user.update' and entity_id = ? order by id desc").get(tech) as { before: string; after: string }
    expect(JSON.parse(entry.before)).toEqual(Object.fromEntries(changed.map((k) => [k, prior[k]])))
    expect(JSON.parse(entry.after)).toEqual(Object.fromEntries(changed.map((k) => [k, wanted[k as keyof typeof wanted]])))
  })
})

// A fresh demo's log holds the history the seed made (visits booked, notified, started, completed,
// cleared): every kind of entry reads as a sentence naming real people and places.
describe("a fresh demo's audit log", () => {
  const t = useSeededServer('demo')

  it('reads each kind of entry the seed wrote as a sentence with names, never raw JSON or bare ids', async () => {
    const { server, data } = t
    const cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'admin@ductkeeper.test'))).cookie
    const q = data.db.$client
    const kinds = q.prepare('select action, max(id) as id from audit_log group by action order by action').all() as Array<{ action: string; id: number }>
    // What the history implies for a visit, from booking to all-clear.
    expect(kinds.map((k) => k.action)).toEqual(['visit.all-clear', 'visit.book', 'visit.complete', 'visit.notify', 'visit.start'])
    const expected: Record<string, RegExp> = {
      // Visits booked in the same few seconds read as one line, without any one visit's details.
      'visit.book': / booked (the (test|inspection) visit on \w{3}, \d{1,2} \w{3} \d{4} at .+ for \d+ detectors?( with .+)?|\d+ visits at .+)$/,
      'visit.notify': / logged the notice to the monitoring company for (the (test|inspection) visit on .+ at .+|\d+ visits at .+)$/,
      'visit.start': / started (the (test|inspection) visit on .+ at .+|\d+ visits at .+)$/,
      'visit.complete': / completed (the (test|inspection) visit on .+ at .+: (\d+ (passed|failed)(, )?)+|\d+ visits at .+)$/,
      'visit.all-clear': / logged the all-clear for (the .+, confirmed with .+|\d+ visits at .+)$/,
    }
    for (const k of kinds) {
      const entry = q.prepare('select actor_id as actorId, entity_id as entityId from audit_log where id = ?').get(k.id) as { actorId: number; entityId: string }
      const actor = (q.prepare('select name from users where id = ?').get(entry.actorId) as { name: string }).name
      const site = (q.prepare('select s.name from visits v join sites s on s.id = v.site_id where v.id = ?').get(Number(entry.entityId)) as { name: string }).name
      // The page that starts with this entry.
      const params = new URLSearchParams({ before: String(k.id + 1), _routes: 'routes/_app.admin.audit' })
      const res = await fetch(`${server.url}/admin/audit.data?${params}`, { headers: { Cookie: cookie } })
      expect(res.status).toBe(200)
      const decoded = await decodeTurboStream(res.body!, globalThis)
      const page = JSON.parse(JSON.stringify((decoded.value as Record<string, { data: Page }>)['routes/_app.admin.audit'].data)) as Page
      const item = page.items[0]
      const sentence = sentenceText(item.parts)
      expect(item.kind, k.action).toBe('visits')
      expect(sentence.startsWith(`${actor} `), sentence).toBe(true)
      expect(sentence, k.action).toMatch(expected[k.action])
      if (!/ \d+ visits at \d+ sites/.test(sentence)) expect(sentence).toContain(site)
      expect(sentence).not.toMatch(/[{}"]|\b(detector|user|visit|site|person|customer) #?\d+\b|\bvisit\.[a-z-]+/i)
      for (const c of item.changes) expect(`${c.field} ${c.before} ${c.after}`).not.toMatch(/[{}[\]]|"/)
    }
    const html = await (await fetch(`${server.url}/admin/audit`, { headers: { Cookie: cookie } })).text()
    expect(html).not.toContain('Nothing recorded yet')
    expect(html).not.toContain('{&quot;')
  })
})
