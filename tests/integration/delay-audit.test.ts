import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { countSelection, openFunctionalVisits } from '~/.server/bulk/actions/delay-audit'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { resolveSelection } from '~/.server/bulk/selection'
import { undoBulk } from '~/.server/bulk/undo'
import { writeTx } from '~/.server/db'
import { rederive } from '~/.server/derivation'
import { auditCsv, auditPage, fleetCounts } from '~/.server/repos/delay-audit'
import { bookingPlan, usualTechnicians } from '~/.server/repos/triage-booking'
import { contextFor } from '#tests/setup/bulk'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

// TEST_TODAY is Monday 2026-06-15: the next working day is Tuesday 2026-06-16.
describe('delay-setting audit', () => {
  let data: ReturnType<typeof seededDb>
  const action = bulkAction('delay-audit')!
  const q = () => data.db.$client
  const lead = () => contextFor(data.db, 'lead@ductkeeper.test', TEST_TODAY)
  const versions = (p: { changes: Array<{ id: number; version: number }> }) => new Map(p.changes.map((c) => [c.id, c.version]))
  const visitIds = () => (q().prepare('select id from visits order by id').all() as Array<{ id: number }>).map((r) => r.id)

  beforeAll(() => {
    data = seededDb('small')
    q().exec('delete from closed_days; delete from observed_holidays')
  })
  afterAll(() => data?.cleanup())

  // Worked out again from the raw setting and policy, not from the stored agreement.
  const independent = () =>
    Object.fromEntries(
      (
        q()
          .prepare(
            `select case when d.delay_seconds is null then 'unknown' when d.delay_seconds = s.delay_policy_seconds then 'agree' else 'disagree' end as o, count(*) as n
               from detectors d join sites s on s.id = d.site_id group by o`,
          )
          .all() as Array<{ o: string; n: number }>
      ).map((r) => [r.o, r.n]),
    )

  it("counts the whole fleet per outcome as an independent SQL count does, with each outcome present", () => {
    const want = independent()
    const counts = fleetCounts(data.db)
    expect({ agree: counts.agree, disagree: counts.disagree, unknown: counts.unknown }).toEqual({ agree: want.agree ?? 0, disagree: want.disagree ?? 0, unknown: want.unknown ?? 0 })
    for (const o of ['agree', 'disagree', 'unknown'] as const) expect(counts[o], o).toBeGreaterThan(0)
    const all = resolveSelection(data.db, 'detector', { filter: '' })
    expect(all.length).toBe(counts.total)
    expect(countSelection(data.db, all)).toMatchObject({ agree: counts.agree, disagree: counts.disagree, unknown: counts.unknown })
    const page = auditPage(data.db, 'disagree', 1)
    const sites = (q().prepare("select count(distinct site_id) as n from detectors where delay_agreement = 'disagree'").get() as { n: number }).n
    expect(page.siteCount).toBe(sites)
    expect(page.sites.reduce((n, s) => n + s.detectors.length, 0)).toBe(page.sites.reduce((n, s) => n + s.count, 0))
  })

  it('marks agreeing settings verified exactly as previewed, and undo puts the old days back', () => {
    const ids = (q().prepare("select id from detectors where delay_agreement = 'agree' and coalesce(delay_observed_on, '') <> ? order by id limit 6").all(TEST_TODAY) as Array<{ id: number }>).map((r) => r.id)
    const other = (q().prepare("select id from detectors where delay_agreement = 'disagree' order by id limit 2").all() as Array<{ id: number }>).map((r) => r.id)
    const before = q().prepare(`select id, delay_observed_on as d from detectors where id in (${ids.join(',')}) order by id`).all()
    const input = action.input.parse({ do: 'verify' })
    const preview = previewBulk(data.db, action, [...ids, ...other], input, lead())
    expect(preview.changeCount).toBe(6)
    expect(preview.summary).toMatch(/2 that disagree or were never recorded are left out/)
    const applied = applyBulk(data.db, action, input, [...ids, ...other], versions(preview), lead())
    expect(applied.applied).toBe(6)
    const now = q().prepare(`select id, delay_observed_on as d from detectors where id in (${ids.join(',')}) order by id`).all() as Array<{ id: number; d: string }>
    expect(now.map((r) => r.d)).toEqual(preview.changes.map((c) => c.to.delayObservedOn))
    expect(now.every((r) => r.d === TEST_TODAY)).toBe(true)
    // A second preview has nothing left to do.
    expect(previewBulk(data.db, action, ids, input, lead()).changeCount).toBe(0)
    undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)
    expect(q().prepare(`select id, delay_observed_on as d from detectors where id in (${ids.join(',')}) order by id`).all()).toEqual(before)
  })

  it('books one correction visit per site for the fleet, as previewed, and undo removes exactly those visits', () => {
    const ids = resolveSelection(data.db, 'detector', { filter: 'delay=disagree' })
    const input = action.input.parse({ do: 'correction-visits' })
    const preview = previewBulk(data.db, action, ids, input, lead())
    const sites = (q().prepare("select count(distinct site_id) as n from detectors where delay_agreement = 'disagree'").get() as { n: number }).n
    const refusedSites = new Set(preview.refused.map((r) => r.label.split(' · ')[1]))
    expect(preview.changeCount).toBeGreaterThan(0)
    expect(preview.changeCount + [...refusedSites].filter((s) => !preview.changes.some((c) => c.to.site === s)).length).toBe(sites)
    const siteIds = preview.changes.map((c) => c.create!.siteId)
    expect(new Set(siteIds).size).toBe(siteIds.length)
    expect(preview.changes.every((c) => c.to.scheduledOn === '2026-06-16' && c.to.kind === 'repair')).toBe(true)

    const before = visitIds()
    const applied = applyBulk(data.db, action, input, ids, versions(preview), lead())
    expect(applied.applied).toBe(preview.changeCount)
    const created = visitIds().filter((id) => !before.includes(id))
    expect(created.length).toBe(preview.changeCount)
    const rows = q()
      .prepare(
        `select v.site_id as siteId, v.kind, v.scheduled_on as scheduledOn, v.technician_id as technicianId, v.status, v.notes,
                (select count(*) from visit_detectors vd where vd.visit_id = v.id and vd.tasks = 'functional') as n
           from visits v where v.id in (${created.join(',')}) order by v.site_id`,
      )
      .all() as Array<{ siteId: number; kind: string; scheduledOn: string; technicianId: number | null; status: string; notes: string; n: number }>
    const planned = preview.changes.map((c) => ({ siteId: c.create!.siteId, kind: 'repair', scheduledOn: c.create!.scheduledOn, technicianId: c.create!.technicianId, status: 'planned', n: c.create!.detectors.length })).sort((a, b) => a.siteId - b.siteId)
    expect(rows.map(({ notes: _n, ...r }) => r)).toEqual(planned)
    expect(rows[0].notes).toMatch(/per the device's instructions/)
    expect(rows[0].notes).toMatch(/never alter the fire alarm panel/)

    undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)
    expect(visitIds()).toEqual(before)
    expect((q().prepare(`select count(*) as n from visit_detectors where visit_id in (${created.join(',')})`).get() as { n: number }).n).toBe(0)
  })

  it('refuses the undo once a created visit has changed or work has started on it, removing nothing', () => {
    const ids = resolveSelection(data.db, 'detector', { filter: 'delay=disagree' })
    const input = action.input.parse({ do: 'correction-visits', date: '2026-06-17' })
    const preview = previewBulk(data.db, action, ids, input, lead())
    const before = visitIds()
    const applied = applyBulk(data.db, action, input, ids, versions(preview), lead())
    const created = visitIds().filter((id) => !before.includes(id))
    q().prepare("update visits set notes = 'gate code 4411', version = version + 1 where id = ?").run(created[0])
    expect(() => undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)).toThrow(/1 of the records changed since/)
    expect(visitIds().filter((id) => !before.includes(id))).toEqual(created)
    q().prepare('update visits set version = 1 where id = ?').run(created[0])
    // A notice logged is work started, though the visit's own row is as created.
    const site = q().prepare('select site_id as s from visits where id = ?').get(created[1]) as { s: number }
    q().prepare("insert into notifications (site_id, visit_id, notified_at, method, spoke_with, in_test_from, in_test_until) values (?, ?, '2026-06-15T15:00:00Z', 'phone', 'Desk', '2026-06-15T15:00:00Z', '2026-06-15T17:00:00Z')").run(site.s, created[1])
    expect(() => undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)).toThrow(/1 of the records changed since/)
    expect(visitIds().filter((id) => !before.includes(id))).toEqual(created)
  })

  // The correction visits earlier tests left booked, taken away so the next plan starts clear.
  const clearCorrections = () =>
    q().exec(`delete from notifications where visit_id in (select id from visits where notes like 'Delay setting correction%');
              delete from visit_detectors where visit_id in (select id from visits where notes like 'Delay setting correction%');
              delete from visits where notes like 'Delay setting correction%'`)

  it('books each site with a technician who covers its region and has room that day, on a working day; refuses with the reason when none can', () => {
    clearCorrections()
    const ids = resolveSelection(data.db, 'detector', { filter: 'delay=disagree' })
    const input = action.input.parse({ do: 'correction-visits' })
    // Tight days: every technician takes few detectors a day.
    q().exec("update users set daily_capacity = 2, capacity_unit = 'detectors' where role = 'technician'")
    const preview = previewBulk(data.db, action, ids, input, lead())
    const before = visitIds()
    const applied = applyBulk(data.db, action, input, ids, versions(preview), lead())
    expect(applied.applied).toBe(preview.changeCount)
    const created = visitIds().filter((id) => !before.includes(id))
    expect(created.length).toBeGreaterThan(0)
    // Checked from the raw rows: the region list, the weekday, the day's load against the limit.
    const booked = q()
      .prepare(
        `select v.id, v.site_id as siteId, s.region, v.scheduled_on as "on", u.regions, u.daily_capacity as cap,
                (select count(*) from visit_detectors vd join visits o on o.id = vd.visit_id
                  where o.technician_id = v.technician_id and o.scheduled_on = v.scheduled_on and o.status in ('planned', 'notified', 'in-progress')) as dayLoad
           from visits v join sites s on s.id = v.site_id join users u on u.id = v.technician_id where v.id in (${created.join(',')})`,
      )
      .all() as Array<{ siteId: number; region: string; on: string; regions: string; cap: number; dayLoad: number }>
    expect(booked).toHaveLength(created.length)
    for (const b of booked) {
      expect(b.regions.split(',')).toContain(b.region)
      expect([0, 6]).not.toContain(new Date(`${b.on}T12:00:00Z`).getUTCDay())
      expect(b.on > TEST_TODAY).toBe(true)
      expect(b.dayLoad).toBeLessThanOrEqual(b.cap)
    }
    expect(new Set(booked.map((b) => b.siteId)).size).toBe(booked.length)
    // A site with more disagreeing detectors than anyone takes in a day is refused, and says so.
    const crowded = q().prepare("select site_id as s, count(*) as n from detectors where delay_agreement = 'disagree' group by site_id having n > 2").all() as Array<{ s: number }>
    for (const c of crowded) expect(preview.changes.some((ch) => ch.create!.siteId === c.s)).toBe(false)
    if (crowded.length) expect(preview.refused.map((r) => r.reason).join('\n')).toMatch(/more than any technician covering US-[A-Z]{2} takes in a day \(2 at most\)/)
    undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)

    // A chosen technician who does not cover a site's region is refused there, by name.
    const t = q().prepare("select id, name, regions from users where role = 'technician' order by id limit 1").get() as { id: number; name: string; regions: string }
    q().exec("update users set daily_capacity = 40 where role = 'technician'")
    const chosen = previewBulk(data.db, action, ids, action.input.parse({ do: 'correction-visits', technicianId: t.id }), lead())
    const outside = q().prepare(`select count(distinct s.id) as n from detectors d join sites s on s.id = d.site_id where d.delay_agreement = 'disagree' and instr(',' || ? || ',', ',' || s.region || ',') = 0`).get(t.regions) as { n: number }
    expect(outside.n).toBeGreaterThan(0)
    expect(preview.refused.length + chosen.refused.length).toBeGreaterThan(0)
    expect(chosen.refused.filter((r) => r.reason === `${t.name} does not cover ${r.reason.split(' ').at(-1)}`).length).toBeGreaterThanOrEqual(outside.n)
    expect(chosen.changes.every((c) => c.create!.technicianId === t.id)).toBe(true)
    q().exec('update users set daily_capacity = 32 where id = 4; update users set daily_capacity = 28 where id = 6; update users set daily_capacity = 36 where id = 7; update users set daily_capacity = 24 where id = 8')
  })

  it('reads every site’s usual technician in one statement, as the booking dialog reads it site by site', () => {
    const detectorPerSite = (q().prepare('select min(id) as id from detectors group by site_id').all() as Array<{ id: number }>).map((r) => r.id)
    const one = new Map(bookingPlan(data.db, detectorPerSite, 'repair', TEST_TODAY).sites.map((s) => [s.siteId, s.usual && { id: s.usual.id, name: s.usual.name, visits: s.usual.visits, of: s.usual.of }]))
    const batch = usualTechnicians(data.db, [...one.keys()])
    expect([...one].filter(([, u]) => u !== null).length).toBeGreaterThan(0)
    for (const [siteId, u] of one) expect(batch.get(siteId) ?? null, `site ${siteId}`).toEqual(u)
  })

  it('finds the open functional visits the same way for a large selection (from the visits) as for a small one (per detector)', () => {
    const all = (q().prepare('select id from detectors order by id').all() as Array<{ id: number }>).map((r) => r.id)
    const whole = openFunctionalVisits(data.db, all, 0)
    const pieces = new Map<number, { visitId: number; on: string }>()
    for (let i = 0; i < all.length; i += 50) for (const [d, v] of openFunctionalVisits(data.db, all.slice(i, i + 50), Infinity)) pieces.set(d, v)
    expect(whole.size).toBeGreaterThan(0)
    expect([...whole].sort((a, b) => a[0] - b[0])).toEqual([...pieces].sort((a, b) => a[0] - b[0]))
  })

  it('books nothing when the write fails part-way through the visits', () => {
    clearCorrections()
    const ids = resolveSelection(data.db, 'detector', { filter: 'delay=disagree' })
    const input = action.input.parse({ do: 'correction-visits' })
    const preview = previewBulk(data.db, action, ids, input, lead())
    expect(preview.changeCount).toBeGreaterThan(1)
    const middle = preview.changes[Math.floor(preview.changes.length / 2)].create!.detectors[0].detectorId
    const before = { visits: visitIds(), items: (q().prepare('select count(*) as n from visit_detectors').get() as { n: number }).n, changes: (q().prepare('select count(*) as n from bulk_changes').get() as { n: number }).n }
    q().exec(`create trigger test_refuse_item before insert on visit_detectors when new.detector_id = ${middle} begin select raise(abort, 'refused for the test'); end`)
    try {
      expect(() => applyBulk(data.db, action, input, ids, versions(preview), lead())).toThrow(/refused for the test/)
    } finally {
      q().exec('drop trigger test_refuse_item')
    }
    expect({ visits: visitIds(), items: (q().prepare('select count(*) as n from visit_detectors').get() as { n: number }).n, changes: (q().prepare('select count(*) as n from bulk_changes').get() as { n: number }).n }).toEqual(before)
  })

  it('marks the whole fleet verified without re-deriving it: no stored fact can move, as a full re-derivation afterwards confirms', () => {
    const all = resolveSelection(data.db, 'detector', { filter: '' })
    const input = action.input.parse({ do: 'verify' })
    // A planted stale fact: a re-derivation of this detector would put it right, so it shows whether one ran.
    const marker = q().prepare("select id, risk_score as r from detectors where delay_agreement = 'agree' and coalesce(delay_observed_on, '') <> ? order by id limit 1").get(TEST_TODAY) as { id: number; r: number }
    q().prepare('update detectors set risk_score = 997 where id = ?').run(marker.id)
    const facts = () => q().prepare('select id, delay_agreement as a, next_due_on as due, due_status as s, loop_verdict as l from detectors order by id').all()
    const before = facts()

    // A failure in the middle leaves every day as it was.
    const preview = previewBulk(data.db, action, all, input, lead())
    const middle = preview.changes[Math.floor(preview.changes.length / 2)].id
    const days = () => q().prepare('select id, delay_observed_on as d from detectors order by id').all()
    const daysBefore = days()
    q().exec(`create trigger test_refuse_verify before update of delay_observed_on on detectors when new.id = ${middle} begin select raise(abort, 'refused for the test'); end`)
    try {
      expect(() => applyBulk(data.db, action, input, all, versions(preview), lead())).toThrow(/refused for the test/)
    } finally {
      q().exec('drop trigger test_refuse_verify')
    }
    expect(days()).toEqual(daysBefore)

    const applied = applyBulk(data.db, action, input, all, versions(preview), lead())
    expect(applied.applied).toBe(preview.changeCount)
    expect((q().prepare('select risk_score as r from detectors where id = ?').get(marker.id) as { r: number }).r).toBe(997)
    expect(facts()).toEqual(before)
    q().prepare('update detectors set risk_score = ? where id = ?').run(marker.r, marker.id)
    // The derivation does not read the verified day: re-deriving the fleet now changes nothing.
    expect(writeTx(data.db, () => rederive(data.db, all, TEST_TODAY))).toBe(0)
    undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)
    expect(days()).toEqual(daysBefore)
  })

  it('gives a caution with "verify with the AHJ" for a policy beyond the NFPA 72 limit, on the preview, the visit notes and the file', () => {
    // NFPA 72: trouble annunciated within 200 s [read, secondary]; 300 s is past it.
    const site = q().prepare("select d.site_id as s from detectors d where d.delay_agreement = 'agree' and d.delay_seconds is not null limit 1").get() as { s: number }
    q().prepare('update sites set delay_policy_seconds = 300 where id = ?').run(site.s)
    const ids = (q().prepare('select id from detectors where site_id = ?').all(site.s) as Array<{ id: number }>).map((r) => r.id)
    const preview = previewBulk(data.db, action, ids, action.input.parse({ do: 'verify' }), lead())
    const extra = preview.extra as { audit: { policiesBeyond: number }; cautions: string[] }
    expect(extra.audit.policiesBeyond).toBe(1)
    expect(extra.cautions.join(' ')).toMatch(/longer than the 200 s NFPA 72 allows for a trouble to be annunciated: verify with the AHJ/)
    expect(fleetCounts(data.db).policiesBeyond).toBeGreaterThanOrEqual(1)
    const csv = auditCsv(data.db, 'agree')
    expect(csv.split('\n')[0]).toBe('customer,site,city,region,tag,serial,delay_seconds,policy_seconds,observed_on,outcome,advice,caution')
    expect(csv).toMatch(/,300,.*verify with the AHJ/)
  })

  it('quotes text cells that a spreadsheet would run as a formula', () => {
    const d = q().prepare("select id from detectors where delay_agreement = 'unknown' limit 1").get() as { id: number }
    q().prepare("update detectors set tag = '=HYPERLINK(1)' where id = ?").run(d.id)
    expect(auditCsv(data.db, 'unknown')).toContain(",'=HYPERLINK(1),")
  })
})

