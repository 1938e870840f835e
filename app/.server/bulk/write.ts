import { getTableColumns } from 'drizzle-orm'
import type { Statement } from 'better-sqlite3'
import type { Db } from '../db'
import { detectors, visits } from '../schema'
import type { BulkEntity, Fields } from './action'

const TABLES = { visit: visits, detector: detectors } as const
const TABLE_NAMES = { visit: 'visits', detector: 'detectors' } as const
// Kept by the writer itself, never set by an action.
const KEPT = new Set(['id', 'version', 'createdAt', 'updatedAt'])

/** The SQL column of a field of the entity's table; throws for a name the table does not have. */
function columnOf(entity: BulkEntity, field: string): string {
  const column = (getTableColumns(TABLES[entity]) as Record<string, { name: string }>)[field]
  if (!column || KEPT.has(field)) throw new Error(`A bulk change cannot set '${field}' on a ${entity}`)
  return column.name
}

const statements = new WeakMap<Db, Map<string, Statement>>()

function statementFor(db: Db, entity: BulkEntity, fields: string[]): Statement {
  let byShape = statements.get(db)
  if (!byShape) statements.set(db, (byShape = new Map()))
  const shape = `${entity}|${fields.join(',')}`
  let statement = byShape.get(shape)
  if (!statement) {
    const set = fields.map((f) => `"${columnOf(entity, f)}" = ?`)
    if (entity === 'detector') set.push("updated_at = strftime('%Y-%m-%dT%H:%M:%fZ','now')")
    set.push('version = version + 1')
    // The version test in the same statement: a record changed since it was read is left alone.
    statement = db.$client.prepare(`update ${TABLE_NAMES[entity]} set ${set.join(', ')} where id = ? and version = ?`)
    byShape.set(shape, statement)
  }
  return statement
}

const sqlValue = (v: Fields[string]) => (typeof v === 'boolean' ? (v ? 1 : 0) : v)

/**
 * Sets the fields on one record if it still has `version`, bumping the version. Returns false (and
 * writes nothing) when the record has moved on or is gone.
 */
export function writeFields(db: Db, entity: BulkEntity, id: number, fields: Fields, version: number): boolean {
  const names = Object.keys(fields).sort()
  const statement = statementFor(db, entity, names)
  return statement.run(...names.map((n) => sqlValue(fields[n])), id, version).changes === 1
}

/** The current version of each record that exists. */
export function currentVersions(db: Db, entity: BulkEntity, ids: readonly number[]): Map<number, number> {
  // The ids bound as one JSON value, the rows read as pairs: a selection of any size in one statement.
  const rows = db.$client
    .prepare(`select id, version from ${TABLE_NAMES[entity]} where id in (select value from json_each(?))`)
    .raw(true)
    .all(JSON.stringify(ids)) as Array<[number, number]>
  return new Map(rows)
}
