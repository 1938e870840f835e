import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { contextFor, makeVisits } from '#tests/setup/bulk'
import { undoBulk } from '~/.server/bulk/undo'
import type { BulkAction } from '~/.server/bulk/action'

// TEST_TODAY is Monday 2026-06-15; Friday 2026-06-19 is Juneteenth, a public holiday in the US.
describe('bulk reschedule', () => {
  let data: ReturnType<typeof seededDb>
  let siteId: number
  let techId: number
  const reschedule = bulkAction('reschedule') as BulkAction<unknown>
  const q = () => data.db.$client
  const office = () => contextFor(data.db, 'office@ductkeeper.test', TEST_TODAY)
  const dates = (ids: number[]) => (q().prepare(`select scheduled_on as d from visits where id in (${ids.join(',')}) order by id`).all() as Array<{ d: string }>).map((r) => r.d)
  const visitsSnapshot = () => q().prepare('select * from visits order by id').all()
  const versions = (plan: { changes: Array<{ id: number; version: number }> }) => new Map(plan.changes.map((c) => [c.id, c.version]))

  beforeAll(() => {
    data = seededDb('small')
    siteId = (q().prepare("select id from sites where region = 'US-TX' order by id limit 1").get() as { id: number }).id
    techId = (q().prepare("select id from users where email = 'jonah.keel@ductkeeper.test'").get() as { id: number }).id
    // Each test sets the calendar and capacity it needs, whatever the seed holds.
    q().exec('delete from closed_days; delete from observed_holidays')
    q().prepare('update users set daily_capacity = null where id = ?').run(techId)
  })
  afterAll(() => data?.cleanup())

  it('applies exactly what the preview showed, and undo puts every row back', () => {
    const ids = makeVisits(data.db, { n: 5, siteId, date: '2026-06-16', technicianId: techId })
    const before = visitsSnapshot()
    const input = { mode: 'shift', days: 2 }
    const preview = previewBulk(data.db, reschedule, ids, input, office())
    expect(preview.changeCount).toBe(5)
    // Tuesday + 2 working days: Juneteenth is worked while the company does not observe it.
    expect(preview.changes.map((c) => c.to)).toEqual(ids.map(() => ({ scheduledOn: '2026-06-18' })))
    const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
    expect(applied.applied).toBe(5)
    expect(dates(ids)).toEqual(preview.changes.map((c) => c.to.scheduledOn))
    const change = q().prepare('select action, record_count as n, undone_at as undone from bulk_changes where id = ?').get(applied.changeId) as Record<string, unknown>
    expect(change).toEqual({ action: 'reschedule', n: 5, undone: null })
    const audit = q().prepare("select after from audit_log where action = 'bulk.reschedule' order by id desc limit 1").get() as { after: string }
    expect(JSON.parse(audit.after)).toMatchObject({ changeId: applied.changeId, count: 5, records: ids })

    undoBulk(data.db, applied.changeId!, office().actor, TEST_TODAY)
    const after = visitsSnapshot() as Array<Record<string, unknown>>
    // Row for row the same, apart from the versions, which moved on twice.
    expect(after.map((r) => ({ ...r, version: 0 }))).toEqual((before as Array<Record<string, unknown>>).map((r) => ({ ...r, version: 0 })))
    expect(dates(ids)).toEqual(ids.map(() => '2026-06-16'))
    expect(() => undoBulk(data.db, applied.changeId!, office().actor, TEST_TODAY)).toThrow(/already undone/)
  })

  it('refuses to undo once a record has changed since, naming it, and changes nothing', () => {
    const ids = makeVisits(data.db, { n: 3, siteId, date: '2026-06-16', technicianId: null })
    const input = { mode: 'date', date: '2026-06-23' }
    const preview = previewBulk(data.db, reschedule, ids, input, office())
    const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
    q().prepare("update visits set notes = 'called ahead', version = version + 1 where id = ?").run(ids[1])
    expect(() => undoBulk(data.db, applied.changeId!, office().actor, TEST_TODAY)).toThrow(new RegExp(`1 of the records changed since \\(Visit ${ids[1]} `))
    expect(dates(ids)).toEqual(['2026-06-23', '2026-06-23', '2026-06-23'])
  })

  it('reports a record changed between preview and apply, and leaves it alone', () => {
    const ids = makeVisits(data.db, { n: 3, siteId, date: '2026-06-16', technicianId: null })
    const input = { mode: 'shift', days: 1 }
    const preview = previewBulk(data.db, reschedule, ids, input, office())
    q().prepare("update visits set scheduled_on = '2026-06-30', version = version + 1 where id = ?").run(ids[0])
    const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
    expect(applied.applied).toBe(2)
    expect(applied.refused).toEqual([{ id: ids[0], label: `Visit ${ids[0]} · ${preview.changes[0].label.split(' · ')[1]} · 2026-06-30`, reason: expect.stringMatching(/Changed since the preview \(version 1 then, 2 now\)/) }])
    expect(dates(ids)).toEqual(['2026-06-30', '2026-06-17', '2026-06-17'])
  })

  it('rolls everything back when one write fails part way', () => {
    const ids = makeVisits(data.db, { n: 4, siteId, date: '2026-06-16', technicianId: null })
    q().exec(`create trigger bulk_test_boom before update on visits when new.id = ${ids[2]} begin select raise(abort, 'injected failure'); end`)
    const input = { mode: 'shift', days: 3 }
    const preview = previewBulk(data.db, reschedule, ids, input, office())
    const changes = (q().prepare('select count(*) n from bulk_changes').get() as { n: number }).n
    expect(() => applyBulk(data.db, reschedule, input, ids, versions(preview), office())).toThrow(/injected failure/)
    q().exec('drop trigger bulk_test_boom')
    expect(dates(ids)).toEqual(ids.map(() => '2026-06-16'))
    expect((q().prepare('select count(*) n from bulk_changes').get() as { n: number }).n).toBe(changes)
  })

  it('follows the company calendar: closed days are off, unobserved public holidays are worked', () => {
    const ids = makeVisits(data.db, { n: 2, siteId, date: '2026-06-17', technicianId: null })
    q().prepare("insert into closed_days (day, label) values ('2026-06-18', 'Stocktake')").run()
    // Wednesday + 1 working day skips the closed Thursday and lands on Juneteenth, which is worked.
    let preview = previewBulk(data.db, reschedule, ids, { mode: 'shift', days: 1 }, office())
    expect(preview.changes.map((c) => c.to.scheduledOn)).toEqual(['2026-06-19', '2026-06-19'])
    preview = previewBulk(data.db, reschedule, ids, { mode: 'date', date: '2026-06-18' }, office())
    expect(preview.changeCount).toBe(0)
    expect(preview.refused[0].reason).toMatch(/2026-06-18 is not a working day at .* \(company closed: Stocktake\)/)
    q().prepare("insert into observed_holidays (region, name) values ('US', 'Juneteenth')").run()
    preview = previewBulk(data.db, reschedule, ids, { mode: 'shift', days: 1 }, office())
    expect(preview.changes.map((c) => c.to.scheduledOn)).toEqual(['2026-06-22', '2026-06-22'])
    preview = previewBulk(data.db, reschedule, ids, { mode: 'date', date: '2026-06-19' }, office())
    expect(preview.refused[0].reason).toMatch(/\(Juneteenth\)/)
    q().exec("delete from closed_days; delete from observed_holidays")
  })

  it("keeps within a technician's daily capacity and shows the day's load before and after", () => {
    q().prepare("update users set daily_capacity = 4, capacity_unit = 'detectors' where id = ?").run(techId)
    const existing = makeVisits(data.db, { n: 1, siteId, date: '2026-06-25', technicianId: techId, detectors: 2 })
    const ids = makeVisits(data.db, { n: 3, siteId, date: '2026-06-24', technicianId: techId, detectors: 1 })
    const preview = previewBulk(data.db, reschedule, ids, { mode: 'shift', days: 1 }, office())
    expect(preview.changeCount).toBe(2)
    expect(preview.refused).toEqual([{ id: ids[2], label: expect.any(String), reason: 'Jonah Keel is full on 2026-06-25: 0 of 4 left, the visit needs 1' }])
    const loads = (preview.extra as { dayLoads: Array<Record<string, unknown>> }).dayLoads
    expect(loads).toEqual([
      { technicianId: techId, technician: 'Jonah Keel', date: '2026-06-24', before: 3, after: 1, capacity: 4, unit: 'detectors' },
      { technicianId: techId, technician: 'Jonah Keel', date: '2026-06-25', before: 2, after: 4, capacity: 4, unit: 'detectors' },
    ])
    // Applied over the same selection, the refused visit still holds its day: the same two move.
    const applied = applyBulk(data.db, reschedule, { mode: 'shift', days: 1 }, ids, versions(preview), office())
    expect(applied.applied).toBe(2)
    expect(applied.refused.map((r) => r.reason)).toEqual(['Jonah Keel is full on 2026-06-25: 0 of 4 left, the visit needs 1'])
    expect(dates(ids)).toEqual(['2026-06-25', '2026-06-25', '2026-06-24'])
    q().prepare(`delete from visit_detectors where visit_id in (${[...existing, ...ids].join(',')})`).run()
    q().prepare(`delete from visits where id in (${[...existing, ...ids].join(',')})`).run()
    q().prepare('update users set daily_capacity = null where id = ?').run(techId)
  })

  describe('between preview and apply', () => {
    // Two one-detector visits on Wednesday move to Thursday, where the technician has room for four.
    const input = { mode: 'shift', days: 1 }
    let ids: number[] = []
    let extra: number[] = []
    const setUp = () => {
      q().prepare("update users set daily_capacity = 4, capacity_unit = 'detectors' where id = ?").run(techId)
      ids = makeVisits(data.db, { n: 2, siteId, date: '2026-06-24', technicianId: techId, detectors: 1 })
      extra = []
      return previewBulk(data.db, reschedule, ids, input, office())
    }
    afterEach(() => {
      const all = [...ids, ...extra].join(',')
      q().exec(`delete from visit_detectors where visit_id in (${all}); delete from visits where id in (${all}); delete from closed_days`)
      q().prepare('update users set daily_capacity = null where id = ?').run(techId)
      vi.restoreAllMocks()
    })

    it('applies the plan previewed without working it out again when nothing it rests on changed', () => {
      const preview = setUp()
      expect(preview.changeCount).toBe(2)
      const judged = vi.spyOn(reschedule, 'preview')
      // Nothing at all written since: not even the basis is read again.
      const basis = vi.spyOn(reschedule, 'basis' as never)
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(basis).not.toHaveBeenCalled()
      expect(judged).not.toHaveBeenCalled()
      expect(applied.applied).toBe(2)
      expect(dates(ids)).toEqual(['2026-06-25', '2026-06-25'])
    })

    it('still takes the plan previewed when only rows it does not rest on were written since', () => {
      const preview = setUp()
      // A write elsewhere in the file (another visit's notes, a customer's phone): the basis is read again and holds.
      const other = q().prepare('select id from visits where technician_id <> ? or technician_id is null order by id limit 1').get(techId) as { id: number }
      q().prepare("update visits set notes = coalesce(notes, '') || ' ', version = version + 1 where id = ?").run(other.id)
      const judged = vi.spyOn(reschedule, 'preview')
      const basis = vi.spyOn(reschedule, 'basis' as never)
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(basis).toHaveBeenCalledTimes(1)
      expect(judged).not.toHaveBeenCalled()
      expect(applied.applied).toBe(2)
    })

    it("refuses a move that a visit booked since onto the technician's day leaves no room for", () => {
      const preview = setUp()
      expect(preview.changeCount).toBe(2)
      // Three detectors booked on Thursday by someone else: room for one of the two visits only.
      extra = makeVisits(data.db, { n: 1, siteId, date: '2026-06-25', technicianId: techId, detectors: 3 })
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(applied.applied).toBe(1)
      expect(applied.refused).toEqual([{ id: ids[1], label: expect.any(String), reason: 'Jonah Keel is full on 2026-06-25: 0 of 4 left, the visit needs 1' }])
      expect(dates(ids)).toEqual(['2026-06-25', '2026-06-24'])
    })

    it("refuses what a technician's capacity, lowered since, no longer allows", () => {
      const preview = setUp()
      q().prepare('update users set daily_capacity = 1 where id = ?').run(techId)
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(applied.applied).toBe(1)
      expect(applied.refused.map((r) => [r.id, r.reason])).toEqual([[ids[1], 'Jonah Keel is full on 2026-06-25: 0 of 1 left, the visit needs 1']])
    })

    it('moves to the working day the calendar gives now, when a day was closed since', () => {
      const preview = setUp()
      expect(preview.changes.map((c) => c.to.scheduledOn)).toEqual(['2026-06-25', '2026-06-25'])
      q().prepare("insert into closed_days (day, label) values ('2026-06-25', 'Stocktake')").run()
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(applied.applied).toBe(2)
      expect(dates(ids)).toEqual(['2026-06-26', '2026-06-26'])
    })

    it('keeps a visit changed since the preview on its day, and lets no other move onto a day it still fills', () => {
      // Room for one detector a day: Wednesday's visit moves to Thursday as Thursday's moves to Friday.
      q().prepare("update users set daily_capacity = 1, capacity_unit = 'detectors' where id = ?").run(techId)
      ids = [...makeVisits(data.db, { n: 1, siteId, date: '2026-06-24', technicianId: techId, detectors: 1 }), ...makeVisits(data.db, { n: 1, siteId, date: '2026-06-25', technicianId: techId, detectors: 1 })]
      const preview = previewBulk(data.db, reschedule, ids, input, office())
      expect(preview.changes.map((c) => c.to.scheduledOn)).toEqual(['2026-06-25', '2026-06-26'])
      // Thursday's visit is edited before the apply: it stays on Thursday, so Wednesday's has nowhere to go.
      q().prepare("update visits set notes = 'customer asked to keep the day', version = version + 1 where id = ?").run(ids[1])
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(applied.applied).toBe(0)
      expect(applied.refused.map((r) => [r.id, r.reason])).toEqual([
        [ids[0], 'Jonah Keel is full on 2026-06-25: 0 of 1 left, the visit needs 1'],
        [ids[1], expect.stringMatching(/^Changed since the preview/)],
      ])
      expect(dates(ids)).toEqual(['2026-06-24', '2026-06-25'])
    })

    it("works the plan out again when another visit on the technician's days changed since", () => {
      const preview = setUp()
      extra = makeVisits(data.db, { n: 1, siteId, date: '2026-06-25', technicianId: techId, detectors: 2 })
      const again = previewBulk(data.db, reschedule, ids, input, office())
      expect(again.changeCount).toBe(2)
      // Its notes edited (its version moved on): nothing that changes the load, but judged afresh all the same.
      q().prepare("update visits set notes = 'gate code changed', version = version + 1 where id = ?").run(extra[0])
      const judged = vi.spyOn(reschedule, 'preview')
      const applied = applyBulk(data.db, reschedule, input, ids, versions(preview), office())
      expect(judged).toHaveBeenCalledTimes(1)
      expect(applied.applied).toBe(2)
      expect(dates(ids)).toEqual(['2026-06-25', '2026-06-25'])
    })
  })
})
