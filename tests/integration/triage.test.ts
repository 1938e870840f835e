import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'
import { loadCompanyCalendar } from '~/.server/bulk/calendar'
import { bookingPlan, suggestedDay } from '~/.server/repos/triage-booking'

describe('triage queue', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    for (const who of ['lead', 'office', 'tech', 'manager']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const q = () => data.db.$client
  const get = async (query: string, who = 'lead') => (await fetch(`${server.url}/api/triage?${query}`, { headers: { Cookie: cookie[who] } })).json()
  const post = (body: unknown, who = 'lead') =>
    fetch(`${server.url}/api/triage`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })

  it('ranks by risk with the engine’s reasons, and counts each reason', async () => {
    const page = await get('limit=50')
    const expected = q().prepare('select id from detectors where risk_score > 0 and acknowledged_at is null order by risk_score desc, id desc limit 50').all() as Array<{ id: number }>
    expect(page.rows.map((r: { id: number }) => r.id)).toEqual(expected.map((r) => r.id))
    for (const row of page.rows) {
      // The reasons add up to the stored score: the rank explains itself.
      expect(row.reasons.reduce((s: number, r: { points: number }) => s + r.points, 0)).toBe(row.risk)
    }
    const trouble = (q().prepare("select count(*) as n from detectors where state = 'trouble' and risk_score > 0 and acknowledged_at is null").get() as { n: number }).n
    expect(page.counts['in-trouble']).toBe(trouble)
    const filtered = await get('reason=in-trouble&limit=500')
    expect(filtered.total).toBe(trouble)
  })

  it('acknowledges in one transaction with an audit entry each, and the rows leave the queue', async () => {
    const top = (await get('limit=3')).rows.map((r: { id: number }) => r.id)
    const res = await post({ intent: 'acknowledge', ids: top })
    expect(res.status).toBe(200)
    const after = await get('limit=500')
    expect(after.rows.map((r: { id: number }) => r.id)).not.toEqual(expect.arrayContaining(top))
    expect((await get('acknowledged=only&limit=500')).rows.map((r: { id: number }) => r.id)).toEqual(expect.arrayContaining(top))
    const audit = q().prepare("select count(*) as n from audit_log where action = 'triage.acknowledge'").get() as { n: number }
    expect(audit.n).toBe(3)
    // A missing id refuses the whole request: nothing is half done.
    const mixed = await post({ intent: 'acknowledge', ids: [after.rows[0].id, 999_999] })
    expect(mixed.status).toBe(409)
    expect(q().prepare('select acknowledged_at from detectors where id = ?').get(after.rows[0].id)).toEqual({ acknowledged_at: null })
  })

  it('lets office schedule but not acknowledge or assign; technicians and managers neither', async () => {
    // The first queued detector not already on an open visit (a second booking of the same work is refused).
    const onVisit = new Set((q().prepare("select vd.detector_id as d from visit_detectors vd join visits v on v.id = vd.visit_id where v.status in ('planned','notified','in-progress')").all() as Array<{ d: number }>).map((r) => r.d))
    const id = ((await get('limit=50')).rows as Array<{ id: number }>).find((r) => !onVisit.has(r.id))!.id
    expect((await post({ intent: 'acknowledge', ids: [id] }, 'office')).status).toBe(403)
    expect((await post({ intent: 'assign', ids: [id], technicianId: userIdByEmail(data.db, 'tech@ductkeeper.test') }, 'office')).status).toBe(403)
    expect((await post({ intent: 'schedule', ids: [id], date: '2026-06-17' }, 'tech')).status).toBe(403)
    expect((await post({ intent: 'schedule', ids: [id], date: '2026-06-17' }, 'manager')).status).toBe(403)
    const ok = await post({ intent: 'schedule', ids: [id], date: '2026-06-17', kind: 'repair' }, 'office')
    expect(ok.status).toBe(200)
    expect((await ok.json()).message).toMatch(/Notify each monitoring company/)
    const visit = q().prepare("select v.kind, v.scheduled_on as on_, vd.detector_id as d from visits v join visit_detectors vd on vd.visit_id = v.id where v.kind = 'repair' and v.scheduled_on = '2026-06-17'").all()
    expect(visit).toEqual([{ kind: 'repair', on_: '2026-06-17', d: id }])
  })

  it('refuses a public holiday or weekend at the site, naming the next working day', async () => {
    const row = q().prepare("select d.id from detectors d join sites s on s.id = d.site_id where s.region = 'US-TX' limit 1").get() as { id: number } | undefined
    const id = row?.id ?? ((await get('limit=1')).rows[0].id as number)
    // 2026-07-03 is the observed Independence Day holiday; 2026-06-20 a Saturday.
    // A day the site does not work is bad input (400), not a clash with other work.
    const holiday = await post({ intent: 'schedule', ids: [id], date: '2026-07-03' })
    expect(holiday.status).toBe(400)
    expect((await holiday.json()).error).toMatch(/not a working day.*next one is 2026-07-06/)
    const weekend = await post({ intent: 'schedule', ids: [id], date: '2026-06-20' })
    expect((await weekend.json()).error).toMatch(/weekend/)
    // A past day is refused too.
    expect((await post({ intent: 'schedule', ids: [id], date: '2026-01-02' })).status).toBe(400)
  })

  it('assigns to a technician and validates input', async () => {
    const ids = (await get('limit=2')).rows.map((r: { id: number }) => r.id)
    const tech = userIdByEmail(data.db, 'tech@ductkeeper.test')
    expect((await post({ intent: 'assign', ids, technicianId: tech })).status).toBe(200)
    expect(q().prepare(`select count(*) as n from detectors where assigned_to = ? and id in (${ids.join(',')})`).get(tech)).toEqual({ n: 2 })
    const notTech = await post({ intent: 'assign', ids, technicianId: userIdByEmail(data.db, 'manager@ductkeeper.test') })
    expect(notTech.status).toBe(400)
    expect((await notTech.json()).error).toMatch(/no active technician/)
    expect((await post({ intent: 'assign', ids: [], technicianId: tech })).status).toBe(400)
    // The same detector twice is one detector, not a refusal.
    expect((await post({ intent: 'assign', ids: [ids[0], ids[0]], technicianId: tech })).status).toBe(200)
    expect((await post({ intent: 'explode', ids })).status).toBe(400)
    expect((await fetch(`${server.url}/api/triage?reason=bogus`, { headers: { Cookie: cookie.lead } })).status).toBe(400)
  })
})

