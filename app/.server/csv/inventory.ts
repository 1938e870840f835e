import { and, eq, getTableColumns, sql } from 'drizzle-orm'
import type { SQLiteColumn, SQLiteTable } from 'drizzle-orm/sqlite-core'
import { deriveDetector, type StoredFacts } from '~/domain/derive'
import { NEEDED_FOR_NEW, type InventoryRow } from '~/domain/import-schemas'
import type { Db } from '../db'
import { arrangementOf, nextTurn, rederive, type ArrangementFields } from '../derivation'
import { customers, detectorModels, detectors, monitoringCompanies, sites, units } from '../schema'
import type { ParsedRow, Problem } from './parse-rows'

// The four records a row describes, each found by its natural key within its parent: customer by
// name; site by name within the customer; unit by tag within the site; detector by tag within the
// unit. Keys compare without case. A record found is updated only where the row gives a different
// value; a blank cell leaves the stored value as it is.

type Level = 'customer' | 'site' | 'unit' | 'detector'
type Values = Record<string, unknown>

interface Node {
  level: Level
  id: number | null
  /** The key as written in the file (or stored), and its parent. */
  name: string
  parent: Node | null
  values: Values
  changes: Values
  /** Row of the file that set each field, to name it when a later row disagrees. */
  setBy: Record<string, number>
  firstRow: number
  /** A new detector's stored facts, worked out by the one derivation before the write. */
  facts?: StoredFacts
}

/** One search for an existing record by its key, and what it found: the plan stands only while each still finds the same. */
interface Lookup {
  level: Level
  parentId: number | null
  key: string
  id: number | null
  version: number | null
}

// Row field → table property, per level. `model` and `monitoring` are names resolved to ids.
const FIELDS: Record<Level, Record<string, string>> = {
  customer: { customerKind: 'kind' },
  site: {
    street: 'street',
    city: 'city',
    region: 'region',
    postalCode: 'postalCode',
    timeZone: 'timeZone',
    jurisdiction: 'jurisdiction',
    ahjName: 'ahjName',
    codeBasis: 'codeBasis',
    monitoring: 'monitoringCompanyId',
    monitoringAccount: 'monitoringAccount',
  },
  unit: { unitKind: 'kind', shutdownInput: 'shutdownInput', supplyCfm: 'supplyCfm', returnCfm: 'returnCfm', ductShape: 'ductShape' },
  detector: {
    serial: 'serial',
    model: 'modelId',
    position: 'position',
    housing: 'housing',
    environment: 'environment',
    installedOn: 'installedOn',
    eolOhms: 'eolOhms',
    eolPlacement: 'eolPlacement',
    alarmTerminal: 'alarmTerminal',
    supervisoryTerminal: 'supervisoryTerminal',
    conductorAwg: 'conductorAwg',
    conductorStranded: 'conductorStranded',
    runFeet: 'runFeet',
  },
}
const KEY_FIELD: Record<Level, keyof InventoryRow> = { customer: 'customer', site: 'site', unit: 'unit', detector: 'tag' }
const LEVELS: Level[] = ['customer', 'site', 'unit', 'detector']
const NOUN: Record<Level, string> = { customer: 'customer', site: 'site', unit: 'unit', detector: 'detector' }

export interface InventoryCounts {
  rows: number
  customersAdded: number
  customersUpdated: number
  sitesAdded: number
  sitesUpdated: number
  unitsAdded: number
  unitsUpdated: number
  detectorsAdded: number
  detectorsUpdated: number
  unchangedRows: number
  duplicateRows: number
  skippedRows: number
}

export interface InventoryPlan {
  nodes: Record<Level, Node[]>
  counts: InventoryCounts
  problems: Problem[]
  notes: Problem[]
  models: Map<number, typeof detectorModels.$inferSelect>
  lookups: Lookup[]
  /** Model and monitoring company names the rows gave, with the id each was read as. */
  names: { models: Map<string, number | null>; companies: Map<string, number | null> }
}

/** Existing records by key within their parent, read with prepared statements (the key without case). */
function finders(db: Db) {
  const byName = <T extends SQLiteTable>(table: T, parent: SQLiteColumn | null, key: SQLiteColumn) =>
    db
      .select()
      .from(table as SQLiteTable)
      .where(and(parent ? eq(parent, sql.placeholder('parent')) : undefined, sql`${key} = ${sql.placeholder('key')} collate nocase`))
      .limit(1)
      .prepare()
  return {
    customer: byName(customers, null, customers.name),
    site: byName(sites, sites.customerId, sites.name),
    unit: byName(units, units.siteId, units.tag),
    detector: byName(detectors, detectors.unitId, detectors.tag),
  }
}

