import type { z } from 'zod'
import { FIELDS_OF, type ImportKind, type Mapping } from '~/domain/import-schemas'
import { ImportRefusal, readRows } from './read'

/**
 * One line of the report: where in the file, what was there, what is wrong. The planners name the
 * field; the report shows the file's own column for it (`columnNames`).
 */
export interface Problem {
  row: number
  column: string | null
  value: string
  problem: string
}

export interface ParsedRow<T> {
  row: number
  data: T
}

/** Field → column index in the file, checked against the header: every always-needed field mapped. */
export function columnIndexes(kind: ImportKind, headers: string[], mapping: Mapping): Map<string, number> {
  const fields = FIELDS_OF[kind]
  const indexes = new Map<string, number>()
  for (const field of fields) {
    const column = mapping[field.key]
    if (column == null || column === '') continue
    const i = headers.indexOf(column)
    if (i === -1) throw new ImportRefusal(400, `The file has no column "${column}" (mapped to ${field.label}).`)
    indexes.set(field.key, i)
  }
  const missing = fields.filter((f) => f.always && !indexes.has(f.key)).map((f) => f.label)
  if (missing.length) throw new ImportRefusal(400, `Choose a column for ${missing.join(', ')}: every row needs it.`)
  return indexes
}

/**
 * Reads the file and checks every row against the schema: rows that pass come back typed, rows that
 * fail as problems naming the file's column. `onProgress` hears the count every 1,000 rows.
 */
export async function parseRows<S extends z.ZodType>(
  o: { kind: ImportKind; path: string; delimiter: string; headers: string[]; mapping: Mapping; schema: S },
  onProgress?: (rows: number) => void | Promise<void>,
): Promise<{ rows: Array<ParsedRow<z.infer<S>>>; problems: Problem[]; total: number }> {
  const indexes = columnIndexes(o.kind, o.headers, o.mapping)
  const rows: Array<ParsedRow<z.infer<S>>> = []
  const problems: Problem[] = []
  let total = 0
  for await (const { row, cells } of readRows(o.path, o.delimiter)) {
    if (row === 1) continue
    total++
    const raw: Record<string, string> = {}
    for (const [key, i] of indexes) raw[key] = cells[i] ?? ''
    const parsed = o.schema.safeParse(raw)
    if (parsed.success) rows.push({ row, data: parsed.data })
    else {
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? '')
        problems.push({ row, column: key || null, value: raw[key] ?? '', problem: issue.message })
      }
    }
    if (total % 1000 === 0) await onProgress?.(total)
  }
  return { rows, problems, total }
}

/** The report's problems with each field named as the file names it (its mapped column), else by its label. */
export function columnNames(kind: ImportKind, mapping: Mapping, problems: Problem[]): Problem[] {
  const labels = new Map(FIELDS_OF[kind].map((f) => [f.key, f.label]))
  return problems.map((p) => (p.column === null ? p : { ...p, column: mapping[p.column] ?? labels.get(p.column) ?? p.column }))
}
