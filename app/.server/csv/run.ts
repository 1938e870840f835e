import { eq } from 'drizzle-orm'
import { eventRow, guessMapping, inventoryRow, mappingSchema, type ImportKind, type Mapping } from '~/domain/import-schemas'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { nextTurn } from '../derivation'
import { listsChanged } from '../list-query'
import { importMappings } from '../schema'
import { applyEvents, planEvents, type EventCounts } from './events'
import {
  applyInventory,
  deriveNewDetectors,
  deriveNewDetectorsNow,
  planInventory,
  planInventoryInTurns,
  planStillHolds,
  stageNewRecords,
  stageNewRecordsNow,
  type InventoryCounts,
  type InventoryPlan,
  type Staged,
} from './inventory'
import { columnNames, parseRows, type Problem } from './parse-rows'
import type { StoredImport } from './store'

// The report lists this many problems and notes at most; the counts cover them all.
const REPORT_LIMIT = 2000

export interface ImportReport {
  kind: ImportKind
  counts: InventoryCounts | EventCounts
  problems: Problem[]
  problemCount: number
  notes: Problem[]
  noteCount: number
}

/** The mapping remembered for a source and kind, else the guess from the header names. */
export function mappingFor(db: Db, kind: ImportKind, source: string, headers: string[]): { mapping: Mapping; remembered: boolean } {
  const saved = db.select().from(importMappings).where(eq(importMappings.source, rememberKey(kind, source))).get()
  const parsed = saved ? mappingSchema.safeParse(saved.mapping) : null
  if (parsed?.success) {
    // Only columns this file has: a remembered column that is gone falls back to the guess.
    const guess = guessMapping(kind, headers)
    const mapping = Object.fromEntries(Object.entries(guess).map(([field, g]) => {
      const m = parsed.data[field]
      return [field, m !== undefined && (m === null || headers.includes(m)) ? m : g]
    }))
    return { mapping, remembered: true }
  }
  return { mapping: guessMapping(kind, headers), remembered: false }
}

// One source may send both kinds of file: each kind keeps its own mapping.
const rememberKey = (kind: ImportKind, source: string) => `${kind}:${source.trim().toLowerCase()}`

function remember(db: Db, kind: ImportKind, source: string, mapping: Mapping) {
  const key = rememberKey(kind, source)
  db.insert(importMappings)
    .values({ source: key, kind, mapping })
    .onConflictDoUpdate({ target: importMappings.source, set: { kind, mapping, updatedAt: new Date().toISOString() } })
    .run()
}

async function parsed(meta: StoredImport, path: string, mapping: Mapping, onProgress?: (rows: number) => void | Promise<void>) {
  const base = { kind: meta.kind, path, delimiter: meta.delimiter, headers: meta.headers, mapping }
  return meta.kind === 'inventory'
    ? { kind: 'inventory' as const, ...(await parseRows({ ...base, schema: inventoryRow }, onProgress)) }
    : { kind: 'events' as const, ...(await parseRows({ ...base, schema: eventRow }, onProgress)) }
}

type Parsed = Awaited<ReturnType<typeof parsed>>

function plan(db: Db, meta: StoredImport, p: Parsed) {
  const skipped = new Set(p.problems.map((x) => x.row)).size
  return p.kind === 'inventory' ? { kind: 'inventory' as const, plan: planInventory(db, p.rows, skipped) } : { kind: 'events' as const, plan: planEvents(db, meta.source, p.rows, skipped) }
}

function report(kind: ImportKind, mapping: Mapping, parseProblems: Problem[], planned: ReturnType<typeof plan>): ImportReport {
  const problems = [...parseProblems, ...planned.plan.problems].sort((a, b) => a.row - b.row)
  return {
    kind,
    counts: planned.plan.counts,
    problems: columnNames(kind, mapping, problems.slice(0, REPORT_LIMIT)),
    problemCount: problems.length,
    notes: columnNames(kind, mapping, planned.plan.notes.slice(0, REPORT_LIMIT)),
    noteCount: planned.plan.notes.length,
  }
}

/** Reads and checks the whole file against the records as they stand; writes nothing but the mapping. */
export async function checkImport(db: Db, meta: StoredImport, path: string, mapping: Mapping, onProgress?: (rows: number) => void | Promise<void>): Promise<ImportReport> {
  const p = await parsed(meta, path, mapping, onProgress)
  remember(db, meta.kind, meta.source, mapping)
  const skipped = new Set(p.problems.map((x) => x.row)).size
  const planned = p.kind === 'inventory' ? { kind: 'inventory' as const, plan: await planInventoryInTurns(db, p.rows, skipped) } : plan(db, meta, p)
  return report(meta.kind, mapping, p.problems, planned)
}

/**
 * Writes every sound row in one IMMEDIATE transaction, or nothing. Everything that can be done
 * before is done before, handing the event loop back as it goes: the file read and checked, the plan
 * made against the records as they stand, each new detector's facts derived. The transaction then
 * checks that the records the plan rests on are as they were (else it plans again, inside), writes
 * with prepared statements, and adds the one audit entry. Rows with problems are left out, as the
 * check reported. Event files are planned inside the transaction, against the events of that moment.
 */
export async function commitImport(db: Db, meta: StoredImport, path: string, mapping: Mapping, actorId: number, today: string): Promise<ImportReport> {
  // The rows are read as the check read them, handing the event loop back every 1,000.
  const p = await parsed(meta, path, mapping, async () => void (await nextTurn()))
  const skipped = new Set(p.problems.map((x) => x.row)).size
  let ahead: { plan: InventoryPlan; staged: Staged } | null = null
  try {
    if (p.kind === 'inventory') {
      const inventory = await planInventoryInTurns(db, p.rows, skipped)
      await deriveNewDetectors(inventory, today)
      ahead = { plan: inventory, staged: await stageNewRecords(db, inventory, meta.id) }
    }
    const result = writeTx(db, () => {
      let planned: ReturnType<typeof plan>
      if (ahead) {
        if (!planStillHolds(db, ahead.plan)) {
          // Records changed since the plan was made: plan, derive and stage again, inside.
          ahead.staged.drop()
          const inventory = planInventory(db, p.rows as Parameters<typeof planInventory>[1], skipped)
          deriveNewDetectorsNow(inventory, today)
          ahead = { plan: inventory, staged: stageNewRecordsNow(db, inventory, meta.id) }
        }
        applyInventory(db, ahead.plan, ahead.staged, today)
        planned = { kind: 'inventory', plan: ahead.plan }
      } else {
        planned = plan(db, meta, p)
        if (planned.kind === 'events') applyEvents(db, planned.plan, today)
      }
      remember(db, meta.kind, meta.source, mapping)
      writeAudit(db, {
        actorId,
        action: meta.kind === 'inventory' ? 'import.inventory' : 'import.events',
        entity: 'import',
        entityId: meta.id,
        after: { source: meta.source, file: meta.fileName, ...planned.plan.counts },
      })
      return report(meta.kind, mapping, p.problems, planned)
    })
    listsChanged()
    return result
  } finally {
    ahead?.staged.drop()
  }
}
