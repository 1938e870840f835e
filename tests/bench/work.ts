// Fleet-wide work, timed in this process on a copy of the database (it writes): a bulk reschedule of
// many visits (selection, preview, apply, undo), the delay audit over every detector, a cleaning
// cycle planned for thousands of detectors, and the weekly digest for every recipient.
import type Database from 'better-sqlite3'
import { copyFileSync, rmSync } from 'node:fs'
import { loadCompanyCalendar } from '~/.server/bulk/calendar'
import { bulkAction } from '~/.server/bulk/registry'
import { applyBulk, previewBulk } from '~/.server/bulk/runner'
import { resolveSelection } from '~/.server/bulk/selection'
import { undoBulk } from '~/.server/bulk/undo'
import { createDb } from '~/.server/db'
import { queueDigest } from '~/.server/email/digest-message'
import { digestRecipients, fleetFigures } from '~/.server/email/digest'
import { addDays } from '~/domain/dates'

export interface Timed {
  name: string
  ms: number[]
  note: string
  /** The same writes as one raw SQL transaction, where the work is a write. */
  floor?: number[]
}

/**
 * The floor of a bulk reschedule's writes: one IMMEDIATE transaction of plain prepared statements
 * moving each visit to `to` with its version bumped, plus the change's record and audit row. Run on
 * the copy after the undo; moved back afterwards by the same statements.
 */
function rawReschedule(q: Database.Database, moves: Array<{ id: number; to: string }>): number {
  const move = q.prepare('update visits set scheduled_on = ?, version = version + 1 where id = ?')
  const change = q.prepare("insert into bulk_changes (actor_id, action, summary, record_count, records) values (1, 'raw', 'raw', ?, ?)")
  const audit = q.prepare("insert into audit_log (actor_id, action, entity, entity_id, after) values (1, 'bulk.raw', 'visit', ?, ?)")
  const t = performance.now()
  q.transaction(() => {
    for (const m of moves) move.run(m.to, m.id)
    const id = Number(change.run(moves.length, JSON.stringify(moves)).lastInsertRowid)
    audit.run(id, JSON.stringify({ count: moves.length }))
  }).immediate()
  return performance.now() - t
}

function timed<T>(ms: number[], fn: () => T): T {
  const t = performance.now()
  const out = fn()
  ms.push(performance.now() - t)
  return out
}

