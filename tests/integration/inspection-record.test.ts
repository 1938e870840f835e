import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { UNSAFE_decodeViaTurboStream as decodeTurboStream } from 'react-router'
import { pageLoaderData } from '#tests/setup/loader-data'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'
import { arrangementOf, type ArrangementFields } from '~/.server/derivation'
import type { siteInspectionRecord, visitInspectionRecord } from '~/.server/repos/inspection-record'
import { addDays, addMonths } from '~/domain/dates'
import { expectedReadings } from '~/domain/loop'

type VisitPage = NonNullable<ReturnType<typeof visitInspectionRecord>>
type SitePage = NonNullable<ReturnType<typeof siteInspectionRecord>>

// React escapes text and puts a comment between adjacent text parts; read the page as its text.
const text = (body: string) => body.replaceAll('<!-- -->', '').replaceAll('&#x27;', "'").replaceAll('&amp;', '&').replaceAll('&quot;', '"')
const fmt = (n: number, places: number) => Number(n.toFixed(places)).toLocaleString('en-US')

describe('printed inspection records and labels', () => {
  const running = useSeededServer('small')
  let cookie = ''
  beforeAll(async () => {
    cookie = (await sessionCookieFor(running.data.db, userIdByEmail(running.data.db, DEMO_EMAIL.office))).cookie
  })
  const get = async (path: string) => {
    const res = await fetch(`${running.server.url}${path}`, { headers: { Cookie: cookie, Accept: 'text/html' } })
    return { status: res.status, body: await res.text() }
  }
  const one = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).get(...args) as T
  const all = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).all(...args) as T[]

  it("a done visit's record holds the address, tester, serials, loop readings against their range and the notice", async () => {
    // The done visit with the most readings that also has a failed detector and a notice.
    const v = one<{ id: number; siteId: number }>(
      `select v.id, v.site_id as siteId from visits v
       where v.status = 'done' and exists (select 1 from notifications n where n.visit_id = v.id)
         and exists (select 1 from visit_detectors vd where vd.visit_id = v.id and vd.result = 'fail')
       order by (select count(*) from readings r where r.visit_id = v.id) desc, v.id limit 1`,
    )
    const failed = one<{ detectorId: number }>("select detector_id as detectorId from visit_detectors where visit_id = ? and result = 'fail' limit 1", v.id)
    const reason = 'Head cracked at the sampling tube; new head ordered'
    running.data.db.$client.prepare('update visit_detectors set result_reason = ? where visit_id = ? and detector_id = ?').run(reason, v.id, failed.detectorId)

    const site = one<{ street: string; city: string; postalCode: string }>('select street, city, postal_code as postalCode from sites where id = ?', v.siteId)
    const tech = one<{ name: string }>('select u.name from visits v join users u on u.id = v.technician_id where v.id = ?', v.id)
    const serials = all<{ id: number; serial: string }>(
      'select d.id, d.serial from visit_detectors vd join detectors d on d.id = vd.detector_id where vd.visit_id = ? order by d.id',
      v.id,
    )
    const notice = one<{ confirmation: string }>('select confirmation from notifications where visit_id = ? and confirmation is not null', v.id)
    const reading = one<{ detectorId: number; value: number } & ArrangementFields>(
      `select r.detector_id as detectorId, r.value, d.eol_ohms as eolOhms, d.eol_placement as eolPlacement, d.alarm_terminal as alarmTerminal,
         d.supervisory_terminal as supervisoryTerminal, m.supervisory_labelled_in as supervisoryLabelledIn, d.conductor_awg as conductorAwg,
         d.conductor_stranded as conductorStranded, d.run_feet as runFeet
       from readings r join detectors d on d.id = r.detector_id join detector_models m on m.id = d.model_id
       where r.visit_id = ? and r.kind = 'loop-normal' and r.open = 0 order by r.id limit 1`,
      v.id,
    )
    const expected = expectedReadings(arrangementOf(reading)).normal
    if ('open' in expected) throw new Error('a resistor loop reads a value in normal')
    expect(serials.length).toBeGreaterThan(0)

    const page = await pageLoaderData<VisitPage>(running.server.url, `/visits/${v.id}/record`, 'routes/_app.visits.$visitId.record', { Cookie: cookie })
    expect(page.company).toBe('Brightwater Mechanical')
    expect(page.site).toMatchObject(site)
    expect(page.visit.technician).toBe(tech.name)
    expect(page.visit.detectors.map((d) => ({ id: d.id, serial: d.serial })).sort((a, b) => a.id - b.id)).toEqual(serials)
    const loopRow = page.visit.detectors.find((d) => d.id === reading.detectorId)!.loop!.rows.find((r) => r.state === 'normal')!
    expect(loopRow).toMatchObject({ reading: reading.value, expected: { min: expected.min, max: expected.max } })
    expect(page.visit.notices.map((n) => n.confirmation)).toContain(notice.confirmation)
    expect(page.visit.detectors.find((d) => d.id === failed.detectorId)).toMatchObject({ result: 'fail', reason })

    const { status, body } = await get(`/visits/${v.id}/record`)
    expect(status).toBe(200)
    const t = text(body)
    expect(t).toContain(`${site.street}, ${site.city}`)
    expect(t).toContain(tech.name)
    for (const s of serials) expect(t).toContain(s.serial)
    expect(t).toContain(`${fmt(reading.value, 1)} Ω`)
    expect(t).toContain(`${fmt(expected.min, 1)} – ${fmt(expected.max, 1)} Ω`)
    expect(t).toContain(notice.confirmation)
    expect(t).toContain(reason)
    expect(t).toContain('NFPA 72')
  })

  it("a site's record for a period holds exactly the visits done in it", async () => {
    const s = one<{ siteId: number; n: number }>("select site_id as siteId, count(*) as n from visits where status = 'done' group by site_id order by n desc, site_id limit 1")
    const days = all<{ scheduledOn: string }>("select scheduled_on as scheduledOn from visits where site_id = ? and status = 'done' order by scheduled_on, id", s.siteId)
    // A period whose ends fall on two done visits, so both bounds are tested as inclusive.
    const from = days[1].scheduledOn
    const to = days[days.length - 2].scheduledOn
    const inRange = all<{ id: number }>(
      "select id from visits where site_id = ? and status = 'done' and scheduled_on between ? and ? order by scheduled_on, id",
      s.siteId,
      from,
      to,
    ).map((r) => r.id)
    expect(inRange.length).toBeGreaterThan(1)
    expect(inRange.length).toBeLessThan(days.length)

    const path = `/sites/${s.siteId}/record?from=${from}&to=${to}`
    // Single fetch puts `.data` on the path, before the query.
    const res = await fetch(`${running.server.url}/sites/${s.siteId}/record.data?from=${from}&to=${to}&_routes=${encodeURIComponent('routes/_app.sites.$siteId_.record')}`, { headers: { Cookie: cookie } })
    expect(res.status).toBe(200)
    const decoded = (await decodeTurboStream(res.body!, globalThis)).value as Record<string, { data: SitePage }>
    const page = decoded['routes/_app.sites.$siteId_.record'].data
    expect({ from: page.from, to: page.to }).toEqual({ from, to })
    expect(page.visits.total).toBe(inRange.length)
    expect(page.visits.rows.map((v) => v.id)).toEqual(inRange)

    // No bounds: the 12 months up to the office's day.
    const byDefault = await pageLoaderData<SitePage>(running.server.url, `/sites/${s.siteId}/record`, 'routes/_app.sites.$siteId_.record', { Cookie: cookie })
    const defaultFrom = addDays(addMonths(TEST_TODAY, -12), 1)
    expect({ from: byDefault.from, to: byDefault.to }).toEqual({ from: defaultFrom, to: TEST_TODAY })
    const lastYear = all<{ id: number }>(
      "select id from visits where site_id = ? and status = 'done' and scheduled_on between ? and ? order by scheduled_on, id",
      s.siteId,
      defaultFrom,
      TEST_TODAY,
    ).map((r) => r.id)
    expect(byDefault.visits.rows.map((v) => v.id)).toEqual(lastYear)

    const html = await get(path)
    expect(html.status).toBe(200)
    expect((html.body.match(/class="record-sheet"/g) ?? []).length).toBe(inRange.length)
  })

  it('refuses a period that is not one', async () => {
    for (const q of ['from=2026-02-30', 'to=yesterday', 'from=2026-05-01&to=2026-04-01']) {
      const res = await get(`/sites/1/record?${q}`)
      expect(res.status, q).toBe(400)
    }
    expect((await get('/sites/999999/record')).status).toBe(404)
    expect((await get('/visits/999999/record')).status).toBe(404)
  })

  it("the label sheet has one QR code per detector of the site, each opening the detector's page", async () => {
    const s = one<{ siteId: number; n: number }>('select site_id as siteId, count(*) as n from detectors group by site_id order by n desc, site_id limit 1')
    const ids = all<{ id: number }>('select id from detectors where site_id = ? order by id', s.siteId).map((r) => r.id)
    const { status, body } = await get(`/sites/${s.siteId}/labels`)
    expect(status).toBe(200)
    const qrs = [...body.matchAll(/<div class="label-qr"[^>]*aria-label="QR code for ([^"]+)"[^>]*><svg/g)].map((m) => m[1])
    expect(qrs).toHaveLength(ids.length)
    expect(qrs.map((u) => Number(new URL(u).pathname.split('/').pop())).sort((a, b) => a - b)).toEqual(ids)
    for (const u of qrs) expect(new URL(u).origin).toBe(running.server.url)
    expect((body.match(/class="label-page"/g) ?? []).length).toBe(Math.ceil(ids.length / 24))
  })
})
