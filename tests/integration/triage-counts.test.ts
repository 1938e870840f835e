import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { REASON_CODES } from '~/domain/vocabulary'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

// The queue's counts per reason and its open total are kept by triggers; after the everyday work of
// the queue (acknowledge, assign, book, complete) each must still equal a count over the detectors.
describe('triage counts after the queue’s work', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    for (const who of ['lead', 'tech']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const q = () => data.db.$client
  const get = async (path: string) => {
    const res = await fetch(`${server.url}${path}`, { headers: { Cookie: cookie.lead } })
    expect(res.status, path).toBe(200)
    return res.json()
  }
  const post = async (path: string, body: unknown, who = 'lead') => {
    const res = await fetch(`${server.url}${path}`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
    expect(res.status, `${path} ${JSON.stringify(body).slice(0, 80)}: ${await res.clone().text()}`).toBeLessThan(300)
    return res.json()
  }
  const counted = (code: string) =>
    (q().prepare(`select count(*) as n from detectors where risk_reasons != '' and acknowledged_at is null and (? = 'open' or risk_reasons like '%,' || ? || ',%')`).get(code, code) as { n: number })
      .n

  /** Every count Triage shows, from the API, against count(*); returns the counts. */
  async function agree() {
    const page = await get('/api/triage?limit=1')
    for (const code of ['open', ...REASON_CODES]) expect([code, page.counts[code]]).toEqual([code, counted(code)])
    expect(page.total).toBe(counted('open'))
    // One reason's queue total comes from the kept row too.
    expect((await get('/api/triage?reason=failed-test&limit=1')).total).toBe(counted('failed-test'))
    return page.counts as Record<string, number>
  }

  it('every reason count and the open total equal count(*) after acknowledge, assign and a completed visit', async () => {
    const start = await agree()
    const techId = userIdByEmail(data.db, 'tech@ductkeeper.test')

    // Acknowledge the two worst: they leave the open total.
    const worst = ((await get('/api/triage?limit=2')).rows as Array<{ id: number }>).map((r) => r.id)
    await post('/api/triage', { intent: 'acknowledge', ids: worst })
    const afterAck = await agree()
    expect(afterAck.open).toBe(start.open - 2)

    // Three open, overdue detectors at one site with no open visit, not yet failed: assign, book, complete.
    const site = q()
      .prepare(
        `select d.site_id as id from detectors d where d.risk_reasons like '%,overdue,%' and d.risk_reasons not like '%,failed-test,%' and d.acknowledged_at is null
           and not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
         group by d.site_id having count(*) >= 3 order by count(*) desc, d.site_id limit 1`,
      )
      .get() as { id: number }
    const ids = (
      q()
        .prepare(
          `select d.id from detectors d where d.site_id = ? and d.risk_reasons like '%,overdue,%' and d.risk_reasons not like '%,failed-test,%' and d.acknowledged_at is null
             and not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
           order by d.id limit 3`,
        )
        .all(site.id) as Array<{ id: number }>
    ).map((r) => r.id)
    expect(ids).toHaveLength(3)
    await post('/api/triage', { intent: 'assign', ids, technicianId: techId })
    await agree()

    const plan = await get(`/api/triage/booking?ids=${ids.join(',')}`)
    const booked = await post('/api/triage', { intent: 'schedule', kind: 'test', ids, sites: [{ siteId: site.id, scheduledOn: plan.sites[0].suggestedDay, technicianId: techId }] })
    const visitId = booked.visits[0].visitId as number
    await agree()

    const version = () => (q().prepare('select version from visits where id = ?').get(visitId) as { version: number }).version
    await post(
      `/api/visits/${visitId}`,
      {
        intent: 'notify',
        version: version(),
        method: 'phone',
        spokeWith: 'Operator at the central station',
        inTestFrom: `${TEST_TODAY}T13:00:00.000Z`,
        inTestUntil: `${TEST_TODAY}T17:00:00.000Z`,
        siteManagementTold: true,
      },
      'tech',
    )
    await post(`/api/visits/${visitId}`, { intent: 'start', version: version() }, 'tech')
    const [passA, passB, failing] = ids
    const overdueBefore = new Map(ids.map((id) => [id, (q().prepare('select risk_reasons as r from detectors where id = ?').get(id) as { r: string }).r]))
    await post(
      `/api/visits/${visitId}`,
      {
        intent: 'complete',
        version: version(),
        entries: [
          { detectorId: passA, result: 'pass' },
          { detectorId: passB, result: 'pass' },
          // The station and each head answered, as a functional test asks where they are fitted (ignored where not).
          { detectorId: failing, result: 'fail', reason: 'No signal at the panel', functional: { signalAtPanel: 'nothing', unitShutDown: false, resetOk: true }, testStationWorked: true, testStationReset: true, heads: [{ head: 1, tripped: true }, { head: 2, tripped: true }] },
        ],
      },
      'tech',
    )
    const after = await agree()

    // The completion moved the figures: the failed one gained its reason, and the kept counts followed.
    const reasons = new Map(ids.map((id) => [id, (q().prepare('select risk_reasons as r from detectors where id = ?').get(id) as { r: string }).r]))
    expect(reasons.get(failing)).toContain(',failed-test,')
    expect(after['failed-test']).toBe(afterAck['failed-test'] + 1)
    const leftOverdue = ids.filter((id) => reasons.get(id)!.includes(',overdue,')).length
    const wereOverdue = ids.filter((id) => overdueBefore.get(id)!.includes(',overdue,')).length
    expect(after.overdue - afterAck.overdue).toBe(leftOverdue - wereOverdue)
  })
})
