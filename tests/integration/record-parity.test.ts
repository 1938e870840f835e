import { beforeAll, describe, expect, it } from 'vitest'
import { rederive } from '~/.server/derivation'
import type { deviceReport } from '~/.server/device-report'
import type { customerRecord } from '~/.server/repos/customer'
import type { siteRecord } from '~/.server/repos/site'
import type { unitRecord } from '~/.server/repos/unit'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { pageLoaderData } from '#tests/setup/loader-data'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'

type Report = NonNullable<ReturnType<typeof deviceReport>>
type DevicePage = { report: Report; today: string }
type SiteRecord = NonNullable<ReturnType<typeof siteRecord>>
type UnitRecord = NonNullable<ReturnType<typeof unitRecord>>
type DeviceRow = { id: number; risk: number }

// A record's page and its /api route are one repo call: every figure, list, cap and total must match.
describe('record pages and their API carry the same figures', () => {
  const running = useSeededServer('small')
  let cookie = ''
  beforeAll(async () => {
    cookie = (await sessionCookieFor(running.data.db, userIdByEmail(running.data.db, DEMO_EMAIL.office))).cookie
  })
  const one = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).get(...args) as T
  const all = <T,>(sql: string, ...args: unknown[]) => running.data.db.$client.prepare(sql).all(...args) as T[]
  const page = <T,>(path: string, routeId: string) => pageLoaderData<T>(running.server.url, path, routeId, { Cookie: cookie })
  const api = async <T,>(path: string) => {
    const res = await fetch(`${running.server.url}${path}`, { headers: { Cookie: cookie } })
    expect(res.status, path).toBe(200)
    return (await res.json()) as T
  }

  it('customers', async () => {
    for (const { id } of all<{ id: number }>('select id from customers order by id')) {
      const fromPage = await page<NonNullable<ReturnType<typeof customerRecord>>>(`/customers/${id}`, 'routes/_app.customers.$customerId')
      const fromApi = await api<typeof fromPage>(`/api/customers/${id}`)
      expect(fromPage).toEqual(fromApi)
      expect(fromApi.totals.detectors).toBe(one<{ n: number }>('select count(*) as n from detectors where customer_id = ?', id).n)
    }
  })

  it('sites, including one whose notifications run past the cap and one with visits to come', async () => {
    const ids = all<{ id: number }>(
      `select id from (select site_id as id from notifications group by site_id order by count(*) desc limit 1)
       union select id from (select site_id as id from visits where status = 'planned' order by scheduled_on limit 1)
       union select id from (select id from sites order by id limit 3)`,
    ).map((r) => r.id)
    for (const id of ids) {
      const { now, ...fromPage } = await page<SiteRecord & { now: string }>(`/sites/${id}`, 'routes/_app.sites.$siteId')
      expect(typeof now).toBe('string')
      const fromApi = await api<SiteRecord>(`/api/sites/${id}`)
      expect(fromPage).toEqual(fromApi)
      expect(fromApi.notifications.total).toBe(one<{ n: number }>('select count(*) as n from notifications where site_id = ?', id).n)
    }
  })

  it('units', async () => {
    for (const { id } of all<{ id: number }>('select min(id) as id from units group by shutdown_input, duct_shape')) {
      const fromPage = await page<UnitRecord>(`/units/${id}`, 'routes/_app.units.$unitId')
      expect(fromPage).toEqual(await api<UnitRecord>(`/api/units/${id}`))
      expect(fromPage.detectors.total).toBe(one<{ n: number }>('select count(*) as n from detectors where unit_id = ?', id).n)
    }
  })

  it('detectors', async () => {
    for (const { id } of all<{ id: number }>('select min(id) as id from detectors group by alarm_terminal, eol_placement, state')) {
      const { report, today } = await page<DevicePage>(`/devices/${id}`, 'routes/_app.devices.$deviceId')
      expect(today).toBe(TEST_TODAY)
      expect(report).toEqual(await api<Report>(`/api/devices/${id}`))
    }
  })
})

