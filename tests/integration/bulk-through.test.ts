import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { bulkAction } from '~/.server/bulk/registry'
import { resolveScope } from '~/.server/bulk/selection'
import { BULK_ACTIONS } from '~/components/bulk/catalog'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

interface Preview {
  previewId: string
  selected: number
  changeCount: number
  refusedCount: number
  summary: string
  through?: { list: string; records: number; detectors: number; withoutDetector?: number }
  changes: Array<{ id: number; label: string; from: Record<string, unknown>; to: Record<string, unknown>; version: number }>
  extra?: { audit?: { agree: number; disagree: number; unknown: number }; history?: string }
}
interface Applied {
  changeId: number | null
  applied: number
  refusedCount: number
  refused: Array<{ id: number; reason: string }>
}

// A selection on the sites, customers and events lists acts on the detectors those rows stand for.
describe('bulk actions on a selection of sites, customers or events', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  const q = () => data.db.$client
  const ids = (sql: string, ...args: unknown[]) => (q().prepare(sql).all(...args) as Array<{ id: number }>).map((r) => r.id)

  beforeAll(async () => {
    data = seededDb('small')
    q().exec('delete from closed_days; delete from observed_holidays; update users set daily_capacity = null')
    server = await startServer(data.path)
    for (const who of ['admin', 'lead', 'office', 'tech', 'manager']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const post = async <T,>(action: string, body: unknown, who = 'lead') => {
    const r = await fetch(`${server.url}/api/bulk/${action}`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
    return { status: r.status, body: (await r.json()) as T }
  }

  it('resolves each list to the detectors its rows stand for, as a join written here counts them', () => {
    const sites = ids('select id from sites order by id limit 3')
    const bySites = resolveScope(data.db, 'detector', { list: 'sites', ids: sites })
    expect(bySites.ids).toEqual(ids(`select d.id from detectors d join sites s on s.id = d.site_id where s.id in (${sites.join(',')}) order by d.id`))
    expect(bySites.through).toEqual({ list: 'sites', records: 3, detectors: bySites.ids.length })

    // A site list filter: every site in two regions.
    const byRegion = resolveScope(data.db, 'detector', { list: 'sites', filter: 'region=US-OR&region=US-WA&sort=name&offset=25' })
    expect(byRegion.ids).toEqual(ids("select d.id from detectors d join sites s on s.id = d.site_id where s.region in ('US-OR', 'US-WA') order by d.id"))
    expect(byRegion.through?.records).toBe((q().prepare("select count(*) n from sites where region in ('US-OR', 'US-WA')").get() as { n: number }).n)

    const byKind = resolveScope(data.db, 'detector', { list: 'customers', filter: { kind: 'restaurant' } })
    expect(byKind.ids).toEqual(ids("select d.id from detectors d join sites s on s.id = d.site_id join customers c on c.id = s.customer_id where c.kind = 'restaurant' order by d.id"))
    expect(byKind.through).toMatchObject({ list: 'customers', records: 2 })

    // Events: their own detectors once each; events of a whole site are counted apart. An id that no longer exists counts for nothing.
    const events = [...ids('select id from events where detector_id is null order by id limit 5'), ...ids('select id from events where detector_id is not null order by id limit 295')]
    const byEvents = resolveScope(data.db, 'detector', { list: 'events', ids: [...events, 99_999_999] })
    expect(byEvents.ids).toEqual(ids(`select distinct detector_id as id from events where id in (${events.join(',')}) and detector_id is not null order by 1`))
    const sitewide = (q().prepare(`select count(*) n from events where id in (${events.join(',')}) and detector_id is null`).get() as { n: number }).n
    expect(sitewide).toBeGreaterThan(0)
    expect(byEvents.through).toEqual({ list: 'events', records: 300, detectors: byEvents.ids.length, withoutDetector: sitewide })
    const troubles = resolveScope(data.db, 'detector', { list: 'events', filter: 'kind=trouble&from=2026-01-01' })
    expect(troubles.ids).toEqual(ids("select distinct detector_id as id from events where kind = 'trouble' and occurred_at >= '2026-01-01' and detector_id is not null order by 1"))

    expect(() => resolveScope(data.db, 'detector', { list: 'sites', filter: 'region=Oregon' })).toThrow(/The filter is not valid: region/)
    expect(() => resolveScope(data.db, 'visit', { list: 'sites', ids: sites })).toThrow(/acts on their detectors/)
  })

  it('offers in the console exactly the lists the server accepts for each action', () => {
    for (const info of BULK_ACTIONS) expect([...(bulkAction(info.name)!.through ?? [])], info.name).toEqual([...info.through])
  })

  it('refuses roles without the capability, and lists an action is not offered on', async () => {
    const site = ids('select id from sites order by id limit 1')
    for (const who of ['tech', 'manager']) expect((await post('set-state', { preview: true, list: 'sites', ids: site, state: 'out-of-service' }, who)).status).toBe(403)
    // Acknowledging is the lead's, also through events; the office may not.
    expect((await post('acknowledge', { preview: true, list: 'events', ids: [1] }, 'office')).status).toBe(403)
    const wrong = await post<{ error: string }>('set-state', { preview: true, list: 'events', ids: [1], state: 'normal' })
    expect(wrong.status).toBe(400)
    expect(wrong.body.error).toMatch(/not offered on a selection of events/)
    expect((await post('reschedule', { preview: true, list: 'sites', ids: site, mode: 'shift', days: 1 }, 'office')).status).toBe(400)
    expect((await post('assign', { preview: true, list: 'units', ids: site, technicianId: null })).status).toBe(400)
    expect((await post('assign', { preview: true, list: 'sites', filter: 'codeBasis=steam', technicianId: null })).status).toBe(400)
  })

  it('sites → set state: applies what the preview showed, writes each detector history, reports a stale detector, and undo restores exactly', async () => {
    const sites = ids("select site_id as id from detectors where state <> 'out-of-service' group by site_id order by site_id limit 2")
    const detectorIds = ids(`select id from detectors where site_id in (${sites.join(',')}) order by id`)
    const snapshot = () => q().prepare(`select id, state, version, risk_score, risk_reasons, updated_at from detectors where id in (${detectorIds.join(',')}) order by id`).all()
    const historyCount = () => (q().prepare(`select count(*) n from events where detector_id in (${detectorIds.join(',')})`).get() as { n: number }).n
    const before = snapshot()
    const eventsBefore = historyCount()
    const countsBefore = q().prepare("select rows from table_counts where name = 'events'").get()

    const body = { list: 'sites', ids: sites, state: 'out-of-service', reason: 'Building closed for roof work' }
    const preview = (await post<Preview>('set-state', { preview: true, ...body }, 'office')).body
    expect(preview.through).toEqual({ list: 'sites', records: 2, detectors: detectorIds.length })
    expect(preview.selected).toBe(detectorIds.length)
    const already = (q().prepare(`select count(*) n from detectors where id in (${detectorIds.join(',')}) and state = 'out-of-service'`).get() as { n: number }).n
    expect(preview.changeCount).toBe(detectorIds.length - already)
    expect(preview.extra?.history).toMatch(/State set to out of service .*Building closed for roof work/)

    // One detector changes under the preview: it is reported, the rest are applied.
    const moved = preview.changes[0].id
    q().prepare("update detectors set version = version + 1 where id = ?").run(moved)
    const changed = snapshot()
    const applied = await post<Applied>('set-state', { preview: false, previewId: preview.previewId, state: body.state, reason: body.reason }, 'office')
    expect(applied.status).toBe(200)
    expect(applied.body.applied).toBe(preview.changeCount - 1)
    expect(applied.body.refused.find((r) => r.id === moved)?.reason).toMatch(/Changed since the preview/)
    for (const c of preview.changes) {
      const now = q().prepare('select state from detectors where id = ?').get(c.id) as { state: string }
      expect(now.state, c.label).toBe(c.id === moved ? c.from.state : c.to.state)
    }

    // The history: who, when and why, one line per detector changed.
    const officeId = userIdByEmail(data.db, 'office@ductkeeper.test')
    const lines = q()
      .prepare(`select detector_id as detectorId, site_id as siteId, kind, detail, user_id as userId, occurred_at as at from events where detector_id in (${detectorIds.join(',')}) and kind = 'change' and detail like 'State set to%' order by detector_id`)
      .all() as Array<{ detectorId: number; siteId: number; kind: string; detail: string; userId: number; at: string }>
    expect(lines.map((l) => l.detectorId)).toEqual(preview.changes.filter((c) => c.id !== moved).map((c) => c.id))
    for (const l of lines) {
      const c = preview.changes.find((x) => x.id === l.detectorId)!
      expect(l.detail).toBe(`State set to out of service (was ${String(c.from.state).replace(/-/g, ' ')}): Building closed for roof work`)
      expect(l.userId).toBe(officeId)
      expect(sites).toContain(l.siteId)
      expect(Date.now() - Date.parse(l.at)).toBeLessThan(60_000)
    }
    expect(historyCount()).toBe(eventsBefore + lines.length)

    const undo = await post<{ restored: number }>('undo', { changeId: applied.body.changeId }, 'office')
    expect(undo.status).toBe(200)
    expect(historyCount()).toBe(eventsBefore)
    expect(q().prepare("select rows from table_counts where name = 'events'").get()).toEqual(countsBefore)
    // Undo bumps each version again; everything else is as it was.
    const after = snapshot() as Array<Record<string, unknown>>
    const was = changed as Array<Record<string, unknown>>
    expect(after.map(({ version: _v, updated_at: _u, ...rest }) => rest)).toEqual(was.map(({ version: _v, updated_at: _u, ...rest }) => rest))
    expect(before.length).toBe(after.length)
  })

  it('customers → acknowledge (lead): preview equals apply through the filter, and a detector changed since is reported', async () => {
    const filter = 'kind=school'
    const want = ids("select d.id from detectors d join customers c on c.id = d.customer_id where c.kind = 'school' and d.acknowledged_at is null order by d.id")
    const preview = (await post<Preview>('acknowledge', { preview: true, list: 'customers', filter })).body
    expect(preview.through).toMatchObject({ list: 'customers', records: 1 })
    expect(preview.changes.map((c) => c.id)).toEqual(want.slice(0, 200))
    expect(preview.changeCount).toBe(want.length)
    // Someone else assigns one of them meanwhile: it is reported, not acknowledged over their change.
    q().prepare('update detectors set assigned_to = ?, version = version + 1 where id = ?').run(userIdByEmail(data.db, 'rosa.imbert@ductkeeper.test'), want[0])
    const applied = (await post<Applied>('acknowledge', { preview: false, previewId: preview.previewId })).body
    expect(applied.applied).toBe(want.length - 1)
    expect(applied.refused).toEqual([{ id: want[0], label: expect.any(String), reason: expect.stringMatching(/Changed since the preview/) }])
    const leadId = userIdByEmail(data.db, 'lead@ductkeeper.test')
    expect(ids(`select id from detectors where acknowledged_by = ${leadId} and id in (${want.join(',')}) order by id`)).toEqual(want.slice(1))
    expect(ids(`select id from detectors where acknowledged_at is null and id in (${want.join(',')})`)).toEqual([want[0]])
  })

  it('events → assign: the events’ detectors go to the technician, a stale one is reported when applying with versions', async () => {
    const techId = userIdByEmail(data.db, 'rosa.imbert@ductkeeper.test')
    const events = ids("select id from events where kind = 'trouble' and detector_id is not null order by id limit 12")
    const detectorIds = ids(`select distinct detector_id as id from events where id in (${events.join(',')}) order by 1`)
    q().prepare(`update detectors set assigned_to = null where id in (${detectorIds.join(',')})`).run()
    const preview = await post<Preview & { versions: Record<string, number> }>('assign', { preview: true, list: 'events', ids: events, technicianId: techId })
    expect(preview.status).toBe(200)
    expect(preview.body.through).toEqual({ list: 'events', records: 12, detectors: detectorIds.length, withoutDetector: 0 })
    expect(Object.keys(preview.body.versions).map(Number)).toEqual(detectorIds)
    q().prepare('update detectors set version = version + 1 where id = ?').run(detectorIds[0])
    const applied = (await post<Applied>('assign', { preview: false, list: 'events', ids: events, versions: preview.body.versions, technicianId: techId })).body
    expect(applied.applied).toBe(detectorIds.length - 1)
    expect(applied.refused).toEqual([{ id: detectorIds[0], label: expect.any(String), reason: expect.stringMatching(/Changed since the preview/) }])
    expect(ids(`select id from detectors where assigned_to = ${techId} and id in (${detectorIds.join(',')}) order by id`)).toEqual(detectorIds.slice(1))
  })

  it("sites → delay audit: counts the sites' detectors and books what the preview showed", async () => {
    const sites = ids("select site_id as id from detectors where delay_agreement = 'disagree' group by site_id order by site_id limit 2")
    const mine = `select d.id from detectors d where d.site_id in (${sites.join(',')})`
    const counts = Object.fromEntries((q().prepare(`select delay_agreement o, count(*) n from (${mine}) x join detectors d on d.id = x.id group by o`).all() as Array<{ o: string; n: number }>).map((r) => [r.o, r.n]))
    const body = { list: 'sites', ids: sites, do: 'correction-visits' }
    for (const who of ['tech', 'manager']) expect((await post('delay-audit', { preview: true, ...body }, who)).status).toBe(403)
    const preview = (await post<Preview>('delay-audit', { preview: true, ...body }, 'office')).body
    expect(preview.through).toMatchObject({ list: 'sites', records: 2 })
    expect(preview.extra?.audit).toEqual({ agree: counts.agree ?? 0, disagree: counts.disagree ?? 0, unknown: counts.unknown ?? 0, policiesBeyond: expect.any(Number), settingsBeyond: expect.any(Number) })
    const visitsBefore = ids('select id from visits order by id')
    const applied = (await post<Applied>('delay-audit', { preview: false, previewId: preview.previewId, do: 'correction-visits' }, 'office')).body
    expect(applied.applied).toBe(preview.changeCount)
    const made = q()
      .prepare(
        `select s.name as site, v.site_id as siteId, v.scheduled_on as "on", count(vd.detector_id) as detectors from visits v join sites s on s.id = v.site_id
           join visit_detectors vd on vd.visit_id = v.id where v.id not in (${visitsBefore.join(',')}) group by v.id order by s.name`,
      )
      .all() as Array<{ site: string; siteId: number; on: string; detectors: number }>
    const shown = preview.changes.map((c) => ({ site: c.to.site, on: c.to.scheduledOn, detectors: c.to.detectors })).sort((a, b) => String(a.site).localeCompare(String(b.site)))
    expect(made.map(({ site, on, detectors }) => ({ site, on, detectors }))).toEqual(shown)
    expect(made.reduce((n, m) => n + m.detectors, 0)).toBe(counts.disagree)
    expect(made.every((m) => sites.includes(m.siteId) && m.on > TEST_TODAY)).toBe(true)
  })
  it('customers → cleaning cycle: plans only that customer’s detectors, each due one placed or refused', async () => {
    const customer = ids('select customer_id as id from detectors group by customer_id order by count(*) desc limit 1')
    const techs = ids("select id from users where role = 'technician' and active = 1 order by id")
    const input = { from: '2026-06-16', to: '2026-07-31', dueBy: '2026-12-31', technicianIds: techs }
    const preview = (await post<Preview>('cleaning-cycle', { preview: true, list: 'customers', ids: customer, ...input }, 'office')).body
    expect(preview.through).toMatchObject({ list: 'customers', records: 1 })
    expect(preview.changeCount).toBeGreaterThan(0)
    const planned = preview.changes.reduce((n, c) => n + Number(c.to.detectors), 0)
    const due = (q().prepare(`select count(*) n from detectors where customer_id = ? and next_cleaning_on <= '2026-12-31'`).get(customer[0]) as { n: number }).n
    expect(planned + preview.refusedCount).toBe(due)
    const visitsBefore = ids('select id from visits order by id')
    const applied = (await post<Applied>('cleaning-cycle', { preview: false, previewId: preview.previewId, ...input }, 'office')).body
    expect(applied.applied).toBe(preview.changeCount)
    const booked = (q().prepare(`select count(*) n from visit_detectors vd join detectors d on d.id = vd.detector_id where vd.visit_id not in (${visitsBefore.join(',')}) and d.customer_id = ?`).get(customer[0]) as { n: number }).n
    const anywhere = (q().prepare(`select count(*) n from visit_detectors where visit_id not in (${visitsBefore.join(',')})`).get() as { n: number }).n
    expect(booked).toBe(planned)
    expect(anywhere).toBe(planned)
  })
})