describe('booking from the queue', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    for (const who of ['lead', 'office']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const q = () => data.db.$client
  const plan = (query: string, who = 'office') => fetch(`${server.url}/api/triage/booking?${query}`, { headers: { Cookie: cookie[who] } })
  const post = (body: unknown, who = 'office') =>
    fetch(`${server.url}/api/triage`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  const visitCount = () => (q().prepare('select count(*) as n from visits').get() as { n: number }).n

  /**
   * The technician with most of the site's ten latest finished visits, counted here in JS (ties go to
   * the latest), leaving out anyone in `unable`; null when nobody is left.
   */
  function usualByHand(siteId: number, unable: number[] = []) {
    const recent = q()
      .prepare("select v.technician_id as t, v.scheduled_on as d from visits v where v.site_id = ? and v.status = 'done' and v.technician_id is not null order by v.scheduled_on desc, v.id desc limit 10")
      .all(siteId) as Array<{ t: number; d: string }>
    const tally = new Map<number, { n: number; last: string }>()
    for (const r of recent) tally.set(r.t, { n: (tally.get(r.t)?.n ?? 0) + 1, last: [tally.get(r.t)?.last ?? '', r.d].sort()[1] })
    const best = [...tally].filter(([id]) => !unable.includes(id)).sort((a, b) => b[1].n - a[1].n || b[1].last.localeCompare(a[1].last))[0]
    return best ? { id: best[0], visits: best[1].n, of: recent.length } : null
  }

  /** An open-queue detector at a site with finished visits and no open visit of its own. */
  function freeQueued(skip: number[] = []) {
    return q()
      .prepare(
        `select d.id, d.site_id as siteId from detectors d where d.risk_reasons != '' and d.acknowledged_at is null
           and (select count(*) from visits v where v.site_id = d.site_id and v.status = 'done') >= 5
           and not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
           and d.site_id not in (${skip.join(',') || 0})
         order by d.risk_score desc, d.id limit 1`,
      )
      .get() as { id: number; siteId: number }
  }

  it('suggests the site’s usual technician and the next working day (Friday → Monday, a holiday stepped over)', async () => {
    const d = freeQueued()
    const res = await plan(`ids=${d.id}`)
    expect(res.status).toBe(200)
    const body = await res.json()
    expect(body.today).toBe(TEST_TODAY)
    expect(body.sites).toHaveLength(1)
    const site = body.sites[0]
    expect(site.siteId).toBe(d.siteId)
    expect(site.detectors.map((x: { id: number }) => x.id)).toEqual([d.id])
    const expected = usualByHand(d.siteId)!
    expect(expected.visits).toBeGreaterThan(0)
    expect(site.usual).toMatchObject(expected)
    expect(site.usual.name).toBe((q().prepare('select name from users where id = ?').get(expected.id) as { name: string }).name)
    // 2026-06-15 is a Monday: the next working day is Tuesday.
    expect(site.suggestedDay).toBe('2026-06-16')
    expect(body.technicians.map((t: { id: number }) => t.id)).toContain(expected.id)

    // Friday 2026-06-26 → Monday 2026-06-29.
    expect(bookingPlan(data.db, [d.id], 'test', '2026-06-26').sites[0].suggestedDay).toBe('2026-06-29')
    // Thursday 2026-06-18: Friday 2026-06-19 is Juneteenth, a public holiday the company works unless it
    // observes it; observed, it and the weekend are stepped over → Monday 2026-06-22.
    expect(bookingPlan(data.db, [d.id], 'test', '2026-06-18').sites[0].suggestedDay).toBe('2026-06-19')
    const region = (q().prepare('select region from sites where id = ?').get(d.siteId) as { region: string }).region
    q().prepare("insert or ignore into observed_holidays (region, name) values (?, 'Juneteenth')").run(region)
    const overHoliday = bookingPlan(data.db, [d.id], 'test', '2026-06-18').sites[0]
    expect(overHoliday.suggestedDay).toBe('2026-06-22')
    expect(overHoliday.skipped).toEqual([{ date: '2026-06-19', holiday: 'Juneteenth' }])
    expect(suggestedDay(loadCompanyCalendar(data.db), 'US-TX', '2026-07-02')).toEqual({ day: '2026-07-06', skipped: [{ date: '2026-07-03', holiday: 'Independence Day (substitute day)' }] })
    // The form is sent the region's holidays ahead, to warn before the server refuses.
    expect(overHoliday.holidays['2026-06-19']).toBe('Juneteenth')
    expect(overHoliday.holidays['2026-06-22']).toBeUndefined()
  })

  it('does not suggest someone who is no longer an active technician', async () => {
    // A site whose recent visits were shared, so that someone else can be suggested in their place.
    const shared = q()
      .prepare(
        `select d.id, d.site_id as siteId from detectors d where (select count(distinct technician_id) from (select technician_id from visits v
           where v.site_id = d.site_id and v.status = 'done' and v.technician_id is not null order by v.scheduled_on desc, v.id desc limit 10)) > 1
         order by d.id limit 1`,
      )
      .get() as { id: number; siteId: number } | undefined
    const d = shared ?? freeQueued()
    const usual = usualByHand(d.siteId)!
    expect(bookingPlan(data.db, [d.id], 'test', TEST_TODAY).sites[0].usual?.id).toBe(usual.id)
    q().prepare('update users set active = 0 where id = ?').run(usual.id)
    try {
      const site = bookingPlan(data.db, [d.id], 'test', TEST_TODAY).sites[0]
      const next = usualByHand(d.siteId, [usual.id])
      expect(site.usual).toEqual(next ? { ...next, name: expect.any(String) } : null)
      expect(site.usual?.id).not.toBe(usual.id)
    } finally {
      q().prepare('update users set active = 1 where id = ?').run(usual.id)
    }
  })

  it('books each site with the day and technician chosen, then shows that open visit before a second booking', async () => {
    const a = freeQueued()
    const b = freeQueued([a.siteId])
    const usual = usualByHand(a.siteId)!
    const other = (q().prepare("select id from users where role = 'technician' and active = 1 and id != ? order by id limit 1").get(usual.id) as { id: number }).id
    const res = await post({
      intent: 'schedule',
      kind: 'test',
      ids: [a.id, b.id],
      sites: [
        { siteId: a.siteId, scheduledOn: '2026-06-16', technicianId: usual.id },
        { siteId: b.siteId, scheduledOn: '2026-06-22', technicianId: other },
      ],
    })
    expect(res.status).toBe(200)
    const answer = await res.json()
    expect(answer.message).toMatch(/^Booked 2 visits from 2026-06-16 to 2026-06-22 for 2 detectors\. Notify each monitoring company/)
    const booked = q()
      .prepare('select v.id, v.site_id as siteId, v.scheduled_on as day, v.technician_id as tech, vd.detector_id as d, vd.tasks from visits v join visit_detectors vd on vd.visit_id = v.id where vd.detector_id in (?, ?) and v.status = ? order by v.scheduled_on')
      .all(a.id, b.id, 'planned') as Array<{ id: number; siteId: number; day: string; tech: number; d: number; tasks: string }>
    expect(booked.map(({ id: _id, ...rest }) => rest)).toEqual([
      { siteId: a.siteId, day: '2026-06-16', tech: usual.id, d: a.id, tasks: 'visual,functional' },
      { siteId: b.siteId, day: '2026-06-22', tech: other, d: b.id, tasks: 'visual,functional' },
    ])
    expect(answer.visits.map((v: { visitId: number }) => v.visitId).sort()).toEqual(booked.map((v) => v.id).sort())

    // Asked again, the plan names the open visit; the same work is marked, other work is not.
    const again = await (await plan(`ids=${a.id}&kind=test`)).json()
    expect(again.sites[0].openVisits).toEqual([
      expect.objectContaining({ visitId: booked[0].id, detectorId: a.id, scheduledOn: '2026-06-16', status: 'planned', sameWork: true, tasks: ['visual', 'functional'] }),
    ])
    const cleaning = await (await plan(`ids=${a.id}&kind=cleaning`)).json()
    expect(cleaning.sites[0].openVisits[0].sameWork).toBe(true) // visual is on both
    // Booked regardless, the same work is refused with the visit named.
    const twice = await post({ intent: 'schedule', ids: [a.id], sites: [{ siteId: a.siteId, scheduledOn: '2026-06-17', technicianId: null }] })
    expect(twice.status).toBe(409)
    const refusal = await twice.json()
    expect(refusal.error).toContain(String(booked[0].id))
    expect(refusal.conflicts).toEqual(expect.arrayContaining([{ detectorId: a.id, visitId: booked[0].id, task: 'visual' }]))
  })

  it('answers a bad technician, day or site with a 400 and a message, and books nothing', async () => {
    const d = freeQueued()
    const before = visitCount()
    const cases: Array<[unknown, RegExp]> = [
      [999_999, /active technician/],
      [userIdByEmail(data.db, 'manager@ductkeeper.test'), /active technician/],
      ['abc', /Choose a technician from the list/],
      [-3, /Choose a technician from the list/],
    ]
    for (const [technicianId, message] of cases) {
      const res = await post({ intent: 'schedule', ids: [d.id], sites: [{ siteId: d.siteId, scheduledOn: '2026-06-16', technicianId }] })
      expect(res.status, String(technicianId)).toBe(400)
      expect(JSON.stringify(await res.json()), String(technicianId)).toMatch(message)
    }
    const saturday = await post({ intent: 'schedule', ids: [d.id], sites: [{ siteId: d.siteId, scheduledOn: '2026-06-20', technicianId: null }] })
    expect(saturday.status).toBe(400)
    expect((await saturday.json()).error).toMatch(/weekend day.*next one is 2026-06-22/)
    const elsewhere = await post({ intent: 'schedule', ids: [d.id], sites: [{ siteId: d.siteId + 1, scheduledOn: '2026-06-16', technicianId: null }] })
    expect(elsewhere.status).toBe(400)
    expect((await elsewhere.json()).siteIds).toEqual([d.siteId + 1])
    expect((await post({ intent: 'schedule', ids: [d.id] })).status).toBe(400)
    expect(visitCount()).toBe(before)

    expect((await plan('ids=abc')).status).toBe(400)
    expect((await plan('ids=')).status).toBe(400)
    expect((await plan('ids=999999')).status).toBe(404)
    expect((await plan(`ids=${d.id}&kind=party`)).status).toBe(400)
  })
})
