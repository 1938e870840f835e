import type Database from 'better-sqlite3'

/**
 * Runs a bulk load with the secondary indexes and row-count triggers of the given tables set aside,
 * then rebuilds them from their own stored definitions and recounts: building an index once is far
 * cheaper than keeping it sorted through millions of inserts.
 */
export function withBulkLoad<T>(sqlite: Database.Database, tables: string[], load: () => T): T {
  const list = tables.map((t) => `'${t}'`).join(',')
  const saved = sqlite
    .prepare(
      `select type, name, sql from sqlite_master
       where tbl_name in (${list}) and sql is not null
         and (type = 'index' or (type = 'trigger' and name like '%_count_%'))`,
    )
    .all() as Array<{ type: string; name: string; sql: string }>
  const cacheSize = sqlite.pragma('cache_size', { simple: true })
  sqlite.pragma('cache_size = -1000000')
  sqlite.pragma('temp_store = MEMORY')
  for (const s of saved) sqlite.exec(`drop ${s.type} if exists "${s.name}"`)
  try {
    return load()
  } finally {
    sqlite.transaction(() => {
      for (const s of saved) sqlite.exec(s.sql)
      const counted = sqlite.prepare('select name from table_counts').all() as Array<{ name: string }>
      for (const { name } of counted) {
        sqlite.prepare(`update table_counts set rows = (select count(*) from "${name}") where name = ?`).run(name)
      }
    })()
    sqlite.pragma(`cache_size = ${cacheSize}`)
  }
}
