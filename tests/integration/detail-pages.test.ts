import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { pageLoaderData } from '#tests/setup/loader-data'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'
import type { customerRecord } from '~/.server/repos/customer'
import type { siteRecord } from '~/.server/repos/site'
import type { unitRecord } from '~/.server/repos/unit'
import { siteTime } from '~/utils/time-format'

type CustomerPage = NonNullable<ReturnType<typeof customerRecord>>
type SitePage = NonNullable<ReturnType<typeof siteRecord>> & { now: string }
type UnitPage = NonNullable<ReturnType<typeof unitRecord>>

// React escapes text in server-rendered HTML; compare against the same escaping.
const html = (s: string) => s.replaceAll('&', '&amp;').replaceAll('<', '&lt;').replaceAll('>', '&gt;').replaceAll("'", '&#x27;').replaceAll('"', '&quot;')
// React puts a comment between adjacent text parts of one element; read the page as its text.
const text = (body: string) => body.replaceAll('<!-- -->', '')
// Each event's <time dateTime="…Z"> and the clock it shows, as served.
const eventTimes = (body: string) =>
  [...text(body).matchAll(/<time datetime="(\d{4}-\d\d-\d\dT[^"]+Z)"[^>]*>([^<]*)<\/time>/gi)].map((m) => ({ at: m[1], shown: m[2] }))