const lower = (s: string) => s.toLowerCase()

// Outside a transaction the planning hands the event loop back after this long (ms), so a long file
// never holds up other requests for more than a moment.
const TURN_MS = 15

/**
 * Works out what the rows would add and change, without writing: every row checked against the
 * records it names (existing, or added by an earlier row), with the fields a new record needs and
 * the disagreements between rows reported by row and column.
 */
export function planInventory(db: Db, rows: Array<ParsedRow<InventoryRow>>, skipped: number): InventoryPlan {
  const steps = planSteps(db, rows, skipped)
  for (;;) {
    const step = steps.next()
    if (step.done) return step.value
  }
}

/** The same plan, handing the event loop back every few thousand rows (outside any transaction). */
export async function planInventoryInTurns(db: Db, rows: Array<ParsedRow<InventoryRow>>, skipped: number): Promise<InventoryPlan> {
  const steps = planSteps(db, rows, skipped)
  for (;;) {
    const step = steps.next()
    if (step.done) return step.value
    await nextTurn()
  }
}

function* planSteps(db: Db, rows: Array<ParsedRow<InventoryRow>>, skipped: number): Generator<void, InventoryPlan> {
  const find = finders(db)
  const models = new Map(db.select().from(detectorModels).all().map((m) => [lower(m.name), m]))
  const companies = new Map(db.select({ id: monitoringCompanies.id, name: monitoringCompanies.name }).from(monitoringCompanies).all().map((c) => [lower(c.name), c.id]))
  const lookups: Lookup[] = []
  const names = { models: new Map<string, number | null>(), companies: new Map<string, number | null>() }
  const known = new Map<string, Node>()
  const nodes: Record<Level, Node[]> = { customer: [], site: [], unit: [], detector: [] }
  const problems: Problem[] = []
  const notes: Problem[] = []
  const counts: InventoryCounts = {
    rows: rows.length + skipped,
    customersAdded: 0,
    customersUpdated: 0,
    sitesAdded: 0,
    sitesUpdated: 0,
    unitsAdded: 0,
    unitsUpdated: 0,
    detectorsAdded: 0,
    detectorsUpdated: 0,
    unchangedRows: 0,
    duplicateRows: 0,
    skippedRows: skipped,
  }
  const skippedRows = new Set<number>()

  let turn = performance.now()
  for (const { row, data } of rows) {
    if (performance.now() - turn > TURN_MS) {
      yield
      turn = performance.now()
    }
    const rowProblems: Problem[] = []
    const complain = (field: string, problem: string) =>
      rowProblems.push({ row, column: field, value: String((data as Values)[field] ?? ''), problem })

    // Names to ids first: an unknown model or monitoring company is the row's problem.
    const given: Values = { ...data }
    if (data.model !== undefined) {
      const model = models.get(lower(data.model))
      names.models.set(lower(data.model), model?.id ?? null)
      if (model) given.model = model.id
      else complain('model', `No detector model is named "${data.model}"; add the model first or correct the name`)
    }
    if (data.monitoring !== undefined) {
      const company = companies.get(lower(data.monitoring))
      names.companies.set(lower(data.monitoring), company ?? null)
      if (company) given.monitoring = company
      else complain('monitoring', `No monitoring company is named "${data.monitoring}"`)
    }

    // Tentative: the row's nodes and changes take effect only if the whole row is sound.
    const effects: Array<() => void> = []
    let parent: Node | null = null
    let rowChanges = 0
    let duplicateOf: number | null = null
    for (const level of LEVELS) {
      if (rowProblems.length) break
      const name = String(data[KEY_FIELD[level]])
      const mapKey: string = `${parent ? keyOf(parent) : ''}/${level}:${lower(name)}`
      let node: Node | null = known.get(mapKey) ?? null
      const seenInFile = node !== null
      if (!node && (parent === null || parent.id !== null)) {
        const found = find[level].get({ parent: parent?.id, key: name }) as Values | undefined
        lookups.push({ level, parentId: parent?.id ?? null, key: name, id: (found?.id as number) ?? null, version: (found?.version as number) ?? null })
        if (found) node = { level, id: found.id as number, name: String(found[level === 'customer' || level === 'site' ? 'name' : 'tag']), parent, values: found, changes: {}, setBy: {}, firstRow: row }
      }
      const fields = FIELDS[level]
      const present = Object.keys(fields).filter((f) => given[f] !== undefined)
      if (!node) {
        const missing = (NEEDED_FOR_NEW[level] as readonly string[]).filter((f) => given[f] === undefined)
        for (const f of missing) complain(f, `Needed for the new ${NOUN[level]} "${name}"`)
        if (missing.length) break
        const created: Node = { level, id: null, name, parent, values: {}, changes: {}, setBy: {}, firstRow: row }
        for (const f of present) {
          created.values[fields[f]] = given[f]
          created.changes[fields[f]] = given[f]
          created.setBy[fields[f]] = row
        }
        effects.push(() => {
          known.set(mapKey, created)
          nodes[level].push(created)
          counts[`${level}sAdded` as keyof InventoryCounts]++
        })
        rowChanges++
        node = created
      } else {
        const existing = node
        const wanted: Values = {}
        for (const f of present) {
          const prop = fields[f]
          if (existing.values[prop] === given[f]) continue
          const earlier = existing.setBy[prop]
          if (earlier !== undefined) complain(f, `Differs from row ${earlier}, which gave ${String(existing.values[prop])} for this ${NOUN[level]}`)
          else wanted[prop] = given[f]
        }
        if (rowProblems.length) break
        if (level === 'detector' && seenInFile) duplicateOf = existing.firstRow
        if (Object.keys(wanted).length) {
          rowChanges++
          effects.push(() => {
            const first = Object.keys(existing.changes).length === 0 && existing.id !== null
            Object.assign(existing.values, wanted)
            Object.assign(existing.changes, wanted)
            for (const prop of Object.keys(wanted)) existing.setBy[prop] = row
            if (!seenInFile) {
              known.set(mapKey, existing)
              nodes[level].push(existing)
            }
            if (first) counts[`${level}sUpdated` as keyof InventoryCounts]++
          })
        } else if (!seenInFile) {
          effects.push(() => known.set(mapKey, existing))
        }
      }
      parent = node
    }
    if (rowProblems.length) {
      problems.push(...rowProblems)
      skippedRows.add(row)
      continue
    }
    effects.forEach((fn) => fn())
    if (duplicateOf !== null && rowChanges === 0) {
      counts.duplicateRows++
      notes.push({ row, column: 'tag', value: String(data.tag), problem: `Same detector as row ${duplicateOf}; the row adds nothing` })
    } else if (rowChanges === 0) counts.unchangedRows++
  }
  counts.skippedRows += skippedRows.size
  return { nodes, counts, problems, notes, models: new Map([...models.values()].map((m) => [m.id, m])), lookups, names }
}

