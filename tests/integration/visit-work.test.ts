import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { calendarFor } from '~/domain/calendar'
import { addDays } from '~/domain/dates'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('visit work: booking, notice, recording and completing', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  let techId: number
  let site: { id: number; name: string; region: string; company: string }
  let free: number[] = []
  let day: string

  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    for (const who of ['lead', 'office', 'tech', 'manager']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
    techId = userIdByEmail(data.db, 'tech@ductkeeper.test')
    // A site with a monitoring company and at least six one-head detectors with no remote test station
    // (those ask for more at a functional test: tests/integration/field-checks.test.ts) on no open visit at all.
    site = q()
      .prepare(
        `select s.id, s.name, s.region, m.name as company from sites s join monitoring_companies m on m.id = s.monitoring_company_id
         where (select count(*) from detectors d where d.site_id = s.id and not exists (
           select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
           and d.heads_fitted = 1 and d.test_station = 'none') >= 6
         order by s.id limit 1`,
      )
      .get() as typeof site
    free = (
      q()
        .prepare(
          `select d.id from detectors d where d.site_id = ? and not exists (
             select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
             and d.heads_fitted = 1 and d.test_station = 'none'
           order by d.id limit 6`,
        )
        .all(site.id) as Array<{ id: number }>
    ).map((r) => r.id)
    day = calendarFor(site.region).nextWorkingDay(addDays(TEST_TODAY, 1))
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const q = () => data.db.$client
  const post = (path: string, body: unknown, who = 'office') =>
    fetch(`${server.url}${path}`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  const get = async (path: string, who = 'office') => (await fetch(`${server.url}${path}`, { headers: { Cookie: cookie[who] } })).json()
  const book = (detectors: Array<{ detectorId: number; tasks: string[] }>, extra: Record<string, unknown> = {}, who = 'office') =>
    post('/api/visits', { siteId: site.id, kind: 'test', scheduledOn: day, windowFrom: '07:00', windowUntil: '11:00', detectors, ...extra }, who)
  const version = (visitId: number) => (q().prepare('select version from visits where id = ?').get(visitId) as { version: number }).version
  const notice = (v: number) => ({
    intent: 'notify',
    version: v,
    method: 'phone',
    spokeWith: 'Dana at the central station',
    confirmation: 'CS-4471',
    inTestFrom: `${day}T12:00:00.000Z`,
    inTestUntil: `${day}T16:00:00.000Z`,
    siteManagementTold: true,
    siteContact: 'Front desk',
  })

  let visitId: number
  const covered = () => free.slice(0, 3)

  it('books a visit with its detectors and tasks, and refuses a second booking of the same task (409, conflicts listed)', async () => {
    expect(free).toHaveLength(6)
    const [a, b, c] = covered()
    const res = await book(
      [
        { detectorId: a, tasks: ['visual', 'functional', 'cleaning'] },
        { detectorId: b, tasks: ['visual', 'functional'] },
        { detectorId: c, tasks: ['visual', 'functional'] },
      ],
      { technicianId: techId },
    )
    expect(res.status).toBe(201)
    visitId = (await res.json()).visitId
    expect(q().prepare('select detector_id as d, tasks, result from visit_detectors where visit_id = ? order by detector_id').all(visitId)).toEqual([
      { d: a, tasks: 'visual,functional,cleaning', result: 'pending' },
      { d: b, tasks: 'visual,functional', result: 'pending' },
      { d: c, tasks: 'visual,functional', result: 'pending' },
    ])
    expect(q().prepare("select count(*) as n from audit_log where action = 'visit.book' and entity_id = ?").get(String(visitId))).toEqual({ n: 1 })

    const visitsBefore = (q().prepare('select count(*) as n from visits').get() as { n: number }).n
    const again = await book([
      { detectorId: a, tasks: ['functional', 'sensitivity'] },
      { detectorId: free[3], tasks: ['visual'] },
    ])
    expect(again.status).toBe(409)
    const body = await again.json()
    expect(body.conflicts).toEqual([{ detectorId: a, visitId, task: 'functional' }])
    expect(body.error).toContain(String(visitId))
    // Nothing of the refused booking was written.
    expect(q().prepare('select count(*) as n from visits').get()).toEqual({ n: visitsBefore })

    // A detector from another site is refused, and so is a technician booking.
    const other = q().prepare('select id from detectors where site_id != ? limit 1').get(site.id) as { id: number }
    const stranger = await book([{ detectorId: other.id, tasks: ['visual'] }])
    expect(stranger.status).toBe(400)
    expect((await stranger.json()).detectorIds).toEqual([other.id])
    expect((await book([{ detectorId: free[5], tasks: ['visual'] }], {}, 'tech')).status).toBe(403)
  })

  it('refuses to start before the notice is logged (409), then notifies and starts', async () => {
    const start = await post(`/api/visits/${visitId}`, { intent: 'start', version: version(visitId) }, 'tech')
    expect(start.status).toBe(409)
    expect((await start.json()).error).toMatch(new RegExp(`^Log the notice to ${site.company} before starting`))
    expect(q().prepare('select status, started_at as s from visits where id = ?').get(visitId)).toEqual({ status: 'planned', s: null })

    const notified = await post(`/api/visits/${visitId}`, notice(1), 'tech')
    expect(notified.status).toBe(200)
    const record = await notified.json()
    expect(record.visit).toMatchObject({ status: 'notified', version: 2 })
    expect(record.notifications.rows).toHaveLength(1)
    expect(record.notifications.rows[0]).toMatchObject({ method: 'phone', spokeWith: 'Dana at the central station', confirmation: 'CS-4471', siteContactTold: 'Front desk', clearedAt: null })
    const event = q().prepare("select detail, user_id as u from events where site_id = ? and kind = 'notice' order by id desc limit 1").get(site.id) as { detail: string; u: number }
    expect(event.u).toBe(techId)
    expect(event.detail).toContain('CS-4471')

    const started = await post(`/api/visits/${visitId}`, { intent: 'start', version: 2 }, 'tech')
    expect(started.status).toBe(200)
    expect((await started.json()).visit).toMatchObject({ status: 'in-progress', version: 3 })
  })

  it('lets a technician record only visits assigned to them (403 otherwise)', async () => {
    const res = await book([{ detectorId: free[4], tasks: ['visual'] }])
    const otherVisit = (await res.json()).visitId as number
    const entry = { detectorId: free[4], result: 'pass' }
    expect((await post(`/api/visits/${otherVisit}`, notice(1), 'tech')).status).toBe(403)
    expect((await post(`/api/visits/${otherVisit}`, { intent: 'record', version: 1, entries: [entry] }, 'tech')).status).toBe(403)
    expect((await post(`/api/visits/${otherVisit}`, { intent: 'record', version: 1, entries: [entry] }, 'manager')).status).toBe(403)
    // The office may cancel it; a technician may not change a booking at all.
    expect((await post(`/api/visits/${otherVisit}`, { intent: 'cancel', version: 1, reason: 'Site closed for a refit' }, 'tech')).status).toBe(403)
    const cancelled = await post(`/api/visits/${otherVisit}`, { intent: 'cancel', version: 1, reason: 'Site closed for a refit' })
    expect(cancelled.status).toBe(200)
    expect((await cancelled.json()).visit).toMatchObject({ status: 'cancelled', cancelReason: 'Site closed for a refit', version: 2 })
  })

  it('takes one of two saves made from the same version and refuses the other (409)', async () => {
    const v = version(visitId)
    const [a] = covered()
    // Sent together, as from two tabs opened on the same version: the write lock orders them.
    const tabs = [
      { detectorId: a, result: 'pass', cleaned: true, loop: { normal: 15_200 }, loopReadBy: 'Ines Varga, Northpoint Alarm Co.' },
      { detectorId: a, result: 'fail', reason: 'Other tab' },
    ]
    const answers = await Promise.all(tabs.map((entry) => post(`/api/visits/${visitId}`, { intent: 'record', version: v, entries: [entry] }, 'tech')))
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409])
    const winner = tabs[answers.findIndex((r) => r.status === 200)]
    const loser = answers.find((r) => r.status === 409)!
    expect((await loser.json()).error).toMatch(/^This visit changed since you opened it/)
    expect(q().prepare('select result, result_reason as r from visit_detectors where visit_id = ? and detector_id = ?').get(visitId, a)).toEqual({ result: winner.result, r: winner.reason ?? null })
    expect(version(visitId)).toBe(v + 1)
    // Saving again replaces that detector's entry; no history is written yet.
    const entry = { detectorId: a, result: 'pass', cleaned: true, loop: { normal: 15_150, alarm: 6.5 }, delaySecondsFound: 12 }
    const findingsNow = () => (q().prepare('select findings from visit_detectors where visit_id = ? and detector_id = ?').get(visitId, a) as { findings: string }).findings
    const kept = findingsNow()
    // Loop readings without who read them at the panel are refused on that field, and nothing is written.
    for (const loopReadBy of [undefined, ' ', 'X']) {
      const unsigned = await post(`/api/visits/${visitId}`, { intent: 'record', version: v + 1, entries: [{ ...entry, loopReadBy }] }, 'tech')
      expect(unsigned.status).toBe(400)
      const issue = ((await unsigned.json()).issues as Array<{ path: string; message: string }>).find((i) => i.path === 'entries.0.loopReadBy')
      expect(issue?.message).toMatch(loopReadBy === undefined ? /^Say who read the loop at the panel: the fire alarm contractor/ : /^Give the name and firm, at least 2 characters/)
      expect(version(visitId)).toBe(v + 1)
      expect(findingsNow()).toBe(kept)
    }
    const again = await post(`/api/visits/${visitId}`, { intent: 'record', version: v + 1, entries: [{ ...entry, loopReadBy: '  Ines Varga, Northpoint Alarm Co. ' }] }, 'tech')
    expect(again.status).toBe(200)
    expect(JSON.parse(findingsNow())).toEqual({ cleaned: true, loop: { normal: 15_150, alarm: 6.5 }, loopReadBy: 'Ines Varga, Northpoint Alarm Co.', delaySecondsFound: 12 })
    expect(q().prepare('select count(*) as n from task_results where visit_id = ?').get(visitId)).toEqual({ n: 0 })
    expect(q().prepare('select count(*) as n from readings where visit_id = ?').get(visitId)).toEqual({ n: 0 })
  })

  it('completes in one transaction: history for exactly the covered detectors, the derivation in step', async () => {
    const [a, b, c] = covered()
    const snapshot = () => q().prepare('select * from detectors where id not in (?, ?, ?) order by id').all(a, b, c)
    const before = snapshot()
    const failEntry = { detectorId: b, result: 'fail', reason: 'No alarm at the panel; module to be replaced', functional: { signalAtPanel: 'nothing', unitShutDown: true, resetOk: true } }

    // c has no entry: refused, naming it, and nothing written.
    const missing = await post(`/api/visits/${visitId}`, { intent: 'complete', version: version(visitId), entries: [failEntry] }, 'tech')
    expect(missing.status).toBe(400)
    const refusal = await missing.json()
    expect(refusal.detectorIds).toEqual([c])
    expect(refusal.error).toContain(`detector ${c}`)
    expect(q().prepare('select count(*) as n from task_results where visit_id = ?').get(visitId)).toEqual({ n: 0 })

    const done = await post(
      `/api/visits/${visitId}`,
      { intent: 'complete', version: version(visitId), entries: [failEntry, { detectorId: c, result: 'not-tested', reason: 'Unit locked out by the site' }] },
      'tech',
    )
    expect(done.status).toBe(200)
    const record = await done.json()
    expect(record.visit.status).toBe('done')
    expect(record.visit.completedAt).toBeTruthy()
    expect(record.readings.map((r: { detectorId: number; kind: string }) => `${r.detectorId}:${r.kind}`)).toEqual([`${a}:loop-alarm`, `${a}:loop-normal`])

    const results = q().prepare('select detector_id as d, task, outcome, done_on as on_ from task_results where visit_id = ? order by detector_id, task').all(visitId)
    expect(results).toEqual([
      { d: a, task: 'cleaning', outcome: 'pass', on_: TEST_TODAY },
      { d: a, task: 'functional', outcome: 'pass', on_: TEST_TODAY },
      { d: a, task: 'visual', outcome: 'pass', on_: TEST_TODAY },
      { d: b, task: 'functional', outcome: 'fail', on_: TEST_TODAY },
      { d: b, task: 'visual', outcome: 'pass', on_: TEST_TODAY },
    ])
    expect(q().prepare('select detector_id as d, result, result_reason as r from visit_detectors where visit_id = ? order by detector_id').all(visitId)).toEqual([
      { d: a, result: 'pass', r: null },
      { d: b, result: 'fail', r: 'No alarm at the panel; module to be replaced' },
      { d: c, result: 'skipped', r: 'Unit locked out by the site' },
    ])
    const facts = q().prepare('select id, last_functional_on as f, last_cleaned_on as cl, last_result as lr, delay_seconds as delay, delay_observed_on as seen from detectors where id in (?, ?) order by id').all(a, b)
    expect(facts).toEqual([
      { id: a, f: TEST_TODAY, cl: TEST_TODAY, lr: 'pass', delay: 12, seen: TEST_TODAY },
      expect.objectContaining({ id: b, f: TEST_TODAY, lr: 'fail' }),
    ])
    expect(q().prepare("select count(*) as n from events where detector_id in (?, ?, ?) and kind = 'test' and detail like ?").get(a, b, c, `%visit ${visitId}%`)).toEqual({ n: 3 })

    // Every other detector's row is exactly as it was, and the database agrees with the derivation.
    expect(snapshot()).toEqual(before)
    const check = checkDatabase(data.db, TEST_TODAY, { integrity: 'quick' })
    expect(check.disagreements).toEqual([])
    expect(check.detectors).toBeGreaterThan(100)

    // The failed detector reaches Triage through the derivation, and its record carries the reason.
    const triage = await get(`/api/triage?reason=failed-test&limit=500`, 'lead')
    expect(triage.rows.map((r: { id: number }) => r.id)).toContain(b)
    const device = await get(`/api/devices/${b}`, 'lead')
    expect(JSON.stringify(device)).toContain('No alarm at the panel; module to be replaced')
  })

  it('logs the all-clear on the latest notice once the work is done', async () => {
    const v = version(visitId)
    const res = await post(`/api/visits/${visitId}`, { intent: 'all-clear', version: v, confirmedWith: 'Dana at the central station' }, 'tech')
    expect(res.status).toBe(200)
    const record = await res.json()
    expect(record.visit.version).toBe(v + 1)
    expect(record.notifications.rows[0]).toMatchObject({ clearedWith: 'Dana at the central station', clearedBy: expect.any(String) })
    expect(record.notifications.rows[0].clearedAt).toBeTruthy()
    expect(record.testWindowOverrun).toBe(false)
    // A done visit cannot be cancelled or rescheduled.
    expect((await post(`/api/visits/${visitId}`, { intent: 'cancel', version: v + 1, reason: 'x' })).status).toBe(409)
    expect(q().prepare("select count(*) as n from audit_log where entity = 'visit' and entity_id = ?").get(String(visitId))).toEqual({ n: version(visitId) })
  })

  it('accepts a progressive form posting the intent as a payload field, and answers 400 to bad input', async () => {
    const res = await book([{ detectorId: free[5], tasks: ['visual'] }])
    const id = (await res.json()).visitId as number
    const form = new URLSearchParams({ payload: JSON.stringify({ intent: 'edit', version: 1, notes: 'Bring the long ladder' }) })
    const edited = await fetch(`${server.url}/api/visits/${id}`, { method: 'POST', headers: { Cookie: cookie.office, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' }, body: form })
    expect(edited.status).toBe(200)
    expect((await edited.json()).visit).toMatchObject({ notes: 'Bring the long ladder', version: 2 })
    const broken = await fetch(`${server.url}/api/visits/${id}`, { method: 'POST', headers: { Cookie: cookie.office, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' }, body: 'payload={nope' })
    expect(broken.status).toBe(400)
    expect((await post(`/api/visits/${id}`, { intent: 'assign', version: 2, technicianId: userIdByEmail(data.db, 'office@ductkeeper.test') })).status).toBe(400)
    const assigned = await post(`/api/visits/${id}`, { intent: 'assign', version: 2, technicianId: techId })
    expect((await assigned.json()).technician.id).toBe(techId)
  })
})
