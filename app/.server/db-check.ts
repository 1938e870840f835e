// The database check: every stored fact against the one derivation, every record date against the
// history, every kept row total against count(*), foreign keys and SQLite's own integrity check.
import { sql } from 'drizzle-orm'
import { factDifferences } from '~/domain/derive'
import type { Db } from './db'
import { deriveInput, fleetInputs } from './derivation'
import { reasonCounts, tableCounts } from './schema'

export interface Disagreement {
  check: 'history' | 'derived' | 'row-total' | 'foreign-key' | 'integrity' | 'visit-result'
  message: string
}

// Facts the history decides; the rest follow from them and the day.
const HISTORY_FIELDS = new Set(['lastVisualOn', 'lastFunctionalOn', 'lastSensitivityOn', 'lastCleanedOn', 'sensitivityStreak', 'lastResult'])

export function checkDatabase(
  db: Db,
  today: string,
  o: { integrity?: 'full' | 'quick' | 'none'; onDisagreement?: (d: Disagreement) => void } = {},
): { detectors: number; disagreements: Disagreement[] } {
  const found: Disagreement[] = []
  const report = (d: Disagreement) => {
    found.push(d)
    o.onDisagreement?.(d)
  }
  let detectors = 0
  for (const inputs of fleetInputs(db, today)) {
    for (const input of inputs) {
      detectors++
      for (const diff of factDifferences(input.stored, deriveInput(input, today).stored)) {
        const history = HISTORY_FIELDS.has(diff.field)
        report({
          check: history ? 'history' : 'derived',
          message: `detector ${input.id}: ${diff.field} is ${JSON.stringify(diff.stored)}, ${history ? 'its history says' : 'the derivation for ' + today + ' gives'} ${JSON.stringify(diff.derived)}`,
        })
      }
    }
  }

  // Table names come from the kept totals themselves; a name that is no table is reported too.
  for (const { name, rows } of db.select().from(tableCounts).all()) {
    if (!/^[a-z_]+$/.test(name)) {
      report({ check: 'row-total', message: `table_counts has an entry "${name}" that is no table name` })
      continue
    }
    const actual = db.get<{ n: number }>(sql.raw(`select count(*) as n from "${name}"`)).n
    if (actual !== rows) report({ check: 'row-total', message: `${name}: kept total ${rows}, count(*) ${actual}` })
  }

  // The open triage queue's kept totals, per reason.
  for (const { code, n } of db.select().from(reasonCounts).all()) {
    const actual = db.get<{ n: number }>(sql`
      select count(*) as n from detectors
      where risk_reasons != '' and acknowledged_at is null and (${code} = 'open' or instr(risk_reasons, ',' || ${code} || ',') > 0)`).n
    if (actual !== n) report({ check: 'row-total', message: `open triage count "${code}": kept ${n}, count(*) ${actual}` })
  }

  // A finished visit's per-detector result is fail exactly when one of its task results failed.
  const mismatched = db.all<{ visitId: number; detectorId: number; result: string; failed: number }>(sql`
    select vd.visit_id as visitId, vd.detector_id as detectorId, vd.result,
           exists (select 1 from task_results tr where tr.visit_id = vd.visit_id and tr.detector_id = vd.detector_id and tr.outcome = 'fail') as failed
    from visit_detectors vd join visits v on v.id = vd.visit_id
    where v.status = 'done' and vd.result in ('pass', 'fail')
      and (vd.result = 'fail') != exists (select 1 from task_results tr where tr.visit_id = vd.visit_id and tr.detector_id = vd.detector_id and tr.outcome = 'fail')`)
  for (const m of mismatched) {
    report({ check: 'visit-result', message: `visit ${m.visitId}, detector ${m.detectorId}: result ${m.result} but ${m.failed ? 'a task failed' : 'no task failed'}` })
  }

  for (const fk of db.$client.pragma('foreign_key_check') as Array<{ table: string; rowid: number; parent: string }>) {
    report({ check: 'foreign-key', message: `${fk.table} row ${fk.rowid} points at a missing ${fk.parent} row` })
  }
  const integrity = o.integrity ?? 'full'
  if (integrity !== 'none') {
    const rows = db.$client.pragma(integrity === 'full' ? 'integrity_check' : 'quick_check') as Array<Record<string, string>>
    for (const row of rows) {
      const text = Object.values(row)[0]
      if (text !== 'ok') report({ check: 'integrity', message: text })
    }
  }
  return { detectors, disagreements: found }
}
