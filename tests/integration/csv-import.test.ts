import { parse } from 'csv-parse/sync'
import { stringify } from 'csv-stringify/sync'
import { existsSync, readdirSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

const running = useSeededServer('small')
const cookies = {} as Record<'office' | 'lead' | 'tech' | 'manager', string>

beforeAll(async () => {
  const { db } = running.data
  for (const role of ['office', 'lead', 'manager'] as const) cookies[role] = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL[role]))).cookie
  cookies.tech = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.technician))).cookie
})

interface Report {
  counts: Record<string, number>
  problems: Array<{ row: number; column: string | null; value: string; problem: string }>
  problemCount: number
  notes: Array<{ row: number; problem: string }>
}
interface Uploaded {
  id: string
  headers: string[]
  rows: number
  mapping: Record<string, string | null>
  remembered: boolean
}

const sql = () => running.data.db.$client
const count = (table: string, where = '1') => (sql().prepare(`select count(*) as n from ${table} where ${where}`).get() as { n: number }).n
const fleet = () => ({ customers: count('customers'), sites: count('sites'), units: count('units'), detectors: count('detectors'), events: count('events') })

async function upload(kind: 'inventory' | 'events', source: string, bytes: Uint8Array | string, cookie = cookies.office, name = 'file.csv') {
  const form = new FormData()
  form.append('kind', kind)
  form.append('source', source)
  form.append('file', new Blob([typeof bytes === 'string' ? bytes : (bytes as Uint8Array<ArrayBuffer>)], { type: 'text/csv' }), name)
  return fetch(`${running.server.url}/api/import`, { method: 'POST', headers: { Cookie: cookie, Origin: running.server.url }, body: form })
}

function post(id: string, body: unknown, cookie = cookies.office) {
  return fetch(`${running.server.url}/api/import/${id}`, {
    method: 'POST',
    headers: { Cookie: cookie, Origin: running.server.url, 'Content-Type': 'application/json' },
    body: JSON.stringify(body),
  })
}

/** The check's streamed lines: progress first, the report last. */
async function check(id: string, mapping: Record<string, string | null>) {
  const res = await post(id, { intent: 'check', mapping })
  expect(res.status).toBe(200)
  const lines = (await res.text())
    .trim()
    .split('\n')
    .map((l) => JSON.parse(l) as { progress?: number; report?: Report; error?: string })
  const last = lines.at(-1)!
  expect(last.error).toBeUndefined()
  return { report: last.report!, progress: lines.filter((l) => l.progress !== undefined).map((l) => l.progress) }
}

async function commit(id: string, mapping: Record<string, string | null>) {
  const res = await post(id, { intent: 'commit', mapping })
  expect(res.status, await res.clone().text()).toBe(200)
  return ((await res.json()) as { report: Report }).report
}

/** Upload, check and commit with the mapping the server proposes. */
async function importFile(kind: 'inventory' | 'events', source: string, text: string) {
  const res = await upload(kind, source, text)
  expect(res.status, await res.clone().text()).toBe(201)
  const up = (await res.json()) as Uploaded
  const { report } = await check(up.id, up.mapping)
  return { up, checked: report, committed: await commit(up.id, up.mapping) }
}

const exportCsv = async (path: string) => {
  const res = await fetch(running.server.url + path, { headers: { Cookie: cookies.office } })
  expect(res.status).toBe(200)
  return res.text()
}

// The columns that describe the equipment itself (not ids, and not what the derivation works out).
const INVENTORY_COLUMNS = [
  'customer', 'customerKind', 'site', 'street', 'city', 'region', 'postalCode', 'timeZone', 'jurisdiction', 'ahjName', 'codeBasis', 'monitoring', 'monitoringAccount',
  'unit', 'unitKind', 'shutdownInput', 'supplyCfm', 'returnCfm', 'ductShape', 'tag', 'serial', 'model', 'position', 'housing', 'environment', 'installedOn',
  'eolOhms', 'eolPlacement', 'alarmTerminal', 'supervisoryTerminal', 'conductorAwg', 'conductorStranded', 'runFeet',
]
// Rows in the order of their place (site, unit, tag): the export's own order after the tag breaks ties
// on derived facts (risk), which a record with no history does not share with the original.
const pick = (records: Array<Record<string, string>>, columns: string[]) =>
  records
    .map((r) => columns.map((c) => r[c]))
    .sort((a, b) => { const key = (x: string[]) => [columns.indexOf('site'), columns.indexOf('unit'), columns.indexOf('tag')].map((i) => x[i]).join('\u0000'); return key(a) < key(b) ? -1 : key(a) > key(b) ? 1 : 0 })