describe('delay-setting audit over HTTP', () => {
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
    fetch(`${server.url}/api/bulk/delay-audit`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })

  it('lets the lead and office preview, refuses technicians and managers, and checks the body', async () => {
    for (const who of ['tech', 'manager']) expect((await post({ preview: true, filter: 'delay=disagree', do: 'correction-visits' }, who)).status).toBe(403)
    for (const who of ['lead', 'office']) {
      const res = await post({ preview: true, filter: 'delay=disagree', do: 'correction-visits' }, who)
      expect(res.status).toBe(200)
      expect(((await res.json()) as { changeCount: number }).changeCount).toBeGreaterThan(0)
    }
    expect((await post({ preview: true, filter: '', do: 'repaint' }, 'lead')).status).toBe(400)
    expect((await post({ preview: true, filter: '', do: 'correction-visits', date: '2020-01-01' }, 'lead')).status).toBe(400)
    expect((await post({ preview: true, filter: '', do: 'correction-visits', technicianId: 1 }, 'lead')).status).toBe(400)
    for (const who of ['tech', 'manager']) expect((await fetch(`${server.url}/api/delay-audit?outcome=disagree&format=csv`, { headers: { Cookie: cookie[who] } })).status).toBe(403)
    const csv = await fetch(`${server.url}/api/delay-audit?outcome=disagree&format=csv`, { headers: { Cookie: cookie.office } })
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    const lines = (await csv.text()).trim().split('\n')
    expect(lines.length - 1).toBe((data.db.$client.prepare("select count(*) as n from detectors where delay_agreement = 'disagree'").get() as { n: number }).n)
  })
})
