import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { applyInventory, deriveNewDetectors, planInventory, planStillHolds, stageNewRecords } from '~/.server/csv/inventory'
import { writeTx, type Db } from '~/.server/db'
import { inventoryRow } from '~/domain/import-schemas'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

// The commit plans a file outside its transaction and writes it inside only if every record the plan
// rests on is as it was; these are the changes that must send it back to planning.

let db: Db
let cleanup: () => void
beforeAll(() => ({ db, cleanup } = seededDb('small')))
afterAll(() => cleanup())

const q = () => db.$client
function existing() {
  return q()
    .prepare(
      `select c.name as customer, s.name as site, u.tag as unit, d.tag, s.id as siteId, d.id as detectorId
         from detectors d join units u on u.id = d.unit_id join sites s on s.id = d.site_id join customers c on c.id = d.customer_id order by d.id limit 1`,
    )
    .get() as { customer: string; site: string; unit: string; tag: string; siteId: number; detectorId: number }
}
const model = () => (q().prepare('select name from detector_models order by id limit 1').get() as { name: string }).name
const detectorCells = () => ({ model: model(), position: 'supply', housing: 'standard', environment: 'clean', installedOn: '2024-03-01', eolOhms: '15000', eolPlacement: 'through-supervisory', alarmTerminal: 'NO', supervisoryTerminal: 'NC', conductorAwg: '18', conductorStranded: 'yes', runFeet: '120' })

function planOf(rows: Array<Record<string, string>>) {
  return planInventory(db, rows.map((r, i) => ({ row: i + 2, data: inventoryRow.parse(r) })), 0)
}

describe('a plan made ahead of the transaction', () => {
  it('still holds while nothing it rests on changed', () => {
    const e = existing()
    const plan = planOf([{ customer: e.customer, site: e.site, unit: e.unit, tag: e.tag }, { customer: e.customer, site: e.site, unit: e.unit, tag: 'NEW-1', ...detectorCells() }])
    // An unrelated write does not matter.
    q().prepare("update customers set version = version + 1 where name <> ? and id = (select max(id) from customers)").run(e.customer)
    expect(planStillHolds(db, plan)).toBe(true)
  })

  it('no longer holds when a record it found was edited, or a record it would add appeared', () => {
    const e = existing()
    const edited = planOf([{ customer: e.customer, site: e.site, unit: e.unit, tag: e.tag, eolOhms: '12000' }])
    q().prepare('update sites set version = version + 1 where id = ?').run(e.siteId)
    expect(planStillHolds(db, edited)).toBe(false)

    const adding = planOf([{ customer: e.customer, site: e.site, unit: e.unit, tag: 'LATE-1', ...detectorCells() }])
    expect(adding.counts.detectorsAdded).toBe(1)
    // Someone adds the same detector (another case of the tag) before the import's transaction.
    q().prepare("insert into detectors (tag, unit_id, site_id, customer_id, model_id, position, housing, environment, installed_on, eol_ohms, eol_placement, alarm_terminal, supervisory_terminal, conductor_awg, conductor_stranded, run_feet, velocity_min_fpm, velocity_max_fpm, pressure_min_in_wc, pressure_max_in_wc, next_visual_on, next_functional_on, next_sensitivity_on, next_cleaning_on, next_due_on) select 'late-1', unit_id, site_id, customer_id, model_id, position, housing, environment, installed_on, eol_ohms, eol_placement, alarm_terminal, supervisory_terminal, conductor_awg, conductor_stranded, run_feet, velocity_min_fpm, velocity_max_fpm, pressure_min_in_wc, pressure_max_in_wc, next_visual_on, next_functional_on, next_sensitivity_on, next_cleaning_on, next_due_on from detectors where id = ?").run(e.detectorId)
    expect(planStillHolds(db, adding)).toBe(false)
  })

  it('writes a held plan as planned: new records under the right parents, an edit bumping the version', async () => {
    const e = existing()
    const rows = [
      { customer: e.customer, site: e.site, unit: e.unit, tag: e.tag, runFeet: '333' },
      { customer: e.customer, site: e.site, unit: 'MAU-77', unitKind: 'mau', shutdownInput: 'break-to-stop', supplyCfm: '5000', returnCfm: '0', ductShape: 'round', tag: 'MAU-77-S', ...detectorCells() },
    ]
    const plan = planOf(rows)
    await deriveNewDetectors(plan, TEST_TODAY, false)
    const staged = await stageNewRecords(db, plan, 'plan-test', false)
    const version = (q().prepare('select version from detectors where id = ?').get(e.detectorId) as { version: number }).version
    try {
      expect(writeTx(db, () => (planStillHolds(db, plan) ? applyInventory(db, plan, staged, TEST_TODAY) : null))).toEqual([e.detectorId])
    } finally {
      staged.drop()
    }
    expect(q().prepare('select run_feet as runFeet, version from detectors where id = ?').get(e.detectorId)).toEqual({ runFeet: 333, version: version + 1 })
    const added = q().prepare("select d.site_id as siteId, u.site_id as unitSite, u.kind, d.next_due_on as due from detectors d join units u on u.id = d.unit_id where d.tag = 'MAU-77-S'").get() as { siteId: number; unitSite: number; kind: string; due: string | null }
    expect(added).toMatchObject({ siteId: e.siteId, unitSite: e.siteId, kind: 'mau' })
    expect(added.due).not.toBeNull()
  })
})
