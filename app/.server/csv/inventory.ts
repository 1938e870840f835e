import { and, eq, getTableName, sql } from 'drizzle-orm'
import type { SQLiteColumn, SQLiteTable } from 'drizzle-orm/sqlite-core'
import { NEEDED_FOR_NEW, type InventoryRow } from '~/domain/import-schemas'
import type { Db } from '../db'
import { rederive } from '../derivation'
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
  models: Map<number, { velocityMinFpm: number; velocityMaxFpm: number; pressureMinInWc: number; pressureMaxInWc: number }>
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

/**
 * Works out what the rows would add and change, without writing: every row checked against the
 * records it names (existing, or added by an earlier row), with the fields a new record needs and
 * the disagreements between rows reported by row and column.
 */
export function planInventory(db: Db, rows: Array<ParsedRow<InventoryRow>>, skipped: number): InventoryPlan {
  const find = finders(db)
  const models = new Map(db.select().from(detectorModels).all().map((m) => [lower(m.name), m]))
  const companies = new Map(db.select({ id: monitoringCompanies.id, name: monitoringCompanies.name }).from(monitoringCompanies).all().map((c) => [lower(c.name), c.id]))
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

  for (const { row, data } of rows) {
    const rowProblems: Problem[] = []
    const complain = (field: string, problem: string) =>
      rowProblems.push({ row, column: field, value: String((data as Values)[field] ?? ''), problem })

    // Names to ids first: an unknown model or monitoring company is the row's problem.
    const given: Values = { ...data }
    if (data.model !== undefined) {
      const model = models.get(lower(data.model))
      if (model) given.model = model.id
      else complain('model', `No detector model is named "${data.model}"; add the model first or correct the name`)
    }
    if (data.monitoring !== undefined) {
      const company = companies.get(lower(data.monitoring))
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
  return { nodes, counts, problems, notes, models: new Map([...models.values()].map((m) => [m.id, m])) }
}

// A node's place in the `known` map, the same text the planner built for it.
function keyOf(node: Node): string {
  return `${node.parent ? keyOf(node.parent) : ''}/${node.level}:${lower(node.name)}`
}

/** Writes the plan (inside the caller's transaction) and re-derives every detector added or changed. */
export function applyInventory(db: Db, plan: InventoryPlan, today: string): number[] {
  // Tens of thousands of rows: each insert is prepared once per table and set of columns given (a
  // row built anew each time cost more than the insert itself). Flags are bound as 0 or 1.
  const inserts = new Map<string, { get: (values: Values) => unknown }>()
  const insert = (table: SQLiteTable & { id: SQLiteColumn }, values: Values): number => {
    const keys = Object.keys(values).sort()
    const shape = `${getTableName(table)}:${keys.join(',')}`
    let statement = inserts.get(shape)
    if (!statement) {
      statement = db
        .insert(table)
        .values(Object.fromEntries(keys.map((k) => [k, sql.placeholder(k)])) as never)
        .returning({ id: table.id })
        .prepare() as unknown as { get: (values: Values) => unknown }
      inserts.set(shape, statement)
    }
    const bound = Object.fromEntries(keys.map((k) => [k, typeof values[k] === 'boolean' ? (values[k] ? 1 : 0) : values[k]]))
    return (statement.get(bound) as { id: number }).id
  }
  const insertOrUpdate = (table: SQLiteTable & { id: SQLiteColumn; version: SQLiteColumn }, node: Node, base: Values, stamp: Values = {}) => {
    if (node.id === null) {
      node.id = insert(table, { ...base, ...node.changes })
    } else if (Object.keys(node.changes).length) {
      db.update(table)
        .set({ ...node.changes, ...stamp, version: sql`${table.version} + 1` } as never)
        .where(eq(table.id, node.id))
        .run()
    }
  }
  for (const n of plan.nodes.customer) insertOrUpdate(customers, n, { name: n.name })
  for (const n of plan.nodes.site) insertOrUpdate(sites, n, { name: n.name, customerId: n.parent!.id })
  for (const n of plan.nodes.unit) insertOrUpdate(units, n, { tag: n.name, siteId: n.parent!.id })
  const touched: number[] = []
  for (const n of plan.nodes.detector) {
    const unit = n.parent!
    const site = unit.parent!
    const model = plan.models.get((n.values.modelId ?? n.changes.modelId) as number)
    // A new detector takes the airflow and pressure limits of its model's listing.
    const listing = n.id === null && model ? { velocityMinFpm: model.velocityMinFpm, velocityMaxFpm: model.velocityMaxFpm, pressureMinInWc: model.pressureMinInWc, pressureMaxInWc: model.pressureMaxInWc } : {}
    const changedRecord = n.id === null || Object.keys(n.changes).length > 0
    insertOrUpdate(detectors, n, { tag: n.name, unitId: unit.id, siteId: site.id, customerId: site.parent!.id, ...listing }, { updatedAt: new Date().toISOString() })
    if (changedRecord) touched.push(n.id!)
  }
  for (let i = 0; i < touched.length; i += 500) rederive(db, touched.slice(i, i + 500), today)
  return touched
}
