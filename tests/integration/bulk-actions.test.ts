import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { deriveInput, derivationInputs } from '~/.server/derivation'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { resolveSelection } from '~/.server/bulk/selection'
import { undoBulk } from '~/.server/bulk/undo'
import { BULK_ACTIONS } from '~/components/bulk/catalog'
import { contextFor, makeVisits } from '#tests/setup/bulk'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

const COLUMNS: Record<string, string> = {
  state: 'state',
  assignedTo: 'assigned_to',
  acknowledgedAt: 'acknowledged_at',
  acknowledgedBy: 'acknowledged_by',
  notes: 'notes',
  scheduledOn: 'scheduled_on',
  technicianId: 'technician_id',
  status: 'status',
  cancelledAt: 'cancelled_at',
  cancelReason: 'cancel_reason',
}

describe('bulk actions: each applies what its preview shows', () => {
  let data: ReturnType<typeof seededDb>
  const q = () => data.db.$client
  const lead = () => contextFor(data.db, 'lead@ductkeeper.test', TEST_TODAY)
  let detectorIds: number[]
  let visitIds: number[]
  let techId: number

  beforeAll(() => {
    data = seededDb('small')
    q().exec('delete from closed_days; delete from observed_holidays; update users set daily_capacity = null')
    detectorIds = (q().prepare('select id from detectors order by id limit 12').all() as Array<{ id: number }>).map((r) => r.id)
    const siteId = (q().prepare('select id from sites order by id limit 1').get() as { id: number }).id
    techId = (q().prepare("select id from users where email = 'rosa.imbert@ductkeeper.test'").get() as { id: number }).id
    visitIds = makeVisits(data.db, { n: 6, siteId, date: '2026-06-22', technicianId: null })
  })
  afterAll(() => data?.cleanup())

  function fieldsNow(entity: 'visit' | 'detector', id: number, fields: string[]) {
    const row = q().prepare(`select ${fields.map((f) => `${COLUMNS[f]} as "${f}"`).join(', ')} from ${entity}s where id = ?`).get(id)
    return row as Record<string, unknown>
  }

  const cases: Array<[string, 'visit' | 'detector', Record<string, unknown>]> = [
    ['set-state', 'detector', { state: 'out-of-service' }],
    ['assign', 'detector', { technicianId: 0 }],
    ['acknowledge', 'detector', {}],
    ['unacknowledge', 'detector', {}],
    ['note', 'visit', { text: 'Roof hatch key with the caretaker' }],
    ['reschedule', 'visit', { mode: 'technician', technicianId: 0 }],
    ['reschedule', 'visit', { mode: 'cancel', reason: 'Site closed for refit' }],
  ]
  for (const [name, entity, raw] of cases) {
    it(`${name} ${JSON.stringify(raw)}`, () => {
      const action = bulkAction(name)!
      const input = action.input.parse(JSON.parse(JSON.stringify(raw).replace(':0', `:${techId}`)))
      const ids = entity === 'visit' ? visitIds : detectorIds
      const preview = previewBulk(data.db, action, ids, input, lead())
      expect(preview.changeCount, JSON.stringify(preview.refused)).toBeGreaterThan(0)
      const applied = applyBulk(data.db, action, input, ids, new Map(preview.changes.map((c) => [c.id, c.version])), lead())
      expect(applied.applied).toBe(preview.changeCount)
      for (const c of preview.changes) {
        const now = fieldsNow(entity, c.id, Object.keys(c.to))
        // The audit instant is the context's; booleans and ids come back as SQLite keeps them.
        expect(now, c.label).toEqual(c.to)
      }
      // A second preview of the same finds nothing left to do.
      const again = previewBulk(data.db, action, ids, input, lead())
      expect(again.changeCount).toBe(0)
      expect(again.refusedCount).toBe(ids.length)
    })
  }

  it('re-derives the detectors it changes, in the same transaction', () => {
    const action = bulkAction('set-state')!
    const ids = detectorIds.slice(0, 3)
    const preview = previewBulk(data.db, action, ids, { state: 'trouble' }, lead())
    const applied = applyBulk(data.db, action, { state: 'trouble' }, ids, new Map(preview.changes.map((c) => [c.id, c.version])), lead())
    for (const input of derivationInputs(data.db, { ids }, TEST_TODAY)) {
      const facts = deriveInput(input, TEST_TODAY).stored
      expect(input.stored.riskScore).toBe(facts.riskScore)
      expect(input.stored.riskReasons).toBe(facts.riskReasons)
    }
    undoBulk(data.db, applied.changeId!, lead().actor, TEST_TODAY)
    expect((q().prepare(`select state from detectors where id = ${ids[0]}`).get() as { state: string }).state).toBe('out-of-service')
  })

  it('offers in the console exactly the actions the server runs, for the same roles', () => {
    for (const info of BULK_ACTIONS) {
      const action = bulkAction(info.name)
      expect(action, info.name).not.toBeNull()
      expect({ entity: action!.entity, capability: action!.capability }).toEqual({ entity: info.entity, capability: info.capability })
    }
  })

  it('selects all detectors a list filter matches, resolved on the server', () => {
    const site = (q().prepare('select site_id as s, count(*) n from detectors group by site_id order by n desc limit 1').get() as { s: number; n: number })
    const fromString = resolveSelection(data.db, 'detector', { filter: `?site=${site.s}&sort=tag&offset=100&limit=1` })
    expect(fromString.length).toBe(site.n)
    expect(resolveSelection(data.db, 'detector', { filter: { site: String(site.s), position: 'supply' } })).toEqual(
      (q().prepare("select id from detectors where site_id = ? and position = 'supply' order by id").all(site.s) as Array<{ id: number }>).map((r) => r.id),
    )
    expect(() => resolveSelection(data.db, 'detector', { filter: 'state=melted' })).toThrow(/The filter is not valid: state/)
    expect(() => resolveSelection(data.db, 'visit', {})).toThrow(/either ids or a filter/)
  })
})