/** Runs each piece of work `runs` times (apply and undo once each, as they change the copy). */
export async function benchWork(source: string, scratch: string, today: string, o: { visits: number; cycleDetectors: number; runs: number }): Promise<Timed[]> {
  copyFileSync(source, scratch)
  const db = createDb(scratch, { runMigrations: false })
  const q = db.$client
  const out: Timed[] = []
  try {
    const office = q.prepare("select id, role from users where email = 'office@ductkeeper.test'").get() as { id: number; role: 'office' }
    const techs = (q.prepare("select id from users where role = 'technician' and active = 1 order by id").all() as Array<{ id: number }>).map((t) => t.id)
    const ctx = () => ({ actor: office, today, calendar: loadCompanyCalendar(db), now: new Date().toISOString() })

    // Open visits up to the wanted number, spread over sites, technicians and the next 60 days.
    const open = () => (q.prepare("select count(*) n from visits where status = 'planned' and scheduled_on > ?").get(today) as { n: number }).n
    const missing = o.visits - open()
    if (missing > 0) {
      const sites = q.prepare('select site_id as id, min(id) as detector from detectors group by site_id').all() as Array<{ id: number; detector: number }>
      const visit = q.prepare("insert into visits (site_id, kind, scheduled_on, technician_id, status) values (?, 'test', ?, ?, 'planned')")
      const item = q.prepare("insert into visit_detectors (visit_id, detector_id, tasks) values (?, ?, 'visual,functional')")
      q.transaction(() => {
        for (let i = 0; i < missing; i++) {
          const s = sites[i % sites.length]
          const id = Number(visit.run(s.id, addDays(today, 1 + (i % 60)), techs[i % techs.length]).lastInsertRowid)
          item.run(id, s.detector)
        }
      })()
    }
    const reschedule = bulkAction('reschedule')!
    const shift = { mode: 'shift', days: 2 }
    const select: number[] = []
    const ids = timed(select, () => resolveSelection(db, 'visit', { filter: `status=planned&from=${addDays(today, 1)}` }))
    for (let i = 1; i < o.runs; i++) timed(select, () => resolveSelection(db, 'visit', { filter: `status=planned&from=${addDays(today, 1)}` }))
    out.push({ name: `bulk reschedule: select ${ids.length} visits`, ms: select, note: 'the Visits filter resolved' })
    const preview: number[] = []
    let moved = 0
    for (let i = 0; i < o.runs; i++) moved = timed(preview, () => previewBulk(db, reschedule, ids, shift, ctx())).changeCount
    out.push({ name: `bulk reschedule: preview ${ids.length} visits`, ms: preview, note: `${moved} to move` })
    const plan = reschedule.preview(db, ids, shift, ctx())
    const apply: number[] = []
    const applied = timed(apply, () => applyBulk(db, reschedule, shift, ids, new Map(plan.changes.map((c) => [c.id, c.version])), ctx()))
    const moves = plan.changes.map((c) => ({ id: c.id, to: String(c.to.scheduledOn) }))
    const back = plan.changes.map((c) => ({ id: c.id, to: String(c.from.scheduledOn) }))
    if (applied.changeId) {
      const undo: number[] = []
      timed(undo, () => undoBulk(db, applied.changeId!, office, today))
      // The floor, interleaved: the same moves there and back as raw statements, three times each.
      const floor: number[] = []
      const floorBack: number[] = []
      for (let i = 0; i < o.runs; i++) {
        floor.push(rawReschedule(q, moves))
        floorBack.push(rawReschedule(q, back))
      }
      out.push({ name: `bulk reschedule: apply ${ids.length} visits`, ms: apply, note: `${applied.applied} applied in one transaction (the preview's plan, standing as nothing was written since)`, floor })
      out.push({ name: `bulk reschedule: undo ${ids.length} visits`, ms: undo, note: '', floor: floorBack })
    } else out.push({ name: `bulk reschedule: apply ${ids.length} visits`, ms: apply, note: 'nothing applied' })

    const detectors = (q.prepare('select id from detectors order by id').all() as Array<{ id: number }>).map((d) => d.id)
    const audit = bulkAction('delay-audit')!
    const auditMs: number[] = []
    for (let i = 0; i < o.runs; i++) timed(auditMs, () => previewBulk(db, audit, detectors, { do: 'verify' }, ctx()))
    out.push({ name: `delay audit: every detector (${detectors.length})`, ms: auditMs, note: 'preview of verify' })

    const cycle = bulkAction('cleaning-cycle')!
    // The detectors whose cleaning falls due soonest, as an office would pick a cycle's share.
    const due = (q.prepare('select id from detectors order by next_cleaning_on is null, next_cleaning_on, id limit ?').all(o.cycleDetectors) as Array<{ id: number }>).map((d) => d.id)
    const from = loadCompanyCalendar(db).forRegion('US').nextWorkingDay(addDays(today, 1))
    const cycleMs: number[] = []
    let summary = ''
    for (let i = 0; i < o.runs; i++) {
      summary = timed(cycleMs, () => previewBulk(db, cycle, due, { from, to: addDays(from, 27), dueBy: addDays(today, 365), technicianIds: techs }, ctx())).summary
    }
    out.push({ name: `cleaning cycle: plan for ${due.length} detectors`, ms: cycleMs, note: summary })

    const recipients = digestRecipients(db)
    const digestMs: number[] = []
    const fleet = timed(digestMs, () => fleetFigures(db, today))
    for (const r of recipients) {
      const t = performance.now()
      await queueDigest(db, r, today, fleet)
      digestMs.push(performance.now() - t)
    }
    out.push({ name: `weekly digest: fleet figures, then each of ${recipients.length} recipients`, ms: digestMs, note: 'figures, message rendered, queued' })
  } finally {
    q.close()
    for (const suffix of ['', '-wal', '-shm']) rmSync(scratch + suffix, { force: true })
  }
  return out
}