describe('inventory import', () => {
  let customerId = 0
  let exported = ''
  beforeAll(async () => {
    customerId = (sql().prepare('select customer_id as id from detectors group by customer_id order by count(*) desc limit 1').get() as { id: number }).id
    exported = await exportCsv(`/api/export/detectors?customer=${customerId}&sort=tag`)
  })

  it('takes an exported fleet back unchanged, then as a new customer, which exports the same rows again', async () => {
    const before = fleet()
    const audits = count('audit_log', "action = 'import.inventory'")
    const same = await importFile('inventory', 'Own export', exported)
    expect(same.up.mapping.tag).toBe('tag')
    expect(same.up.mapping.customer).toBe('customer')
    const rows = parse(exported, { columns: true }) as Array<Record<string, string>>
    expect(same.committed.counts).toMatchObject({ rows: rows.length, customersAdded: 0, sitesAdded: 0, unitsAdded: 0, detectorsAdded: 0, detectorsUpdated: 0, unchangedRows: rows.length, skippedRows: 0 })
    expect(fleet()).toEqual(before)
    expect(count('audit_log', "action = 'import.inventory'")).toBe(audits + 1)

    // The same equipment under a new customer name: every record is new.
    const renamed = stringify(rows.map((r) => ({ ...r, customer: 'Juniper Hollow Bistros' })), { header: true })
    const added = await importFile('inventory', 'Juniper', renamed)
    const sites = new Set(rows.map((r) => r.site)).size
    const units = new Set(rows.map((r) => `${r.site}|${r.unit}`)).size
    expect(added.checked.counts).toMatchObject({ customersAdded: 1, sitesAdded: sites, unitsAdded: units, detectorsAdded: rows.length })
    expect(fleet()).toEqual({ ...before, customers: before.customers + 1, sites: before.sites + sites, units: before.units + units, detectors: before.detectors + rows.length })
    const newId = (sql().prepare("select id from customers where name = 'Juniper Hollow Bistros'").get() as { id: number }).id
    const again = parse(await exportCsv(`/api/export/detectors?customer=${newId}&sort=tag`), { columns: true }) as Array<Record<string, string>>
    const columns = INVENTORY_COLUMNS.filter((c) => c !== 'customer')
    expect(pick(again, columns)).toEqual(pick(rows, columns))
    // The new detectors were derived: a fresh record with no history is due at once.
    expect(count('detectors', `customer_id = ${newId} and next_due_on is null`)).toBe(0)
    const audit = sql().prepare("select after from audit_log where action = 'import.inventory' order by id desc limit 1").get() as { after: string }
    expect(JSON.parse(audit.after)).toMatchObject({ source: 'Juniper', detectorsAdded: rows.length })

    // The same file a second time changes nothing.
    const versions = sql().prepare('select sum(version) as v from detectors').get()
    const twice = await importFile('inventory', 'Juniper', renamed)
    expect(twice.committed.counts).toMatchObject({ customersAdded: 0, sitesAdded: 0, unitsAdded: 0, detectorsAdded: 0, detectorsUpdated: 0, unchangedRows: rows.length })
    expect(fleet().detectors).toBe(before.detectors + rows.length)
    expect(sql().prepare('select sum(version) as v from detectors').get()).toEqual(versions)
    // The mapping was remembered for the source.
    const res = await upload('inventory', 'juniper', renamed)
    expect(((await res.json()) as Uploaded).remembered).toBe(true)
  })

  it('reports bad rows by row, column and value, and writes nothing at the check', async () => {
    const rows = (parse(exported, { columns: true }) as Array<Record<string, string>>).slice(0, 4).map((r): Record<string, string> => ({ ...r, customer: 'Quillfeather Cafés' }))
    rows[1] = { ...rows[1], eolOhms: 'twelve', installedOn: '2024-02-30' }
    rows[2] = { ...rows[2], model: 'No Such Module' }
    rows[3] = { ...rows[3], tag: '' }
    const before = fleet()
    const res = await upload('inventory', 'Quill', stringify(rows, { header: true }))
    const up = (await res.json()) as Uploaded
    const { report } = await check(up.id, up.mapping)
    const found = report.problems.map((p) => [p.row, p.column, p.value])
    expect(found).toEqual([
      [3, 'installedOn', '2024-02-30'],
      [3, 'eolOhms', 'twelve'],
      [4, 'model', 'No Such Module'],
      [5, 'tag', ''],
    ])
    expect(report.counts).toMatchObject({ rows: 4, skippedRows: 3, detectorsAdded: 1 })
    expect(fleet()).toEqual(before)
    expect(count('customers', "name = 'Quillfeather Cafés'")).toBe(0)
    // Discarded: the file is gone and the id answers 404.
    expect((await post(up.id, { intent: 'discard' })).status).toBe(200)
    expect((await post(up.id, { intent: 'check', mapping: up.mapping })).status).toBe(404)
  })

  it('asks for the columns every row needs and for the fields of a new record', async () => {
    const res = await upload('inventory', 'Bare', 'customer,site,unit,tag\nWillowmere Schools,North Campus,AHU-1,AHU-1-S\n')
    const up = (await res.json()) as Uploaded
    const noTag = await post(up.id, { intent: 'check', mapping: { ...up.mapping, tag: null } })
    expect(noTag.status).toBe(400)
    expect(((await noTag.json()) as { error: string }).error).toMatch(/Detector tag/)
    const { report } = await check(up.id, up.mapping)
    expect(report.problems.map((p) => [p.row, p.column, p.problem])).toContainEqual([2, 'Customer kind', 'Needed for the new customer "Willowmere Schools"'])
  })

  it('notes a repeated row and refuses rows that disagree about one record', async () => {
    const [row] = (parse(exported, { columns: true }) as Array<Record<string, string>>).map((r): Record<string, string> => ({ ...r, customer: 'Saltmarsh Grocers' }))
    const text = stringify([row, row, { ...row, eolOhms: String(Number(row.eolOhms) + 1000) }], { header: true })
    const res = await upload('inventory', 'Salt', text)
    const up = (await res.json()) as Uploaded
    const { report } = await check(up.id, up.mapping)
    expect(report.notes.map((n) => [n.row, n.problem])).toEqual([[3, 'Same detector as row 2; the row adds nothing']])
    expect(report.problems.map((p) => [p.row, p.column])).toEqual([[4, 'eolOhms']])
    expect(report.counts).toMatchObject({ detectorsAdded: 1, duplicateRows: 1, skippedRows: 1 })
  })
})