// A node's place in the `known` map, the same text the planner built for it.
function keyOf(node: Node): string {
  return `${node.parent ? keyOf(node.parent) : ''}/${node.level}:${lower(node.name)}`
}

// ---- before the write: the new detectors' facts ----

type Row = Record<string, unknown>

/** A table's columns as a new row holds them before any value is given: the schema's default, else null. */
function blankRow(table: SQLiteTable): Row {
  return Object.fromEntries(
    Object.entries(getTableColumns(table)).map(([key, column]) => {
      const value = column.default
      // SQL-expression defaults (timestamps) are the database's to fill; the derivation reads none of them.
      return [key, value === undefined || (typeof value === 'object' && value !== null) ? null : value]
    }),
  )
}

/**
 * Works out each new detector's stored facts with the one derivation, from what the plan holds: its
 * record as it will be inserted (the schema's defaults where the file is silent), its site's policy
 * and an empty history (a record that does not exist yet has none). Done before the transaction, in
 * turns when `turns` is set, so the write inserts the facts instead of reading the rows back.
 */
export async function deriveNewDetectors(plan: InventoryPlan, today: string, turns = true): Promise<void> {
  let turn = performance.now()
  for (const node of plan.nodes.detector) {
    if (node.id !== null) continue
    node.facts = newDetectorFacts(plan, node, today)
    if (turns && performance.now() - turn > TURN_MS) {
      await nextTurn()
      turn = performance.now()
    }
  }
}

/** The same, without handing the event loop back (inside a transaction). */
export function deriveNewDetectorsNow(plan: InventoryPlan, today: string): void {
  for (const node of plan.nodes.detector) if (node.id === null) node.facts = newDetectorFacts(plan, node, today)
}

