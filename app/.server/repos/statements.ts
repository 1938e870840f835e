import { sql, type SQL } from 'drizzle-orm'
import type { Db } from '../db'

/**
 * A repo's prepared statements, built once per database handle and reused after: building and
 * preparing a Drizzle query costs more than running the small indexed queries the record pages make.
 */
export function perDb<T>(build: (db: Db) => T): (db: Db) => T {
  const built = new WeakMap<Db, T>()
  return (db) => {
    let statements = built.get(db)
    if (statements === undefined) {
      statements = build(db)
      built.set(db, statements)
    }
    return statements
  }
}

/** Natural order, so RTU-2 comes before RTU-10 as it does on the roof plan. */
export const byTag = new Intl.Collator('en', { numeric: true, sensitivity: 'base' })

/** Rows meeting `condition`, counted in the same pass as other figures: the builder has no aggregate FILTER clause. */
export const countWhere = (condition: SQL) => sql<number>`count(*) filter (where ${condition})`.mapWith(Number)