describe('files that cannot be read', () => {
  const folder = () => join(dirname(running.data.path), 'imports')

  it('refuses a header-only file, an empty file, a non-UTF-8 file and a UTF-16 file with words, not a 500', async () => {
    const cases: Array<[string | Uint8Array, RegExp]> = [
      ['customer,site,unit,tag\n', /header row but no data rows/],
      ['', /empty/],
      [new Uint8Array([...Buffer.from('customer,site,unit,tag\nCaf'), 0xe9, ...Buffer.from(',A,B,C\n')]), /not UTF-8 text: the bytes on line 2/],
      [new Uint8Array([0xff, 0xfe, ...Buffer.from('c\u0000')]), /UTF-16/],
      ['customer,site,customer\nA,B,C\n', /both named "customer"/],
    ]
    const kept = () => (existsSync(folder()) ? readdirSync(folder()).sort() : [])
    const before = kept()
    for (const [bytes, message] of cases) {
      const res = await upload('inventory', 'Broken', bytes)
      expect(res.status, String(message)).toBe(422)
      expect(((await res.json()) as { error: string }).error).toMatch(message)
    }
    // Nothing of the refused files is kept.
    expect(kept()).toEqual(before)
  })

  it('reads a file with a byte order mark and semicolons, as spreadsheets in many places save it', async () => {
    const res = await upload('events', 'Semis', '\uFEFFSite;Time;Kind;Detail\nNowhere;2026-01-01 10:00;alarm;x\n')
    expect(res.status).toBe(201)
    const up = (await res.json()) as Uploaded
    expect(up.headers).toEqual(['Site', 'Time', 'Kind', 'Detail'])
    expect([up.mapping.site, up.mapping.occurredAt, up.mapping.kind, up.mapping.detail]).toEqual(['Site', 'Time', 'Kind', 'Detail'])
  })

  it('lets only office, lead and admin import, and only the uploader use an upload', async () => {
    for (const role of ['tech', 'manager'] as const) expect((await upload('events', 'x', 'a\n1\n', cookies[role])).status).toBe(403)
    const res = await upload('events', 'Mine', 'site,time,kind\nA,2026-01-01T00:00:00Z,alarm\n')
    const up = (await res.json()) as Uploaded
    expect((await post(up.id, { intent: 'check', mapping: up.mapping }, cookies.lead)).status).toBe(404)
    expect((await post('not-an-id', { intent: 'discard' })).status).toBe(404)
  })
})

