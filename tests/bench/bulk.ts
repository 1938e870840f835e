// npx tsx tests/bench/bulk.ts --db <file> [--visits 10000]
// Times a bulk reschedule over many visits on a copy of the file: the selection resolved from the
// Visits list's filter, the preview, the apply (one transaction) and the undo. Open visits are added
// to the copy until it holds `--visits` of them, spread over sites, technicians and working days.
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { parseArgs } from 'node:util'
import { performance } from 'node:perf_hooks'
import { loadCompanyCalendar } from '~/.server/bulk/calendar'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { resolveSelection } from '~/.server/bulk/selection'
import { undoBulk } from '~/.server/bulk/undo'
import { createDb } from '~/.server/db'
import { addDays } from '~/domain/dates'

const { values } = parseArgs({ options: { db: { type: 'string' }, visits: { type: 'string', default: '10000' } } })
if (!values.db) throw new Error('--db <file> is required (e.g. a stress-scale database)')
const want = Number(values.visits)
const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-bench-'))
const path = join(dir, 'bench.db')
copyFileSync(values.db, path)
const db = createDb(path)
const q = db.$client
const today = '2026-06-15'

const open = () => (q.prepare("select count(*) n from visits where status = 'planned' and scheduled_on > ?").get(today) as { n: number }).n
const techs = (q.prepare("select id from users where role = 'technician' and active = 1").all() as Array<{ id: number }>).map((t) => t.id)
const sites = q.prepare('select s.id, (select min(d.id) from detectors d where d.site_id = s.id) as detector from sites s where exists (select 1 from detectors d where d.site_id = s.id)').all() as Array<{ id: number; detector: number }>
const missing = want - open()
if (missing > 0) {
  const visit = q.prepare("insert into visits (site_id, kind, scheduled_on, technician_id, status) values (?, 'test', ?, ?, 'planned')")
  const item = q.prepare("insert into visit_detectors (visit_id, detector_id, tasks) values (?, ?, 'visual,functional')")
  q.transaction(() => {
    for (let i = 0; i < missing; i++) {
      const s = sites[i % sites.length]
      const id = Number(visit.run(s.id, addDays(today, 1 + (i % 60)), techs[i % techs.length]).lastInsertRowid).valueOf()
      item.run(id, s.detector)
    }
  })()
}

const time = <T>(label: string, fn: () => T): T => {
  const t = performance.now()
  const out = fn()
  console.log(`${label}: ${(performance.now() - t).toFixed(0)} ms`)
  return out
}
const action = bulkAction('reschedule')!
const office = q.prepare("select id, role from users where email = 'office@ductkeeper.test'").get() as { id: number; role: 'office' }
const ctx = () => ({ actor: office, today, calendar: loadCompanyCalendar(db), now: new Date().toISOString() })
const input = { mode: 'shift', days: 2 }

for (const capacity of ['as seeded', 'no limit']) {
  if (capacity === 'no limit') q.exec("update users set daily_capacity = null where role = 'technician'")
  console.log(`\n${open()} open visits after ${today}; technicians' capacity ${capacity}`)
  const ids = time('select (Visits filter status=planned)', () => resolveSelection(db, 'visit', { filter: `status=planned&from=${addDays(today, 1)}` }))
  // Twice: the first also fills the holiday tables of each region and warms the statements.
  time(`preview, first (${ids.length} visits)`, () => previewBulk(db, action, ids, input, ctx()))
  const preview = time(`preview, again (${ids.length} visits)`, () => previewBulk(db, action, ids, input, ctx()))
  console.log(`  ${preview.changeCount} to move, ${preview.refusedCount} refused, ${(preview.extra as { dayLoads: unknown[] }).dayLoads.length} day loads listed`)
  // The apply takes every previewed version back, as the route does with the preview's id.
  const all = action.preview(db, ids, input, ctx())
  const applied = time('apply (one IMMEDIATE transaction)', () => applyBulk(db, action, input, ids, new Map(all.changes.map((c) => [c.id, c.version])), ctx()))
  console.log(`  ${applied.applied} applied, ${applied.refusedCount} refused`)
  if (applied.changeId) time('undo', () => undoBulk(db, applied.changeId!, office, today))
}
db.$client.close()
rmSync(dir, { recursive: true, force: true })
