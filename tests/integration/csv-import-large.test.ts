import { beforeAll, describe, expect, it } from 'vitest'
import { writeTx } from '~/.server/db'
import { rederive } from '~/.server/derivation'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { inventoryFile } from '#tests/setup/inventory-file'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'

// A file of 5,000 detectors (100 sites of 10 units with 5 each) for a new customer: large enough that
// the commit plans, derives and stages ahead of its transaction, small enough for every run.
const SITES = 100
const ROWS = SITES * 10 * 5
const CUSTOMER = 'Thistledown Eateries'

const running = useSeededServer('small')
let cookie = ''
let text = ''

beforeAll(async () => {
  const { db } = running.data
  cookie = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.office))).cookie
  const model = (db.$client.prepare('select name from detector_models order by id limit 1').get() as { name: string }).name
  text = inventoryFile({ customer: CUSTOMER, model, sites: SITES, units: 10, perUnit: 5 })
})

const sql = () => running.data.db.$client
const one = <T>(query: string) => sql().prepare(query).get() as T
/** Everything an import could touch, to compare before and after. */
const state = () =>
  one<Record<string, number>>(
    `select (select count(*) from customers) as customers, (select count(*) from sites) as sites, (select count(*) from units) as units,
            (select count(*) from detectors) as detectors, (select coalesce(max(id), 0) from detectors) as lastDetector,
            (select sum(version) from detectors) + (select sum(version) from units) + (select sum(version) from sites) + (select sum(version) from customers) as versions,
            (select count(*) from search_index) as searchRows, (select rows from table_counts where name = 'detectors') as countedDetectors,
            (select count(*) from audit_log where action = 'import.inventory') as audits`,
  )

async function upload() {
  const form = new FormData()
  form.append('kind', 'inventory')
  form.append('source', 'Thistledown')
  form.append('file', new Blob([text], { type: 'text/csv' }), 'thistledown.csv')
  const res = await fetch(`${running.server.url}/api/import`, { method: 'POST', headers: { Cookie: cookie, Origin: running.server.url }, body: form })
  expect(res.status).toBe(201)
  return (await res.json()) as { id: string; mapping: Record<string, string | null> }
}

const post = (id: string, body: unknown) =>
  fetch(`${running.server.url}/api/import/${id}`, { method: 'POST', headers: { Cookie: cookie, Origin: running.server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })

async function checkAndCommit() {
  const up = await upload()
  const lines = (await (await post(up.id, { intent: 'check', mapping: up.mapping })).text()).trim().split('\n')
  const checked = (JSON.parse(lines.at(-1)!) as { report: { counts: Record<string, number> } }).report
  const res = await post(up.id, { intent: 'commit', mapping: up.mapping })
  return { up, checked, res }
}

describe('a 5,000-row inventory file', () => {
  it('writes nothing at all when the write fails part-way through', async () => {
    const before = state()
    // A fault planted for the test: the database refuses one detector in the middle of the file.
    sql().exec(`create trigger test_refuse_one before insert on detectors when new.tag = 'RTU-5-3' and new.serial = 'FB${SITES / 2}-5-3' begin select raise(abort, 'refused for the test'); end`)
    try {
      const { res } = await checkAndCommit()
      expect(res.status).toBe(500)
    } finally {
      sql().exec('drop trigger test_refuse_one')
    }
    expect(state()).toEqual(before)
    expect(one<{ n: number }>(`select count(*) as n from customers where name = '${CUSTOMER}'`).n).toBe(0)
  })

  it('commits what the check reported, with facts the one derivation agrees with, and a second import changes nothing', async () => {
    const before = state()
    const first = await checkAndCommit()
    expect(first.res.status).toBe(200)
    const committed = ((await first.res.json()) as { report: { counts: Record<string, number> } }).report.counts
    expect(committed).toEqual(first.checked.counts)
    expect(committed).toMatchObject({ rows: ROWS, customersAdded: 1, sitesAdded: SITES, unitsAdded: SITES * 10, detectorsAdded: ROWS, skippedRows: 0 })
    const after = state()
    expect(after).toMatchObject({
      customers: before.customers + 1,
      sites: before.sites + SITES,
      units: before.units + SITES * 10,
      detectors: before.detectors + ROWS,
      countedDetectors: before.countedDetectors + ROWS,
      searchRows: before.searchRows + 1 + SITES + SITES * 10 + ROWS,
      audits: before.audits + 1,
    })

    // Each new detector sits under its own unit, site and customer, as the file says.
    const misplaced = one<{ n: number }>(
      `select count(*) as n from detectors d join units u on u.id = d.unit_id join sites s on s.id = u.site_id join customers c on c.id = s.customer_id
        where c.name = '${CUSTOMER}' and (d.site_id <> s.id or d.customer_id <> c.id or d.serial <> 'FB' || substr(s.name, 13) || '-' || substr(u.tag, 5) || '-' || substr(d.tag, length(u.tag) + 2))`,
    )
    expect(misplaced.n).toBe(0)
    // The facts stored at the insert are the ones the derivation gives from the stored record: re-deriving changes none.
    const ids = (sql().prepare(`select d.id from detectors d join customers c on c.id = d.customer_id where c.name = '${CUSTOMER}'`).all() as Array<{ id: number }>).map((r) => r.id)
    expect(ids).toHaveLength(ROWS)
    expect(writeTx(running.data.db, () => rederive(running.data.db, ids, TEST_TODAY))).toBe(0)

    const second = await checkAndCommit()
    expect(second.res.status).toBe(200)
    expect(((await second.res.json()) as { report: { counts: Record<string, number> } }).report.counts).toMatchObject({
      customersAdded: 0,
      sitesAdded: 0,
      unitsAdded: 0,
      detectorsAdded: 0,
      detectorsUpdated: 0,
      unchangedRows: ROWS,
    })
    expect(state()).toEqual({ ...after, audits: after.audits + 1 })
  })
})