const DETECTOR_BLANK = blankRow(detectors)
const SITE_BLANK = blankRow(sites)

function newDetectorFacts(plan: InventoryPlan, node: Node, today: string): StoredFacts {
  const model = plan.models.get(node.changes.modelId as number)!
  const row: Row = { ...DETECTOR_BLANK, ...listingOf(model), ...node.changes, supervisoryLabelledIn: model.supervisoryLabelledIn }
  const site = node.parent!.parent!
  const policy: Row = site.id === null ? { ...SITE_BLANK, ...site.changes } : site.values
  return deriveDetector(
    {
      installedOn: row.installedOn as string,
      environment: row.environment as never,
      housing: row.housing as never,
      state: row.state as never,
      delaySeconds: row.delaySeconds as number | null,
      cleaningIntervalDays: row.cleaningIntervalDays as number | null,
      arrangement: arrangementOf(row as unknown as ArrangementFields),
    },
    { delayPolicySeconds: policy.delayPolicySeconds as number, nuisanceRecordsKept: Boolean(policy.keepsNuisanceRecords) },
    { results: [], loopReadings: {}, troubles: [] },
    today,
  ).stored
}

// A new detector takes the airflow and pressure limits of its model's listing.
const listingOf = (m: typeof detectorModels.$inferSelect) => ({ velocityMinFpm: m.velocityMinFpm, velocityMaxFpm: m.velocityMaxFpm, pressureMinInWc: m.pressureMinInWc, pressureMaxInWc: m.pressureMaxInWc })

// ---- at the write: does the plan still stand? ----

// SQLite's NOCASE folds only A–Z, so keys are compared folded the same way.
const nocase = (s: string) => s.replace(/[A-Z]/g, (c) => c.toLowerCase())

const KEYS: Record<Level, { table: string; parent: string | null; key: string }> = {
  customer: { table: 'customers', parent: null, key: 'name' },
  site: { table: 'sites', parent: 'customer_id', key: 'name' },
  unit: { table: 'units', parent: 'site_id', key: 'tag' },
  detector: { table: 'detectors', parent: 'unit_id', key: 'tag' },
}
const IN_CHUNK = 5_000

/**
 * True when every search the plan made would find the same record at the same version now (or still
 * nothing), and the model and company names still read as they did: then nothing the plan rests on
 * has changed since it was made outside the transaction. Read per parent in a few statements, not a
 * search per row.
 */
export function planStillHolds(db: Db, plan: InventoryPlan): boolean {
  const q = db.$client
  for (const level of LEVELS) {
    const mine = plan.lookups.filter((l) => l.level === level)
    if (mine.length === 0) continue
    const { table, parent, key } = KEYS[level]
    const now = new Map<string, { id: number; version: number }>()
    const parents = parent ? [...new Set(mine.map((l) => l.parentId!))] : [null]
    for (let i = 0; i < parents.length; i += IN_CHUNK) {
      const chunk = parents.slice(i, i + IN_CHUNK)
      // Raw SQL: every record under the parents searched, in the order the key search would meet them.
      const rows = (
        parent
          ? q.prepare(`select id, ${parent} as parent, ${key} as key, version from ${table} where ${parent} in (${chunk.map(() => '?').join(',')}) order by ${parent}, ${key}, id`).all(...chunk)
          : q.prepare(`select id, null as parent, ${key} as key, version from ${table} where ${key} in (${mine.map(() => '?').join(',')}) collate nocase order by ${key}, id`).all(...mine.map((l) => l.key))
      ) as Array<{ id: number; parent: number | null; key: string; version: number }>
      for (const r of rows) {
        const k = `${r.parent}|${nocase(r.key)}`
        if (!now.has(k)) now.set(k, { id: r.id, version: r.version })
      }
    }
    for (const l of mine) {
      const found = now.get(`${l.parentId}|${nocase(l.key)}`)
      if ((found?.id ?? null) !== l.id || (found?.version ?? null) !== l.version) return false
    }
  }
  const models = new Map(db.select().from(detectorModels).all().map((m) => [lower(m.name), m]))
  for (const [name, id] of plan.names.models) {
    const m = models.get(name)
    if ((m?.id ?? null) !== id) return false
    if (m && JSON.stringify(m) !== JSON.stringify(plan.models.get(m.id))) return false
  }
  const companies = new Map(db.select({ id: monitoringCompanies.id, name: monitoringCompanies.name }).from(monitoringCompanies).all().map((c) => [lower(c.name), c.id]))
  for (const [name, id] of plan.names.companies) if ((companies.get(name) ?? null) !== id) return false
  return true
}