// One risk score everywhere: the stored column the lists and Triage sort on is the derivation the
// detector page explains, also for wiring recorded as a fault.
describe('one risk score on the detector page, the lists and Triage', () => {
  const running = useSeededServer('small')
  let cookie = ''
  let sample: Array<{ id: number; unitId: number; siteId: number; customerId: number }> = []
  beforeAll(async () => {
    const db = running.data.db
    cookie = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.office))).cookie
    // Record two faulty arrangements the way a write does: change the record, re-derive in the same transaction.
    const [acrossPair, alarmOnNc] = db.$client
      .prepare("select id from detectors where eol_placement = 'through-supervisory' and alarm_terminal = 'NO' order by id limit 2")
      .all() as Array<{ id: number }>
    db.$client.transaction(() => {
      db.$client.prepare("update detectors set eol_placement = 'across-pair' where id = ?").run(acrossPair.id)
      db.$client.prepare("update detectors set alarm_terminal = 'NC' where id = ?").run(alarmOnNc.id)
      rederive(db, [acrossPair.id, alarmOnNc.id], TEST_TODAY)
    })()
    sample = db.$client
      .prepare(
        `select id, unit_id as unitId, site_id as siteId, customer_id as customerId from detectors
         where id in (?, ?) or alarm_terminal = 'NC' or eol_placement = 'across-pair'
            or id in (select max(id) from detectors group by state, due_status, loop_verdict)
         order by id`,
      )
      .all(acrossPair.id, alarmOnNc.id) as typeof sample
  })
  const json = async <T,>(path: string) => {
    const res = await fetch(`${running.server.url}${path}`, { headers: { Cookie: cookie } })
    expect(res.status, path).toBe(200)
    return (await res.json()) as T
  }
  const rowsOf = async (path: string) => (await json<{ rows: DeviceRow[] }>(path)).rows

  it('has faulty wiring in the sample, scored by the derivation', () => {
    const faults = running.data.db.$client
      .prepare("select count(*) as n from detectors where (alarm_terminal = 'NC' or eol_placement = 'across-pair') and loop_findings != ''")
      .get() as { n: number }
    expect(sample.length).toBeGreaterThan(5)
    expect(faults.n).toBeGreaterThanOrEqual(2)
  })

  it('the list, Triage and record pages show the detector page risk', async () => {
    for (const d of sample) {
      const stored = (running.data.db.$client.prepare('select risk_score as risk from detectors where id = ?').get(d.id) as { risk: number }).risk
      const report = await json<Report>(`/api/devices/${d.id}`)
      const { report: onPage } = await pageLoaderData<DevicePage>(running.server.url, `/devices/${d.id}`, 'routes/_app.devices.$deviceId', { Cookie: cookie })
      expect(onPage.risk.score, `detector ${d.id} page`).toBe(report.risk.score)
      expect(report.stored.riskScore, `detector ${d.id} derivation`).toBe(report.risk.score)
      expect(stored, `detector ${d.id} stored`).toBe(report.risk.score)

      const listed = (await rowsOf(`/api/devices?unit=${d.unitId}&limit=500`)).find((r) => r.id === d.id)
      expect(listed?.risk, `detector ${d.id} in /api/devices`).toBe(report.risk.score)
      const bySite = (await rowsOf(`/api/devices?site=${d.siteId}&sort=risk&limit=500`)).find((r) => r.id === d.id)
      expect(bySite?.risk, `detector ${d.id} in /api/devices by site`).toBe(report.risk.score)

      // Triage lists a detector while the derivation gives it a reason.
      const queued = (await rowsOf(`/api/triage?customer=${d.customerId}&acknowledged=all&limit=500`)).find((r) => r.id === d.id)
      if (report.risk.reasons.length > 0) expect(queued?.risk, `detector ${d.id} in /api/triage`).toBe(report.risk.score)
      else expect(queued).toBeUndefined()

      const site = await json<SiteRecord>(`/api/sites/${d.siteId}`)
      const onSite = site.detectors.rows.find((r) => r.id === d.id)
      if (onSite) expect(onSite.risk, `detector ${d.id} on its site`).toBe(report.risk.score)
      const unit = await json<UnitRecord>(`/api/units/${d.unitId}`)
      expect(unit.detectors.rows.find((r) => r.id === d.id)?.risk, `detector ${d.id} on its unit`).toBe(report.risk.score)
    }
  })
})