describe('customer, site and unit pages', () => {
  const running = useSeededServer('small')
  let cookie = ''
  beforeAll(async () => {
    cookie = (await sessionCookieFor(running.data.db, userIdByEmail(running.data.db, DEMO_EMAIL.office))).cookie
  })

  const get = async (path: string) => {
    const res = await fetch(`${running.server.url}${path}`, { headers: { Cookie: cookie, Accept: 'text/html' } })
    return { status: res.status, body: await res.text() }
  }
  const loaderData = <T,>(path: string, routeId: string) => pageLoaderData<T>(running.server.url, path, routeId, { Cookie: cookie })
  const one = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).get(...args) as T
  const all = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).all(...args) as T[]
  const n = (sql: string, ...args: unknown[]) => one<{ n: number }>(sql, ...args).n

  it('shows a customer with its totals and its sites', async () => {
    const c = one<{ id: number; name: string }>(
      'select c.id, c.name from customers c where exists (select 1 from sites s where s.customer_id = c.id) order by c.id limit 1',
    )
    const sites = all<{ id: number; name: string }>('select id, name from sites where customer_id = ? order by id limit 200', c.id)
    const { status, body } = await get(`/customers/${c.id}`)
    expect(status).toBe(200)
    expect(body).toContain(html(c.name))
    for (const s of sites) {
      expect(body).toContain(html(s.name))
      expect(body).toContain(`href="/sites/${s.id}"`)
    }
    expect(body).toContain('Before any work: notify, then work.')
  })

  it("a customer's totals, due work and site figures are the database's", async () => {
    // The customer with the most overdue detectors, so the due-work list has rows to check.
    const { id } = one<{ id: number }>(
      "select customer_id as id from detectors where due_status = 'overdue' group by customer_id order by count(*) desc, customer_id limit 1",
    )
    const page = await loaderData<CustomerPage>(`/customers/${id}`, 'routes/_app.customers.$customerId')
    const count = (where: string) => n(`select count(*) as n from detectors where customer_id = ? and ${where}`, id)
    const totals = {
      sites: n('select count(*) as n from sites where customer_id = ?', id),
      units: n('select count(*) as n from units u join sites s on s.id = u.site_id where s.customer_id = ?', id),
      detectors: count('1'),
      overdue: count("due_status = 'overdue'"),
      dueSoon: count("due_status = 'due-soon'"),
      inTrouble: count("state = 'trouble'"),
      outOfService: count("state = 'out-of-service'"),
      delayDisagrees: count("delay_agreement = 'disagree'"),
    }
    expect(page.totals).toEqual(totals)
    expect(totals.overdue).toBeGreaterThan(0)

    // The due-work list is the overdue detectors its total counts: earliest due first, capped at 25.
    const due = all<{ id: number; nextDueOn: string; risk: number; daysOverdue: number }>(
      `select id, next_due_on as nextDueOn, risk_score as risk, cast(julianday(?) - julianday(next_due_on) as integer) as daysOverdue
       from detectors where customer_id = ? and due_status = 'overdue' order by next_due_on, risk_score desc, id limit 25`,
      TEST_TODAY,
      id,
    )
    expect(page.dueWork.total).toBe(totals.overdue)
    expect(page.dueWork.rows.map((r) => ({ id: r.id, nextDueOn: r.nextDueOn, risk: r.risk, daysOverdue: r.daysOverdue }))).toEqual(due)

    // Each site's figures are its own detectors'; its next visit the soonest still to come.
    const sites = all<{ id: number; detectors: number; overdue: number; inTrouble: number; nextVisitOn: string | null }>(
      `select s.id, count(d.id) as detectors, count(d.id) filter (where d.due_status = 'overdue') as overdue,
              count(d.id) filter (where d.state = 'trouble') as inTrouble,
              (select min(v.scheduled_on) from visits v where v.site_id = s.id and v.scheduled_on >= ?
                 and v.status in ('planned', 'notified', 'in-progress')) as nextVisitOn
       from sites s left join detectors d on d.site_id = s.id where s.customer_id = ?
       group by s.id order by overdue desc, inTrouble desc, s.name, s.id`,
      TEST_TODAY,
      id,
    )
    expect(page.sites.total).toBe(totals.sites)
    expect(page.sites.rows.map((s) => ({ id: s.id, detectors: s.detectors, overdue: s.overdue, inTrouble: s.inTrouble, nextVisitOn: s.nextVisitOn }))).toEqual(sites)
    expect(page.sites.rows.reduce((sum, s) => sum + s.detectors, 0)).toBe(totals.detectors)

    const { body } = await get(`/customers/${id}`)
    expect(text(body)).toContain(`Showing ${due.length} of ${totals.overdue} overdue detectors`)
    expect(text(body)).toContain(`${totals.sites} sites, most overdue first`)
  })

  it('shows a site with the monitoring company to call and its detectors', async () => {
    const s = one<{ id: number; phone: string; notifyLeadMinutes: number }>(
      `select s.id, mc.phone, mc.notify_lead_minutes as notifyLeadMinutes
       from sites s join monitoring_companies mc on mc.id = s.monitoring_company_id
       where exists (select 1 from detectors d where d.site_id = s.id) order by s.id limit 1`,
    )
    const detector = one<{ id: number; tag: string }>('select id, tag from detectors where site_id = ? order by tag limit 1', s.id)
    const { status, body } = await get(`/sites/${s.id}`)
    expect(status).toBe(200)
    expect(body).toContain(s.phone)
    expect(body).toContain(`at least ${s.notifyLeadMinutes} minutes before work starts`)
    expect(body).toContain(html(detector.tag))
    expect(body).toContain(`href="/devices/${detector.id}"`)
    expect(body).toContain('Before any work: notify, then work.')
  })

  it("a site's counts are the rows of the lists under them, capped with their totals", async () => {
    // The site with the most notifications: more than the page lists, so its count must say so.
    const { id } = one<{ id: number }>('select site_id as id from notifications group by site_id order by count(*) desc, site_id limit 1')
    const page = await loaderData<SitePage>(`/sites/${id}`, 'routes/_app.sites.$siteId')
    const totals = {
      units: n('select count(*) as n from units where site_id = ?', id),
      detectors: n('select count(*) as n from detectors where site_id = ?', id),
      notifications: n('select count(*) as n from notifications where site_id = ?', id),
      events: n('select count(*) as n from events where site_id = ?', id),
    }
    expect(totals.notifications).toBeGreaterThan(20)
    expect(page.units.total).toBe(totals.units)
    expect(page.detectors.total).toBe(totals.detectors)
    expect(page.notifications.total).toBe(totals.notifications)
    expect(page.events.total).toBe(totals.events)

    expect(page.notifications.rows.map((r) => [r.id, r.notifiedAt])).toEqual(
      all<{ id: number; at: string }>('select id, notified_at as at from notifications where site_id = ? order by notified_at desc, id desc limit 20', id).map((r) => [r.id, r.at]),
    )
    expect(page.events.rows.map((r) => r.id)).toEqual(
      all<{ id: number }>('select id from events where site_id = ? order by occurred_at desc, id desc limit 50', id).map((r) => r.id),
    )
    // Every logged notice has its own entry in the site's timeline, so the two histories agree.
    expect(n("select count(*) as n from events where site_id = ? and kind = 'notice'", id)).toBe(totals.notifications)
    expect(page.units.rows.map((u) => [u.id, u.detectors]).sort()).toEqual(
      all<{ id: number; n: number }>('select u.id, count(d.id) as n from units u left join detectors d on d.unit_id = u.id where u.site_id = ? group by u.id', id)
        .map((r) => [r.id, r.n])
        .sort(),
    )
    expect(page.detectors.rows.map((d) => [d.id, d.risk, d.nextDueOn]).sort()).toEqual(
      all<{ id: number; risk: number; next: string | null }>('select id, risk_score as risk, next_due_on as next from detectors where site_id = ?', id)
        .map((r) => [r.id, r.risk, r.next])
        .sort(),
    )

    const body = text((await get(`/sites/${id}`)).body)
    expect(body).toContain(`${totals.units} ${totals.units === 1 ? 'unit' : 'units'}, ${totals.detectors} ${totals.detectors === 1 ? 'detector' : 'detectors'}`)
    expect(body).toContain(`Showing 20 of ${totals.notifications}`)
    expect(body).toContain(totals.events > 50 ? `Latest 50 of ${totals.events}` : `All ${totals.events}`)
  })

  it("a site's visits to come are its open visits from today, soonest first, with their detector counts", async () => {
    const { id } = one<{ id: number }>(
      "select site_id as id from visits where status in ('planned', 'notified', 'in-progress') and scheduled_on >= ? order by scheduled_on, id limit 1",
      TEST_TODAY,
    )
    const page = await loaderData<SitePage>(`/sites/${id}`, 'routes/_app.sites.$siteId')
    const expected = all<{ id: number; scheduledOn: string; detectors: number }>(
      `select v.id, v.scheduled_on as scheduledOn, (select count(*) from visit_detectors vd where vd.visit_id = v.id) as detectors
       from visits v where v.site_id = ? and v.scheduled_on >= ? and v.status in ('planned', 'notified', 'in-progress')
       order by v.scheduled_on, v.id`,
      id,
      TEST_TODAY,
    )
    expect(expected.length).toBeGreaterThan(0)
    expect(page.upcomingVisits.total).toBe(expected.length)
    expect(page.upcomingVisits.rows.map((v) => ({ id: v.id, scheduledOn: v.scheduledOn, detectors: v.detectors }))).toEqual(expected.slice(0, 20))
    const body = text((await get(`/sites/${id}`)).body)
    for (const v of expected.slice(0, 20)) expect(body).toContain(v.scheduledOn)
  })

  it('shows a unit with its interlock wiring and the requirement check', async () => {
    const units = all<{ id: number; shutdownInput: 'break-to-stop' | 'make-to-stop' }>(
      `select min(id) as id, shutdown_input as shutdownInput from units group by shutdown_input`,
    )
    expect(units.length).toBe(2)
    for (const u of units) {
      const { status, body } = await get(`/units/${u.id}`)
      expect(status).toBe(200)
      // Break-to-stop takes the auxiliary NC to the unit's stop input; make-to-stop takes NO to its shutdown input.
      if (u.shutdownInput === 'break-to-stop') expect(body).toContain('auxiliary contact NC')
      else expect(body).toContain('auxiliary contact NO')
      expect(body).toContain('auxiliary contact C')
      expect(body).toContain('Verify with the authority having jurisdiction (AHJ)')
      expect(body).toContain('24 VAC power budget')
      expect(body).toContain('Before any work: notify, then work.')
    }
  })

  it("a unit's detectors and power budget are its own detectors' and their models' figures", async () => {
    const { id } = one<{ id: number }>('select unit_id as id from detectors group by unit_id order by count(*) desc, unit_id limit 1')
    const page = await loaderData<UnitPage>(`/units/${id}`, 'routes/_app.units.$unitId')
    const rows = all<{ id: number; standbyVa: number; alarmVa: number }>(
      'select d.id, m.standby_va as standbyVa, m.alarm_va as alarmVa from detectors d join detector_models m on m.id = d.model_id where d.unit_id = ? order by d.id',
      id,
    )
    const transformerVa = one<{ va: number }>('select transformer_va as va from units where id = ?', id).va
    expect(rows.length).toBeGreaterThan(1)
    expect(page.detectors.total).toBe(rows.length)
    expect(page.detectors.rows.map((d) => d.id).sort((a, b) => a - b)).toEqual(rows.map((r) => r.id))
    const standby = rows.reduce((s, r) => s + r.standbyVa, 0)
    const alarm = rows.reduce((s, r) => s + r.alarmVa, 0)
    expect(page.power.standbyVa).toBeCloseTo(standby, 6)
    expect(page.power.alarmVa).toBeCloseTo(alarm, 6)
    expect(page.power.ratingVa).toBe(transformerVa)
    expect(page.power.headroomVa).toBeCloseTo(transformerVa - Math.max(standby, alarm), 6)
  })

  it('lets every role read the pages and sends a visitor with no session to sign in', async () => {
    const paths = ['/customers/1', '/sites/1', '/units/1']
    for (const email of Object.values(DEMO_EMAIL)) {
      const c = (await sessionCookieFor(running.data.db, userIdByEmail(running.data.db, email))).cookie
      for (const path of paths) {
        const res = await fetch(`${running.server.url}${path}`, { headers: { Cookie: c } })
        expect(res.status, `${path} as ${email}`).toBe(200)
        await res.body?.cancel()
      }
    }
    for (const path of paths) {
      const res = await fetch(`${running.server.url}${path}`, { redirect: 'manual' })
      expect(res.status, path).toBe(302)
      expect(res.headers.get('location') ?? '').toMatch(/^\/sign-in\?returnTo=/)
      await res.body?.cancel()
    }
  })

  it('answers 404 for ids that do not exist', async () => {
    for (const path of ['/customers/999999', '/sites/999999', '/units/999999']) {
      expect((await get(path)).status, path).toBe(404)
    }
  })

  it('answers 404 for ids that are not record numbers', async () => {
    for (const path of ['/customers/abc', '/sites/1x', '/units/-3', '/units/1.5', '/sites/0x1', '/customers/1e0', '/units/01']) {
      expect((await get(path)).status, path).toBe(404)
    }
  })

  it("shows event and notice times on the site's own clock, with its zone's letters", async () => {
    // A site away from the office's zone, so a time in the wrong zone cannot pass for the right one.
    const site = one<{ id: number; tz: string }>(
      `select s.id, s.time_zone as tz from sites s where s.time_zone in ('America/Los_Angeles', 'America/Denver', 'America/Phoenix')
         and exists (select 1 from events e where e.site_id = s.id) and exists (select 1 from notifications n where n.site_id = s.id)
       order by s.id limit 1`,
    )
    const letters = { 'America/Los_Angeles': /^\d\d:\d\d P[DS]T$/, 'America/Denver': /^\d\d:\d\d M[DS]T$/, 'America/Phoenix': /^\d\d:\d\d MST$/ }[site.tz]!
    const siteBody = (await get(`/sites/${site.id}`)).body
    const onSite = eventTimes(siteBody)
    expect(onSite.length).toBe(Math.min(50, n('select count(*) as n from events where site_id = ?', site.id)))
    for (const e of onSite) {
      expect(e.shown).toMatch(letters)
      expect(e.shown).toBe(siteTime(e.at, site.tz))
    }
    // 2026-06-15T21:05Z is 14:05 PDT, 15:05 MDT or 14:05 MST: the helper the pages use reads the zone, not UTC.
    expect(siteTime('2026-06-15T21:05:00Z', site.tz)).not.toBe('21:05 UTC')
    // The latest notice: its time with the zone, in the notification history.
    const notice = one<{ at: string }>('select notified_at as at from notifications where site_id = ? order by notified_at desc, id desc limit 1', site.id)
    expect(text(siteBody)).toContain(siteTime(notice.at, site.tz))

    const detector = one<{ id: number }>('select detector_id as id from events where site_id = ? and detector_id is not null order by occurred_at desc limit 1', site.id)
    const onDevice = eventTimes((await get(`/devices/${detector.id}`)).body)
    expect(onDevice.length).toBeGreaterThan(0)
    for (const e of onDevice) expect(e.shown).toBe(siteTime(e.at, site.tz))
  })

  it('logs a refused request in one line, not a stack trace', async () => {
    const from = running.server.output().length
    const missing = await fetch(`${running.server.url}/no-such-page`, { headers: { Cookie: cookie } })
    expect(missing.status).toBe(404)
    await missing.body?.cancel()
    const wrongMethod = await fetch(`${running.server.url}/healthz`, { method: 'DELETE', headers: { Origin: running.server.url } })
    expect(wrongMethod.status).toBe(405)
    await wrongMethod.body?.cancel()
    await new Promise((r) => setTimeout(r, 300))
    const log = running.server.output().slice(from)
    expect(log.split('\n').filter((l) => l.includes('No route matches URL "/no-such-page"'))).toEqual(['GET /no-such-page 404: No route matches URL "/no-such-page"'])
    expect(log.split('\n').filter((l) => /^DELETE \/healthz 405: /.test(l))).toHaveLength(1)
    expect(log).not.toMatch(/^\s+at /m)
  })
})