// ---- staging: new records written to the connection's own temporary tables, outside the lock ----

// Each level's table and the parent columns a new record carries (its own parent and those above it).
const TABLES: Record<Level, { table: SQLiteTable; name: string; key: string; parents: Array<{ level: Level; column: string }> }> = {
  customer: { table: customers, name: 'customers', key: 'name', parents: [] },
  site: { table: sites, name: 'sites', key: 'name', parents: [{ level: 'customer', column: 'customer_id' }] },
  unit: { table: units, name: 'units', key: 'tag', parents: [{ level: 'site', column: 'site_id' }] },
  detector: {
    table: detectors,
    name: 'detectors',
    key: 'tag',
    parents: [
      { level: 'unit', column: 'unit_id' },
      { level: 'site', column: 'site_id' },
      { level: 'customer', column: 'customer_id' },
    ],
  },
}

/**
 * The new records of one commit, staged in temporary tables (this connection's own, so they take no
 * lock on the database) while other requests are answered between chunks; the transaction then
 * moves each level in with one INSERT … SELECT. A parent added by the same file is named by its
 * place in the plan (`ref`) until its id exists.
 */
export interface Staged {
  prefix: string
  counts: Record<Level, number>
  drop(): void
}

/** Stages the plan's new records; `turns` hands the event loop back between chunks (outside a transaction only). */
export async function stageNewRecords(db: Db, plan: InventoryPlan, name: string, turns = true): Promise<Staged> {
  const steps = stageSteps(db, plan, name)
  for (;;) {
    const step = steps.next()
    if (step.done) return step.value
    if (turns) await nextTurn()
  }
}

/** The same, at once (inside a transaction, when the plan had to be made again there). */
export function stageNewRecordsNow(db: Db, plan: InventoryPlan, name: string): Staged {
  const steps = stageSteps(db, plan, name)
  for (;;) {
    const step = steps.next()
    if (step.done) return step.value
  }
}

function* stageSteps(db: Db, plan: InventoryPlan, name: string): Generator<void, Staged> {
  const q = db.$client
  const prefix = `import_${name.replace(/[^a-z0-9]/gi, '')}`
  const drop = () => {
    for (const level of [...LEVELS, 'ids']) q.exec(`drop table if exists temp.${prefix}_${level}`)
  }
  drop()
  q.exec(`create temp table ${prefix}_ids (level text not null, ref integer not null, id integer not null, primary key (level, ref))`)
  const counts = { customer: 0, site: 0, unit: 0, detector: 0 }
  const refs = new Map<Node, number>()
  for (const level of LEVELS) {
    const { name: table, parents } = TABLES[level]
    // Same columns as the real table, no constraints, plus the parents' refs.
    q.exec(`create temp table ${prefix}_${level} as select * from main.${table} where 0`)
    q.exec(`alter table temp.${prefix}_${level} add column stage_ref integer`)
    for (const p of parents) q.exec(`alter table temp.${prefix}_${level} add column ref_${p.column} integer`)
    const columns = getTableColumns(TABLES[level].table)
    const fresh = plan.nodes[level].filter((n) => n.id === null)
    const statements = new Map<string, { run: (v: Values) => unknown }>()
    let turn = performance.now()
    const flush = (rows: Values[]) =>
      q.transaction(() => {
        for (const row of rows) {
          const keys = Object.keys(row).sort()
          const shape = keys.join(',')
          let st = statements.get(shape)
          if (!st) {
            const names = keys.map((k) => (k in columns ? `"${columns[k].name}"` : `"${k}"`))
            st = q.prepare(`insert into temp.${prefix}_${level} (${names.join(', ')}) values (${keys.map((k) => `@${k}`).join(', ')})`)
            statements.set(shape, st)
          }
          st.run(Object.fromEntries(keys.map((k) => [k, typeof row[k] === 'boolean' ? (row[k] ? 1 : 0) : row[k]])))
        }
      })()
    let batch: Values[] = []
    for (const node of fresh) {
      const ref = refs.size + 1
      refs.set(node, ref)
      const row: Values = { ...baseValues(plan, node), stage_ref: ref }
      // Each parent: its id when it exists already, else its ref.
      let up: Node | null = node.parent
      for (const p of parents) {
        if (up!.id !== null) row[p.column === 'customer_id' ? 'customerId' : p.column === 'site_id' ? 'siteId' : 'unitId'] = up!.id
        else row[`ref_${p.column}`] = refs.get(up!)!
        up = up!.parent
      }
      batch.push(row)
      if (performance.now() - turn > TURN_MS) {
        flush(batch)
        batch = []
        yield
        turn = performance.now()
      }
    }
    flush(batch)
    counts[level] = fresh.length
  }
  return { prefix, counts, drop }
}

