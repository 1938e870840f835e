import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { inventoryFile } from '#tests/setup/inventory-file'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

// 50,000 detectors in one file: 1,000 sites of 10 units with 5 detectors each, for a new customer.
const SITES = 1000
const UNITS = 10
const PER_UNIT = 5
const ROWS = SITES * UNITS * PER_UNIT

const running = useSeededServer('small')
let cookie = ''
let model = ''

beforeAll(async () => {
  const { db } = running.data
  cookie = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.office))).cookie
  model = (db.$client.prepare('select name from detector_models order by id limit 1').get() as { name: string }).name
})

const inventory = () => inventoryFile({ customer: 'Fernbrook Family Diners', model, sites: SITES, units: UNITS, perUnit: PER_UNIT })

describe('a 50,000-row inventory file', () => {
  it('uploads, checks and imports in measured time, and a second import changes nothing', async () => {
    const text = inventory()
    const headers = { Cookie: cookie, Origin: running.server.url }
    const run = async () => {
      const t0 = performance.now()
      const form = new FormData()
      form.append('kind', 'inventory')
      form.append('source', 'Fernbrook')
      form.append('file', new Blob([text], { type: 'text/csv' }), 'fernbrook.csv')
      const up = await fetch(`${running.server.url}/api/import`, { method: 'POST', headers, body: form })
      expect(up.status).toBe(201)
      const { id, mapping, rows } = (await up.json()) as { id: string; mapping: Record<string, string | null>; rows: number }
      expect(rows).toBe(ROWS)
      const t1 = performance.now()
      const post = (intent: string) =>
        fetch(`${running.server.url}/api/import/${id}`, { method: 'POST', headers: { ...headers, 'Content-Type': 'application/json' }, body: JSON.stringify({ intent, mapping }) })
      const lines = (await (await post('check')).text()).trim().split('\n').map((l) => JSON.parse(l) as { progress?: number; report?: { counts: Record<string, number> } })
      expect(lines.filter((l) => l.progress !== undefined)).toHaveLength(ROWS / 1000)
      const t2 = performance.now()
      const committed = (await (await post('commit')).json()) as { report: { counts: Record<string, number> } }
      const t3 = performance.now()
      const seconds = (a: number, b: number) => Math.round(b - a) / 1000
      console.info(`50,000-row inventory: upload ${seconds(t0, t1)} s, check ${seconds(t1, t2)} s, commit ${seconds(t2, t3)} s`)
      return committed.report.counts
    }
    const first = await run()
    expect(first).toMatchObject({ rows: ROWS, customersAdded: 1, sitesAdded: SITES, unitsAdded: SITES * UNITS, detectorsAdded: ROWS, skippedRows: 0 })
    const db = running.data.db.$client
    expect((db.prepare("select count(*) as n from detectors d join customers c on c.id = d.customer_id where c.name = 'Fernbrook Family Diners' and d.next_due_on is not null").get() as { n: number }).n).toBe(ROWS)
    const second = await run()
    expect(second).toMatchObject({ rows: ROWS, customersAdded: 0, detectorsAdded: 0, detectorsUpdated: 0, unchangedRows: ROWS })
  })
})