describe('event history import', () => {
  it('takes exported events back as already present, adds them to a copy of the site, and twice adds nothing', async () => {
    const site = (sql().prepare('select site_id as id from events group by site_id order by count(*) desc limit 1').get() as { id: number }).id
    const exported = await exportCsv(`/api/export/events?site=${site}`)
    const rows = parse(exported, { columns: true }) as Array<Record<string, string>>
    const before = count('events')
    const same = await importFile('events', 'Own events', exported)
    expect(same.up.mapping).toMatchObject({ site: 'site', detector: 'detectorTag', occurredAt: 'occurredAt', kind: 'kind', account: 'account' })
    expect(same.committed.counts).toMatchObject({ rows: rows.length, eventsAdded: 0, alreadyPresent: rows.length, skippedRows: 0 })
    expect(count('events')).toBe(before)

    // A monitoring company's own file: local times, its own ids, a repeated line and a bad one.
    const account = (sql().prepare('select monitoring_account as a, time_zone as tz from sites where id = ?').get(site) as { a: string; tz: string })
    const tag = (sql().prepare('select tag from detectors where site_id = ? order by id limit 1').get(site) as { tag: string }).tag
    const file = [
      'Account,Zone,Event Time,Signal,Comment,Signal ID',
      `${account.a},${tag},2026-03-10 08:15,trouble,Dirty chamber,S-1`,
      `${account.a},${tag},2026-03-10 09:40,restore,Cleared,S-2`,
      `${account.a},${tag},2026-03-10 09:40,restore,Cleared,S-2`,
      `${account.a},NOPE-9,2026-03-10 10:00,alarm,,S-3`,
      `${account.a},,2026-07-04 12:00,fire drill,,S-4`,
    ].join('\r\n')
    const first = await importFile('events', 'Lakeside Central Station', file)
    expect(first.up.mapping).toMatchObject({ account: 'Account', detector: 'Zone', occurredAt: 'Event Time', kind: 'Signal', detail: 'Comment', eventId: 'Signal ID' })
    expect(first.checked.problems.map((p) => [p.row, p.column, p.value])).toEqual([
      [5, 'Zone', 'NOPE-9'],
      [6, 'Signal', 'fire drill'],
    ])
    expect(first.committed.counts).toMatchObject({ rows: 5, eventsAdded: 2, duplicateRows: 1, skippedRows: 2 })
    expect(count('events')).toBe(before + 2)
    const stored = sql().prepare("select occurred_at as at, kind, source_key as key from events where source_key like 'id:lakeside central station:%' order by occurred_at").all()
    // 08:15 on 10 March in the site's zone, stored as UTC.
    const offsetHours = account.tz === 'America/Chicago' ? 5 : null
    if (offsetHours !== null) expect((stored[0] as { at: string }).at).toBe(`2026-03-10T${String(8 + offsetHours).padStart(2, '0')}:15:00.000Z`)
    expect(stored.map((s) => (s as { kind: string }).kind)).toEqual(['trouble', 'restore'])
    expect(count('audit_log', "action = 'import.events'")).toBe(2)

    const twice = await importFile('events', 'Lakeside Central Station', file)
    expect(twice.committed.counts).toMatchObject({ eventsAdded: 0, alreadyPresent: 2 })
    expect(count('events')).toBe(before + 2)
  })
})