/** The values a new record is inserted with, apart from its parents' ids. */
function baseValues(plan: InventoryPlan, node: Node): Values {
  if (node.level === 'customer' || node.level === 'site') return { name: node.name, ...node.changes }
  if (node.level === 'unit') return { tag: node.name, ...node.changes }
  if (!node.facts) throw new Error('A new detector reached staging without its derived facts')
  return { tag: node.name, ...listingOf(plan.models.get(node.changes.modelId as number)!), ...node.changes, ...node.facts }
}

/**
 * Moves the staged records into the real tables, level by level, each with one INSERT … SELECT
 * (inside the caller's transaction); then learns each new record's id by its parent and key, for
 * the level below. A column left empty in the stage takes the table's own default.
 */
function moveStaged(db: Db, staged: Staged) {
  const q = db.$client
  const { prefix } = staged
  for (const level of LEVELS) {
    if (staged.counts[level] === 0) continue
    const { name: table, key, parents } = TABLES[level]
    const info = q.prepare(`select name, dflt_value as dflt from pragma_table_info('${table}') where name <> 'id'`).all() as Array<{ name: string; dflt: string | null }>
    const parentOf = (column: string) => {
      const p = parents.find((x) => x.column === column)!
      return `coalesce(s.${column}, (select i.id from temp.${prefix}_ids i where i.level = '${p.level}' and i.ref = s.ref_${column}))`
    }
    const values = info.map((c) => (parents.some((p) => p.column === c.name) ? parentOf(c.name) : c.dflt !== null ? `coalesce(s."${c.name}", ${c.dflt})` : `s."${c.name}"`))
    const before = (q.prepare(`select coalesce(max(id), 0) as n from main.${table}`).get() as { n: number }).n
    // Raw SQL: one statement per level; the triggers and indexes do their work row by row inside it.
    q.prepare(`insert into main.${table} (${info.map((c) => `"${c.name}"`).join(', ')}) select ${values.join(', ')} from temp.${prefix}_${level} s order by s.stage_ref`).run()
    if (level === 'detector') continue
    const own = parents[0]
    const parentMatch = own ? `t.${own.column} = ${parentOf(own.column)}` : '1'
    q.prepare(
      `insert into temp.${prefix}_ids (level, ref, id) select '${level}', s.stage_ref, t.id from temp.${prefix}_${level} s
         join main.${table} t on t.${key} = s.${key} and ${parentMatch} where t.id > ?`,
    ).run(before)
    const moved = (q.prepare(`select count(*) as n from temp.${prefix}_ids where level = ?`).get(level) as { n: number }).n
    if (moved !== staged.counts[level]) throw new Error(`Staged ${level}s did not all find their new ids (${moved} of ${staged.counts[level]})`)
  }
}

// ---- the write ----

/**
 * Writes the plan inside the caller's transaction: the staged new records moved in, the changed
 * records updated (bumping their versions), and changed detectors re-derived here, since their
 * history is read inside the transaction. New detectors carry the facts `deriveNewDetectors` gave.
 */
export function applyInventory(db: Db, plan: InventoryPlan, staged: Staged, today: string): number[] {
  moveStaged(db, staged)
  const update = (table: SQLiteTable & { id: SQLiteColumn; version: SQLiteColumn }, node: Node, stamp: Values = {}) => {
    db.update(table)
      .set({ ...node.changes, ...stamp, version: sql`${table.version} + 1` } as never)
      .where(eq(table.id, node.id!))
      .run()
  }
  const now = new Date().toISOString()
  const changed: number[] = []
  for (const level of LEVELS) {
    for (const n of plan.nodes[level]) {
      if (n.id === null || Object.keys(n.changes).length === 0) continue
      if (level === 'detector') {
        update(detectors, n, { updatedAt: now })
        changed.push(n.id)
      } else update(TABLES[level].table as typeof customers, n)
    }
  }
  for (let i = 0; i < changed.length; i += 500) rederive(db, changed.slice(i, i + 500), today)
  return changed
}
