import { afterAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { VisitRefusal } from '~/.server/visits/refusal'
import { applyVisitIntent } from '~/.server/visits/work'
import { addDays } from '~/domain/dates'
import { visitIntent } from '~/domain/visit-forms'
import { userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('the day a visit’s results are dated', () => {
  const data = seededDb('small')
  afterAll(() => data.cleanup())
  const q = data.db.$client

  // A booked cleaning round (visual check and cleaning only), taken as started: the notice and start
  // have their own tests; this one is about the results' date.
  const visit = q
    .prepare(
      `select v.id, v.version from visits v where v.status = 'planned' and v.kind = 'cleaning'
       and not exists (select 1 from visit_detectors vd where vd.visit_id = v.id and instr(vd.tasks, 'functional') > 0) order by v.id limit 1`,
    )
    .get() as { id: number; version: number }
  q.prepare("update visits set status = 'in-progress' where id = ?").run(visit.id)
  const detectorIds = q.prepare('select detector_id from visit_detectors where visit_id = ? order by detector_id').pluck().all(visit.id) as number[]
  const entries = detectorIds.map((detectorId) => ({ detectorId, result: 'fail', reason: 'Head cover cracked; replacement ordered' }))
  const office = { id: userIdByEmail(data.db, 'office@ductkeeper.test'), role: 'office' as const }
  const results = () => q.prepare('select count(*) from task_results where visit_id = ?').pluck().get(visit.id) as number

  it('refuses a day after today with a 400 and its reason, and writes nothing', () => {
    const input = visitIntent.parse({ intent: 'complete', version: visit.version, entries, doneOn: addDays(TEST_TODAY, 1) })
    let refusal: unknown
    try {
      applyVisitIntent(data.db, office, visit.id, input, { today: TEST_TODAY })
    } catch (e) {
      refusal = e
    }
    expect(refusal).toBeInstanceOf(VisitRefusal)
    expect((refusal as VisitRefusal).status).toBe(400)
    expect((refusal as VisitRefusal).message).toMatch(/after today/)
    expect(results()).toBe(0)
    expect(q.prepare('select status from visits where id = ?').pluck().get(visit.id)).toBe('in-progress')
  })

  it('dates the results on an earlier day given, and the derivation follows the history', () => {
    const yesterday = addDays(TEST_TODAY, -1)
    applyVisitIntent(data.db, office, visit.id, visitIntent.parse({ intent: 'complete', version: visit.version, entries, doneOn: yesterday }), { today: TEST_TODAY })
    expect(results()).toBeGreaterThan(0)
    expect(q.prepare('select distinct done_on from task_results where visit_id = ?').pluck().all(visit.id)).toEqual([yesterday])
    for (const id of detectorIds) expect(q.prepare('select last_visual_on from detectors where id = ?').pluck().get(id)).toBe(yesterday)
    expect(checkDatabase(data.db, TEST_TODAY, { integrity: 'none' }).disagreements).toEqual([])
  })
})
