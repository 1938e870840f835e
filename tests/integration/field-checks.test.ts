import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { calendarFor } from '~/domain/calendar'
import { addDays } from '~/domain/dates'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

// A remote test station is operated at each functional test where one is fitted, and a station that
// does not trip the detector is a finding (common practice); a two-head module is tested and cleaned
// head by head. Both through the visit API, as the phone form sends them.
describe('field checks on a visit: test station and two heads', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let office = ''
  let station: { id: number; siteId: number; region: string }
  let twoHead: number
  let visitId: number

  const q = () => data.db.$client
  const post = (path: string, body: unknown) =>
    fetch(`${server.url}${path}`, { method: 'POST', headers: { Cookie: office, Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  const version = () => (q().prepare('select version from visits where id = ?').get(visitId) as { version: number }).version
  const functional = { signalAtPanel: 'alarm', unitShutDown: true, resetOk: true }

  beforeAll(async () => {
    data = seededDb('small')
    const free = `not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))`
    station = q()
      .prepare(
        `select d.id, d.site_id as siteId, s.region from detectors d join sites s on s.id = d.site_id
          where d.test_station <> 'none' and d.heads_fitted = 1 and ${free}
            and (select count(*) from detectors o where o.site_id = d.site_id and o.id <> d.id and o.test_station = 'none' and ${free.replace(/d\.id/g, 'o.id')}) >= 1
          order by d.id limit 1`,
      )
      .get() as typeof station
    twoHead = (q().prepare(`select o.id from detectors o where o.site_id = ? and o.id <> ? and o.test_station = 'none' and ${free.replace(/d\.id/g, 'o.id')} order by o.id limit 1`).get(station.siteId, station.id) as { id: number }).id
    // The record edit path is tested elsewhere; here the module simply has two heads fitted.
    q().prepare('update detectors set heads_fitted = 2 where id = ?').run(twoHead)
    server = await startServer(data.path)
    office = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'office@ductkeeper.test'))).cookie
    const day = calendarFor(station.region).nextWorkingDay(addDays(TEST_TODAY, 1))
    const booked = await post('/api/visits', {
      siteId: station.siteId,
      kind: 'test',
      scheduledOn: day,
      detectors: [
        { detectorId: station.id, tasks: ['visual', 'functional'] },
        { detectorId: twoHead, tasks: ['functional', 'cleaning'] },
      ],
    })
    expect(booked.status, await booked.clone().text()).toBe(201)
    visitId = (await booked.json()).visitId
    const notified = await post(`/api/visits/${visitId}`, {
      intent: 'notify',
      version: version(),
      method: 'phone',
      spokeWith: 'Central station desk',
      inTestFrom: `${day}T12:00:00.000Z`,
      inTestUntil: `${day}T16:00:00.000Z`,
      siteManagementTold: true,
      siteContact: 'Front desk',
    })
    expect(notified.status, await notified.clone().text()).toBe(200)
    expect((await post(`/api/visits/${visitId}`, { intent: 'start', version: version() })).status).toBe(200)
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  it('refuses a functional test on a detector with a station when the station was not operated', async () => {
    const res = await post(`/api/visits/${visitId}`, { intent: 'record', version: version(), entries: [{ detectorId: station.id, result: 'pass', functional }] })
    expect(res.status).toBe(400)
    const body = await res.json()
    expect(body.error).toMatch(/Operate the remote test station/)
    expect(body.detectorIds).toEqual([station.id])
  })

  it('refuses a pass over a station that did not trip the detector, naming it "station not wired"', async () => {
    const res = await post(`/api/visits/${visitId}`, { intent: 'record', version: version(), entries: [{ detectorId: station.id, result: 'pass', functional, testStationWorked: false }] })
    expect(res.status).toBe(400)
    expect((await res.json()).error).toMatch(/Marked as passed, but: Station not wired/)
  })

  it('asks for each head of a two-head module, tested and cleaned on its own', async () => {
    const res = await post(`/api/visits/${visitId}`, { intent: 'record', version: version(), entries: [{ detectorId: twoHead, result: 'pass', functional, cleaned: true }] })
    expect(res.status).toBe(400)
    const error = (await res.json()).error as string
    expect(error).toMatch(/Test head 1 on its own/)
    expect(error).toMatch(/Test head 2 on its own/)
    expect(error).toMatch(/Record whether head 2 was cleaned/)
  })

  it('completes with the station failed and one head left uncleaned: the history says so, and the database checks clean', async () => {
    const res = await post(`/api/visits/${visitId}`, {
      intent: 'complete',
      version: version(),
      entries: [
        { detectorId: station.id, result: 'fail', reason: 'Key station does not trip the module', functional, testStationWorked: false },
        { detectorId: twoHead, result: 'pass', functional, heads: [{ head: 1, tripped: true, cleaned: true }, { head: 2, tripped: true, cleaned: false }] },
      ],
    })
    expect(res.status, await res.clone().text()).toBe(200)
    const results = (id: number) =>
      Object.fromEntries((q().prepare('select task, outcome from task_results where visit_id = ? and detector_id = ?').all(visitId, id) as Array<{ task: string; outcome: string }>).map((r) => [r.task, r.outcome]))
    // The station writes its own result with the functional test, though it was not booked as a task.
    expect(results(station.id)).toEqual({ visual: 'pass', functional: 'pass', 'test-station': 'fail' })
    // Head 2 not cleaned: the cleaning is not done, so no cleaning result is written.
    expect(results(twoHead)).toEqual({ functional: 'pass' })
    const saved = JSON.parse((q().prepare('select findings from visit_detectors where visit_id = ? and detector_id = ?').get(visitId, twoHead) as { findings: string }).findings)
    expect(saved.heads).toEqual([
      { head: 1, tripped: true, cleaned: true },
      { head: 2, tripped: true, cleaned: false },
    ])
    expect(checkDatabase(data.db, TEST_TODAY, { integrity: 'quick' }).disagreements).toEqual([])
  })
})
