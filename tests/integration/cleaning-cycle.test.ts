import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { resolveSelection } from '~/.server/bulk/selection'
import { undoBulk } from '~/.server/bulk/undo'
import { contextFor } from '#tests/setup/bulk'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

interface Extra {
  visits: Array<{ key: string; siteId: number; region: string; date: string; technicianId: number; detectors: number }>
  notes: string[]
  notDue: number
}

// TEST_TODAY is Monday 2026-06-15; the cycle runs from Tuesday the 16th for four weeks.
describe('cleaning cycle', () => {
  let data: ReturnType<typeof seededDb>
  const action = bulkAction('cleaning-cycle')!
  const q = () => data.db.$client
  const office = () => contextFor(data.db, 'office@ductkeeper.test', TEST_TODAY)
  const versions = (p: { changes: Array<{ id: number; version: number }> }) => new Map(p.changes.map((c) => [c.id, c.version]))
  const visitIds = () => (q().prepare('select id from visits order by id').all() as Array<{ id: number }>).map((r) => r.id)
  let techIds: number[]
  let ids: number[]
  const base = () => ({ from: '2026-06-16', to: '2026-07-10', technicianIds: techIds })

  beforeAll(() => {
    data = seededDb('small')
    q().exec("delete from closed_days; delete from observed_holidays; insert into closed_days (day, label) values ('2026-06-17', 'Stocktake')")
    techIds = (q().prepare("select id from users where role = 'technician' and active = 1 order by id").all() as Array<{ id: number }>).map((r) => r.id)
    ids = resolveSelection(data.db, 'detector', { filter: 'environment=humid&environment=kitchen' })
  })
  afterAll(() => data?.cleanup())

  it('plans within every rule and loses no detector: regions, capacity with booked work, no closed day, one visit per site per day', () => {
    const preview = previewBulk(data.db, action, ids, action.input.parse(base()), office())
    const due = (q().prepare("select count(*) as n from detectors where environment in ('humid', 'kitchen') and next_cleaning_on <= '2026-08-14'").get() as { n: number }).n
    expect(due).toBeGreaterThan(5)
    const placed = preview.changes.reduce((n, c) => n + c.create!.detectors.length, 0)
    expect(placed).toBeGreaterThan(0)
    expect(placed + preview.refusedCount).toBe(due)
    expect((preview.extra as Extra).notDue).toBe(ids.length - due)

    const users = new Map((q().prepare('select id, regions, daily_capacity as cap from users').all() as Array<{ id: number; regions: string; cap: number }>).map((u) => [u.id, u]))
    const regionOf = new Map((q().prepare('select id, region from sites').all() as Array<{ id: number; region: string }>).map((s) => [s.id, s.region]))
    const perDay = new Map<string, number>()
    const places = new Set<string>()
    for (const c of preview.changes) {
      const v = c.create!
      expect(v.kind).toBe('cleaning')
      expect(v.detectors.every((d) => d.tasks.join() === 'cleaning')).toBe(true)
      expect(users.get(v.technicianId!)!.regions.split(',')).toContain(regionOf.get(v.siteId))
      expect(v.scheduledOn).not.toBe('2026-06-17')
      expect(office().calendar.dayOff(regionOf.get(v.siteId)!, v.scheduledOn)).toBeNull()
      expect(places.has(`${v.siteId}|${v.scheduledOn}`)).toBe(false)
      places.add(`${v.siteId}|${v.scheduledOn}`)
      const k = `${v.technicianId}|${v.scheduledOn}`
      perDay.set(k, (perDay.get(k) ?? 0) + v.detectors.length)
    }
    for (const [k, n] of perDay) {
      const [tech, date] = k.split('|')
      const booked = (q().prepare("select count(*) as n from visit_detectors vd join visits v on v.id = vd.visit_id where v.technician_id = ? and v.scheduled_on = ? and v.status in ('planned','notified','in-progress')").get(tech, date) as { n: number }).n
      expect(n + booked, k).toBeLessThanOrEqual(users.get(Number(tech))!.cap)
    }
  })

  it('creates exactly the previewed visits in one step, and undo removes exactly those', () => {
    const input = action.input.parse(base())
    const preview = previewBulk(data.db, action, ids, input, office())
    const before = visitIds()
    const applied = applyBulk(data.db, action, input, ids, versions(preview), office())
    expect(applied.applied).toBe(preview.changeCount)
    const created = visitIds().filter((id) => !before.includes(id))
    const rows = q()
      .prepare(
        `select v.site_id as siteId, v.scheduled_on as scheduledOn, v.technician_id as technicianId, v.kind,
                (select group_concat(detector_id || ':' || tasks) from (select detector_id, tasks from visit_detectors where visit_id = v.id order by detector_id)) as items
           from visits v where v.id in (${created.join(',')}) order by v.site_id, v.scheduled_on`,
      )
      .all()
    const planned = preview.changes
      .map((c) => c.create!)
      .map((v) => ({ siteId: v.siteId, scheduledOn: v.scheduledOn, technicianId: v.technicianId, kind: 'cleaning', items: [...v.detectors].sort((a, b) => a.detectorId - b.detectorId).map((d) => `${d.detectorId}:cleaning`).join(',') }))
      .sort((a, b) => a.siteId - b.siteId || a.scheduledOn.localeCompare(b.scheduledOn))
    expect(rows).toEqual(planned)
    // Booked now: a second preview finds those detectors on an open cleaning visit.
    expect(previewBulk(data.db, action, ids, input, office()).changeCount).toBe(0)
    undoBulk(data.db, applied.changeId!, office().actor, TEST_TODAY)
    expect(visitIds()).toEqual(before)
  })

  it('takes a visit out and moves another within the rules, refusing a move outside them', () => {
    const first = previewBulk(data.db, action, ids, action.input.parse(base()), office())
    const visits = (first.extra as Extra).visits
    const [gone, moved] = visits
    const tech = (q().prepare('select id, regions from users where id = ?').get(moved.technicianId) as { id: number; regions: string })
    const stranger = (q().prepare("select id from users where role = 'technician' and (',' || regions || ',') not like ? limit 1").get(`%,${moved.region},%`) as { id: number })
    const input = action.input.parse({ ...base(), remove: [gone.key], moves: [{ key: moved.key, technicianId: stranger.id, date: '2026-07-09' }] })
    const second = previewBulk(data.db, action, ids, input, office())
    const extra = second.extra as Extra
    expect(second.changeCount).toBe(first.changeCount - 1)
    expect(second.refused.filter((r) => r.reason === 'Taken out of the plan by hand').length).toBe(gone.detectors)
    expect(extra.notes.join()).toMatch(/not moved, .* does not cover/)

    const ok = action.input.parse({ ...base(), moves: [{ key: moved.key, technicianId: tech.id, date: '2026-07-09' }] })
    const third = previewBulk(data.db, action, ids, ok, office())
    const after = (third.extra as Extra).visits.find((v) => v.siteId === moved.siteId && v.date === '2026-07-09')
    expect(after).toMatchObject({ technicianId: tech.id, detectors: moved.detectors, moved: true })
    // The same settings apply as previewed, the moved visit included.
    const before = visitIds()
    const applied = applyBulk(data.db, action, ok, ids, versions(third), office())
    expect(applied.applied).toBe(third.changeCount)
    const landed = q().prepare("select count(*) as n from visits where site_id = ? and scheduled_on = '2026-07-09' and kind = 'cleaning' and technician_id = ?").get(moved.siteId, tech.id) as { n: number }
    expect(landed.n).toBe(1)
    // A later change to one of them: undo refuses and removes nothing.
    const created = visitIds().filter((id) => !before.includes(id))
    q().prepare('update visits set technician_id = technician_id, version = version + 1 where id = ?').run(created[0])
    expect(() => undoBulk(data.db, applied.changeId!, office().actor, TEST_TODAY)).toThrow(/changed since/)
    expect(visitIds().filter((id) => !before.includes(id))).toEqual(created)
  })
})

describe('cleaning cycle over HTTP', () => {
  let data: ReturnType<typeof seededDb>
  let server: Awaited<ReturnType<typeof startServer>>
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
  const post = (body: unknown, who: string) =>
    fetch(`${server.url}/api/bulk/cleaning-cycle`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })

  it('lets office and lead plan, refuses technicians and managers, and checks the body', async () => {
    const techIds = (data.db.$client.prepare("select id from users where role = 'technician'").all() as Array<{ id: number }>).map((r) => r.id)
    const body = { preview: true, filter: 'environment=kitchen', from: '2026-06-16', to: '2026-07-10', technicianIds: techIds }
    for (const who of ['tech', 'manager']) expect((await post(body, who)).status).toBe(403)
    for (const who of ['office', 'lead']) expect((await post(body, who)).status).toBe(200)
    expect((await post({ ...body, to: '2026-06-01' }, 'office')).status).toBe(400)
    expect((await post({ ...body, technicianIds: [1] }, 'office')).status).toBe(400)
    expect((await post({ ...body, technicianIds: [] }, 'office')).status).toBe(400)
  })
})
