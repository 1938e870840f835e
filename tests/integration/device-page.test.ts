import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { deviceReport } from '~/.server/device-report'
import { pageLoaderData } from '#tests/setup/loader-data'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

describe('device page', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let cookie = ''
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'tech@ductkeeper.test'))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const page = async (id: number) => {
    const res = await fetch(`${server.url}/devices/${id}`, { headers: { Cookie: cookie } })
    return { status: res.status, html: await res.text() }
  }

  it('draws each arrangement in the data with its own wiring, and flags recorded faults', async () => {
    const arrangements = data.db.$client
      .prepare(
        `select min(id) as id, eol_placement as placement, alarm_terminal as alarm, supervisory_terminal as sup
         from detectors group by eol_placement, alarm_terminal, supervisory_terminal`,
      )
      .all() as Array<{ id: number; placement: string; alarm: string; sup: string }>
    expect(arrangements.length).toBeGreaterThanOrEqual(3)
    for (const a of arrangements) {
      const { status, html } = await page(a.id)
      expect(status).toBe(200)
      expect(html).toContain(`alarm contact ${a.alarm} across the loop`)
      expect(html).toContain(a.placement === 'across-pair' ? 'resistor straight across the loop' : `resistor through supervisory ${a.sup}`)
      if (a.alarm === 'NC') expect(html).toContain('alarm-on-nc')
      // Expected is the correct loop; a miswired record is shown beside it, not in its place.
      if (a.alarm === 'NC' || a.placement === 'across-pair') expect(html).toMatch(/as it should be[\s\S]*as recorded/)
      if (a.placement === 'across-pair') expect(html).toContain('not-supervised')
      expect(html).toContain('Before any work: notify, then work.')
    }
  })

  it("shows the stored risk, due dates and loop verdict, and the history's events", async () => {
    const sample = data.db.$client
      .prepare(
        `select id, risk_score as risk, loop_verdict as loop, next_visual_on as visual, next_functional_on as functional,
                next_sensitivity_on as sensitivity, next_cleaning_on as cleaning, due_status as due, next_due_on as nextDue,
                (select count(*) from events e where e.detector_id = d.id) as events
         from detectors d where id in (select max(id) from detectors group by due_status, loop_verdict, alarm_terminal) order by id`,
      )
      .all() as Array<{ id: number; risk: number; loop: string; visual: string; functional: string; sensitivity: string; cleaning: string; due: string; nextDue: string; events: number }>
    expect(sample.length).toBeGreaterThanOrEqual(4)
    for (const d of sample) {
      const { status, html } = await page(d.id)
      expect(status).toBe(200)
      const text = html.replaceAll('<!-- -->', '')
      expect(text, `detector ${d.id}`).toContain(`Risk ${d.risk}`)
      // The verdict in the house's Title Case words, as every other badge reads.
      expect(text).toContain(`Loop: ${({ pass: 'Pass', fail: 'Fail', incomplete: 'Incomplete' } as Record<string, string>)[d.loop]}`)
      // Each task in words with its date: due (before or inside the window) or overdue past it.
      for (const day of [d.visual, d.functional, d.sensitivity, d.cleaning]) expect(text).toMatch(new RegExp(`(Due|Overdue: due) ${day}`))
      expect(text).toMatch(new RegExp(`(Due|Overdue: due) ${d.nextDue}`))
      if (d.due === 'overdue') expect(text).toMatch(/Overdue: due \d{4}-\d{2}-\d{2}, \d+ d past the window/)
      // The history lists the latest 40 events, newest first.
      const latest = data.db.$client
        .prepare('select id from events where detector_id = ? order by occurred_at desc, id desc limit 40')
        .all(d.id) as Array<{ id: number }>
      const { report } = await pageLoaderData<{ report: NonNullable<ReturnType<typeof deviceReport>> }>(server.url, `/devices/${d.id}`, 'routes/_app.devices.$deviceId', { Cookie: cookie })
      expect(report.events.map((e) => e.id)).toEqual(latest.map((e) => e.id))
      expect(report.events.length).toBe(Math.min(40, d.events))
      expect(report.risk.score).toBe(d.risk)
    }
  })

  it('names who read the latest loop at the panel, from that visit\'s entry', async () => {
    const q = data.db.$client
    const latest = q
      .prepare("select detector_id as id, visit_id as visitId from readings where kind like 'loop-%' and visit_id is not null order by id desc limit 1")
      .get() as { id: number; visitId: number }
    expect(latest).toBeTruthy()
    const setBy = (who: string | null) =>
      q.prepare("update visit_detectors set findings = json_set(coalesce(findings, '{}'), '$.loopReadBy', ?) where visit_id = ? and detector_id = ?").run(who, latest.visitId, latest.id)
    setBy(null)
    expect((await page(latest.id)).html.replaceAll('<!-- -->', '')).not.toContain('loop read at the panel by')
    setBy('Ines Varga, Northpoint Alarm Co.')
    expect((await page(latest.id)).html.replaceAll('<!-- -->', '')).toContain('loop read at the panel by Ines Varga, Northpoint Alarm Co.')
  })

  it('answers 404 for a detector that does not exist or an id that is not a record number', async () => {
    expect((await page(999_999)).status).toBe(404)
    for (const id of ['abc', '0x10', '1e2', '012']) {
      const res = await fetch(`${server.url}/devices/${id}`, { headers: { Cookie: cookie } })
      expect(res.status, id).toBe(404)
      await res.body?.cancel()
    }
  })
})
