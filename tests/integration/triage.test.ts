import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

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
    const id = (await get('limit=1')).rows[0].id
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
    const holiday = await post({ intent: 'schedule', ids: [id], date: '2026-07-03' })
    expect(holiday.status).toBe(409)
    expect((await holiday.json()).error).toMatch(/not a working day.*next one is 2026-07-06/)
    const weekend = await post({ intent: 'schedule', ids: [id], date: '2026-06-20' })
    expect((await weekend.json()).error).toMatch(/weekend/)
    expect((await post({ intent: 'schedule', ids: [id], date: '2026-01-02' })).status).toBe(409)
  })

  it('assigns to a technician and validates input', async () => {
    const ids = (await get('limit=2')).rows.map((r: { id: number }) => r.id)
    const tech = userIdByEmail(data.db, 'tech@ductkeeper.test')
    expect((await post({ intent: 'assign', ids, technicianId: tech })).status).toBe(200)
    expect(q().prepare(`select count(*) as n from detectors where assigned_to = ? and id in (${ids.join(',')})`).get(tech)).toEqual({ n: 2 })
    expect((await post({ intent: 'assign', ids, technicianId: userIdByEmail(data.db, 'manager@ductkeeper.test') })).status).toBe(409)
    expect((await post({ intent: 'assign', ids: [], technicianId: tech })).status).toBe(400)
    // The same detector twice is one detector, not a refusal.
    expect((await post({ intent: 'assign', ids: [ids[0], ids[0]], technicianId: tech })).status).toBe(200)
    expect((await post({ intent: 'explode', ids })).status).toBe(400)
    expect((await fetch(`${server.url}/api/triage?reason=bogus`, { headers: { Cookie: cookie.lead } })).status).toBe(400)
  })
})
