import { UNSAFE_decodeViaTurboStream as decodeTurboStream } from 'react-router'
import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { pageLoaderData } from '#tests/setup/loader-data'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'
import type { technicianVisits, visitFieldData } from '~/.server/repos/visit-field'
import type { visitRecord } from '~/.server/repos/visit'
import { addDays } from '~/domain/dates'

type VisitRecord = NonNullable<ReturnType<typeof visitRecord>>
type VisitPage = VisitRecord & { field: NonNullable<ReturnType<typeof visitFieldData>>; may: { record: boolean; schedule: boolean }; technicians: unknown[] }
type MyDay = { today: string; technicianId: number; todays: ReturnType<typeof technicianVisits>; later: ReturnType<typeof technicianVisits> }

describe('visit page and my day', () => {
  const running = useSeededServer('small')
  const cookies: Record<string, string> = {}
  let techId = 0
  let otherTechId = 0
  let visitId = 0
  let detectorIds: number[] = []

  const one = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).get(...args) as T
  const all = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).all(...args) as T[]
  const data = <T,>(who: string, path: string, routeId: string) => pageLoaderData<T>(running.server.url, path, routeId, { Cookie: cookies[who] })
  // The same single-fetch read as pageLoaderData, for a page address with a query string.
  async function myDay(who: string, query: string): Promise<MyDay> {
    const res = await fetch(`${running.server.url}/my-day.data?${query}&_routes=routes/_app.my-day`, { headers: { Cookie: cookies[who] } })
    expect(res.status).toBe(200)
    const decoded = await decodeTurboStream(res.body!, globalThis)
    return JSON.parse(JSON.stringify((decoded.value as Record<string, { data: unknown }>)['routes/_app.my-day'].data)) as MyDay
  }

  beforeAll(async () => {
    const db = running.data.db
    for (const [role, email] of Object.entries(DEMO_EMAIL)) cookies[role] = (await sessionCookieFor(db, userIdByEmail(db, email))).cookie
    techId = userIdByEmail(db, DEMO_EMAIL.technician)
    otherTechId = one<{ id: number }>("select id from users where role = 'technician' and id <> ? and active = 1 order by id limit 1", techId).id
    const picked = all<{ id: number; siteId: number }>(
      `select d.id, d.site_id as siteId from detectors d
       where d.site_id = (select site_id from detectors group by site_id having count(*) >= 3 order by site_id limit 1)
         and not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = d.id and v.status in ('planned','notified','in-progress'))
       order by d.id limit 3`,
    )
    detectorIds = picked.map((d) => d.id)
    const res = await fetch(`${running.server.url}/api/visits`, {
      method: 'POST',
      headers: { Cookie: cookies.office, Origin: running.server.url, 'Content-Type': 'application/json' },
      body: JSON.stringify({
        siteId: picked[0].siteId,
        kind: 'inspection',
        scheduledOn: TEST_TODAY,
        windowFrom: '07:30',
        windowUntil: '11:00',
        technicianId: techId,
        detectors: picked.map((d, i) => ({ detectorId: d.id, tasks: i === 0 ? ['visual', 'functional', 'cleaning'] : ['visual'] })),
      }),
    })
    expect(res.status, await res.clone().text()).toBe(201)
    visitId = ((await res.json()) as { visitId: number }).visitId
  })

  it('the visit page carries the same record as the API, plus each detector’s recorded loop and listing', async () => {
    const page = await data<VisitPage>('technician', `/visits/${visitId}`, 'routes/_app.visits.$visitId._index')
    const api = (await (await fetch(`${running.server.url}/api/visits/${visitId}`, { headers: { Cookie: cookies.technician } })).json()) as VisitRecord
    for (const key of ['visit', 'site', 'customer', 'monitoring', 'technician', 'detectors', 'notifications'] as const) expect(page[key], key).toEqual(api[key])
    expect(page.visit).toMatchObject({ scheduledOn: TEST_TODAY, windowFrom: '07:30', windowUntil: '11:00', status: 'planned' })
    expect(page.may).toEqual({ record: true, schedule: false })
    expect(page.technicians).toEqual([])
    for (const id of detectorIds) {
      const row = one<{ eol: number; placement: string; alarm: string; feet: number; vmin: number; vmax: number; pmin: number; pmax: number; input: string }>(
        `select d.eol_ohms as eol, d.eol_placement as placement, d.alarm_terminal as alarm, d.run_feet as feet, d.velocity_min_fpm as vmin, d.velocity_max_fpm as vmax,
                d.pressure_min_in_wc as pmin, d.pressure_max_in_wc as pmax, u.shutdown_input as input
         from detectors d join units u on u.id = d.unit_id where d.id = ?`,
        id,
      )
      const f = page.field.detectors[id]
      expect(f.arrangement).toMatchObject({ eolOhms: row.eol, eolPlacement: row.placement, alarmTerminal: row.alarm, measuredAt: 'panel', conductor: { oneWayFeet: row.feet } })
      expect(f.velocity).toEqual({ min: row.vmin, max: row.vmax })
      expect(f.pressure).toEqual({ min: row.pmin, max: row.pmax })
      expect(f.shutdownInput).toBe(row.input)
    }
    expect(page.field.delayPolicySeconds).toBe(one<{ n: number }>('select s.delay_policy_seconds as n from visits v join sites s on s.id = v.site_id where v.id = ?', visitId).n)
  })

  it('another technician may read the visit but not record on it; the office may schedule it', async () => {
    const otherCookie = (await sessionCookieFor(running.data.db, otherTechId)).cookie
    const other = await pageLoaderData<VisitPage>(running.server.url, `/visits/${visitId}`, 'routes/_app.visits.$visitId._index', { Cookie: otherCookie })
    expect(other.may).toEqual({ record: false, schedule: false })
    const office = await data<VisitPage>('office', `/visits/${visitId}`, 'routes/_app.visits.$visitId._index')
    expect(office.may).toEqual({ record: true, schedule: true })
    expect(office.technicians.length).toBe(one<{ n: number }>("select count(*) as n from users where role = 'technician'").n)
    const missing = await fetch(`${running.server.url}/visits/99999999`, { headers: { Cookie: cookies.office } })
    expect(missing.status).toBe(404)
  })

  it("/my-day lists the technician's own visits for the week, today's first, with their detectors and tasks", async () => {
    const page = await data<MyDay>('technician', '/my-day', 'routes/_app.my-day')
    expect(page.today).toBe(TEST_TODAY)
    expect(page.technicianId).toBe(techId)
    const expected = all<{ id: number; scheduledOn: string }>(
      "select id, scheduled_on as scheduledOn from visits where technician_id = ? and scheduled_on between ? and ? and status <> 'cancelled' order by scheduled_on, window_from, id",
      techId,
      TEST_TODAY,
      addDays(TEST_TODAY, 6),
    )
    expect([...page.todays, ...page.later].map((v) => v.id)).toEqual(expected.map((v) => v.id))
    expect(page.todays.every((v) => v.scheduledOn === TEST_TODAY)).toBe(true)
    expect(page.later.every((v) => v.scheduledOn > TEST_TODAY)).toBe(true)
    const mine = page.todays.find((v) => v.id === visitId)
    expect(mine).toMatchObject({ detectors: 3, windowFrom: '07:30' })
    expect(Object.fromEntries(mine!.tasks.map((t) => [t.task, t.n]))).toEqual({ visual: 3, functional: 1, cleaning: 1 })
    // Each day is written once, in words, with the ISO date kept for machines only.
    const html = await (await fetch(`${running.server.url}/my-day`, { headers: { Cookie: cookies.technician } })).text()
    // What shows: the markup without its scripts (the page's data rides in them) and without tags.
    const shown = (page: string) => page.replace(/<script[\s\S]*?<\/script>/g, ' ').replace(/<[^>]+>/g, ' ')
    const text = shown(html)
    expect(html).toContain(`<time dateTime="${TEST_TODAY}">Mon, 15 Jun 2026</time>`)
    expect(text).not.toMatch(/\b\d{4}-\d{2}-\d{2}\b/)
    const visitHtml = await (await fetch(`${running.server.url}/visits/${visitId}`, { headers: { Cookie: cookies.technician } })).text()
    expect(visitHtml).toContain(`<time dateTime="${TEST_TODAY}">Mon, 15 Jun 2026</time>`)
    expect(shown(visitHtml)).not.toContain(TEST_TODAY)
    // A technician cannot look at someone else's day by changing the address.
    const asked = await myDay('technician', `technician=${otherTechId}`)
    expect(asked.technicianId).toBe(techId)
  })

  it('the office picks any technician; a manager does not record work and is refused', async () => {
    const office = await myDay('office', `technician=${techId}`)
    expect(office.technicianId).toBe(techId)
    expect(office.todays.map((v) => v.id)).toContain(visitId)
    const manager = await fetch(`${running.server.url}/my-day`, { headers: { Cookie: cookies.manager, Accept: 'text/html' } })
    expect(manager.status).toBe(403)
  })

  it("the detector page lists the detector's open visits", async () => {
    const page = await data<{ openVisits: Array<{ id: number; status: string; tasks: string[] }> }>('office', `/devices/${detectorIds[0]}`, 'routes/_app.devices.$deviceId')
    const expected = all<{ id: number }>(
      "select v.id from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = ? and v.status in ('planned','notified','in-progress') order by v.scheduled_on, v.id",
      detectorIds[0],
    )
    expect(page.openVisits.map((v) => v.id)).toEqual(expected.map((v) => v.id))
    expect(page.openVisits.find((v) => v.id === visitId)?.tasks).toEqual(['visual', 'functional', 'cleaning'])
  })

  it('the technician lands on /my-day; the office and the lead on triage', async () => {
    for (const [role, where] of [['technician', '/my-day'], ['office', '/triage'], ['lead', '/triage'], ['manager', '/overview']] as const) {
      const res = await fetch(`${running.server.url}/`, { headers: { Cookie: cookies[role] }, redirect: 'manual' })
      expect(res.headers.get('location'), role).toBe(where)
    }
  })
})
