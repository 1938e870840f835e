import { parse } from 'csv-parse/sync'
import { beforeAll, describe, expect, it } from 'vitest'
import { TEST_TODAY } from '#tests/setup/temp-db'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

const running = useSeededServer('small')
const cookies = {} as Record<'tech' | 'office', string>

beforeAll(async () => {
  const { db } = running.data
  cookies.tech = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.technician))).cookie
  cookies.office = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.office))).cookie
})

const get = (path: string, cookie = cookies.office) => fetch(running.server.url + path, { headers: { Cookie: cookie } })

async function csv(path: string) {
  const res = await get(path)
  expect(res.status, await res.clone().text()).toBe(200)
  const records = parse(await res.text(), { columns: true }) as Array<Record<string, string>>
  return { res, records }
}

/** Every row of a list route, page by page, as the table would fetch them. */
async function allRows(endpoint: string, query: string) {
  const rows: Array<Record<string, unknown>> = []
  for (let offset = 0; ; offset += 500) {
    const res = await get(`${endpoint}?${query}&limit=500&offset=${offset}`)
    expect(res.status).toBe(200)
    const page = (await res.json()) as { rows: Array<Record<string, unknown>>; total: number }
    rows.push(...page.rows)
    if (page.rows.length < 500) return rows
  }
}

describe('CSV export of a list', () => {
  it('gives every detector of the filter in the list’s order, with the inventory columns, as a dated attachment', async () => {
    const query = 'due=overdue,due-soon&sort=tag&dir=desc'
    const { res, records } = await csv(`/api/export/detectors?${query}`)
    expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8')
    expect(res.headers.get('content-disposition')).toBe(`attachment; filename="ductkeeper-detectors-${TEST_TODAY}.csv"`)
    const listed = await allRows('/api/devices', query)
    expect(listed.length).toBeGreaterThan(20)
    expect(records.map((r) => Number(r.id))).toEqual(listed.map((r) => r.id))
    expect(records.map((r) => r.due)).toEqual(listed.map((r) => r.due))
    const sql = running.data.db.$client
    const first = sql
      .prepare('select d.eol_ohms as eol, d.conductor_stranded as stranded, m.name as model, s.time_zone as tz from detectors d join detector_models m on m.id = d.model_id join sites s on s.id = d.site_id where d.id = ?')
      .get(listed[0].id) as { eol: number; stranded: number; model: string; tz: string }
    expect([records[0].eolOhms, records[0].conductorStranded, records[0].model, records[0].timeZone]).toEqual([String(first.eol), first.stranded ? 'yes' : 'no', first.model, first.tz])
  })

  it('follows the events filter and sort across every page, not just the first', async () => {
    const sql = running.data.db.$client
    const site = (sql.prepare('select site_id as id from events group by site_id order by count(*) desc limit 1').get() as { id: number }).id
    const query = `site=${site}&sort=kind&dir=asc`
    const { records } = await csv(`/api/export/events?${query}`)
    const listed = await allRows('/api/events', query)
    const count = (sql.prepare('select count(*) as n from events where site_id = ?').get(site) as { n: number }).n
    expect(records).toHaveLength(count)
    expect(records.map((r) => Number(r.id))).toEqual(listed.map((r) => r.id))
    expect(records.map((r) => r.kind)).toEqual([...records.map((r) => r.kind)].sort())
  })

  it('exports sites, customers, units, visits and the triage queue under their list filters', async () => {
    const sql = running.data.db.$client
    const customer = (sql.prepare('select customer_id as id from sites group by customer_id order by count(*) desc limit 1').get() as { id: number }).id
    for (const [list, endpoint, query] of [
      ['sites', '/api/sites', `customer=${customer}&sort=city`],
      ['customers', '/api/customers', 'sort=detectors&dir=desc'],
      ['units', '/api/units', `customer=${customer}`],
      ['visits', '/api/visits', 'status=done&sort=scheduledOn&dir=asc'],
    ] as const) {
      const { records } = await csv(`/api/export/${list}?${query}`)
      const listed = await allRows(endpoint, query)
      expect(listed.length, list).toBeGreaterThan(0)
      expect(records.map((r) => Number(r.id)), list).toEqual(listed.map((r) => r.id))
    }
    const { records } = await csv('/api/export/triage?reason=overdue')
    const queue = await allRows('/api/triage', 'reason=overdue')
    expect(records.map((r) => Number(r.id))).toEqual(queue.map((r) => r.id))
    expect(records.every((r) => r.reasons.split(' ').includes('overdue'))).toBe(true)
  })

  it('writes a cell that a spreadsheet would run as a formula behind a quote', async () => {
    const sql = running.data.db.$client
    const [a, b, c, d] = (sql.prepare('select id from customers order by id limit 4').all() as Array<{ id: number }>).map((r) => r.id)
    const names: Record<number, string> = { [a]: '=HYPERLINK("http://example.test","x")', [b]: '+1 Diner', [c]: '@Lantern', [d]: '-Kettle\tHall' }
    for (const [id, name] of Object.entries(names)) sql.prepare('update customers set name = ? where id = ?').run(name, id)
    const { records } = await csv('/api/export/customers?sort=id')
    const byId = new Map(records.map((r) => [Number(r.id), r.name]))
    expect([a, b, c, d].map((id) => byId.get(id))).toEqual([`'=HYPERLINK("http://example.test","x")`, "'+1 Diner", "'@Lantern", "'-Kettle\tHall"])
    // Numbers are numbers, not text: a count is written as it is.
    expect(records.every((r) => /^\d+$/.test(r.detectors))).toBe(true)
  })

  it('asks for what the list asks for: a session, a known list, a valid query', async () => {
    expect((await fetch(`${running.server.url}/api/export/detectors`)).status).toBe(401)
    expect((await get('/api/export/detectors?state=normal', cookies.tech)).status).toBe(200)
    const unknown = await get('/api/export/passwords')
    expect(unknown.status).toBe(404)
    const bad = await get('/api/export/events?sort=detail')
    expect(bad.status).toBe(400)
    expect(((await bad.json()) as { issues: Array<{ message: string }> }).issues[0].message).toMatch(/needs a detector or site filter/)
  })
})
