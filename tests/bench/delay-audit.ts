// npx tsx tests/bench/delay-audit.ts --db <file>
// Times the delay-setting audit over the whole fleet on a copy of the file: the correction-visit
// preview (twice: cold, then warm) and the "mark verified" preview and apply.
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { performance } from 'node:perf_hooks'
import { parseArgs } from 'node:util'
import { loadCompanyCalendar } from '~/.server/bulk/calendar'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { resolveSelection } from '~/.server/bulk/selection'
import { createDb } from '~/.server/db'

const { values } = parseArgs({ options: { db: { type: 'string' }, today: { type: 'string', default: '2026-06-15' } } })
if (!values.db) throw new Error('--db <file> is required')
const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-audit-bench-'))
const path = join(dir, 'bench.db')
copyFileSync(values.db, path)
const db = createDb(path)
const today = values.today!
const action = bulkAction('delay-audit')!
const lead = db.$client.prepare("select id, role from users where role = 'lead' and active = 1 order by id limit 1").get() as { id: number; role: 'lead' }
const ctx = () => ({ actor: lead, today, calendar: loadCompanyCalendar(db), now: new Date().toISOString() })

const time = <T>(label: string, fn: () => T): T => {
  const t = performance.now()
  const cpu = process.cpuUsage()
  const out = fn()
  const used = process.cpuUsage(cpu)
  console.log(`${label}: ${(performance.now() - t).toFixed(0)} ms (${((used.user + used.system) / 1000).toFixed(0)} ms CPU)`)
  return out
}

try {
  const disagree = resolveSelection(db, 'detector', { filter: 'delay=disagree' })
  const visits = action.input.parse({ do: 'correction-visits' })
  time(`correction visits, preview, first (${disagree.length} detectors)`, () => previewBulk(db, action, disagree, visits, ctx()))
  const p = time('correction visits, preview, again', () => previewBulk(db, action, disagree, visits, ctx()))
  console.log(`  ${p.changeCount} visits, ${p.refusedCount} refused`)

  const fleet = resolveSelection(db, 'detector', { filter: '' })
  const verify = action.input.parse({ do: 'verify' })
  const v = time(`mark verified, preview (${fleet.length} detectors)`, () => previewBulk(db, action, fleet, verify, ctx()))
  const all = action.preview(db, fleet, verify, ctx())
  const applied = time(`mark verified, apply (${v.changeCount} to change)`, () => applyBulk(db, action, verify, fleet, new Map(all.changes.map((c) => [c.id, c.version])), ctx()))
  console.log(`  ${applied.applied} applied, ${applied.refusedCount} refused`)
} finally {
  db.$client.close()
  rmSync(dir, { recursive: true, force: true })
}
