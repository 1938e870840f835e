// npm run db:check [-- --today YYYY-MM-DD] [--quick] [--db path]
// Prints each disagreement, then "N detectors checked, N disagreements"; exits 1 on any.
import { existsSync } from 'node:fs'
import { parseArgs } from 'node:util'
import { z } from 'zod'
import { createDb } from '~/.server/db'
import { checkDatabase } from '~/.server/db-check'
import { officeToday } from '~/.server/today'
import { isIsoDate } from '~/domain/dates'

const { values } = parseArgs({
  options: { today: { type: 'string' }, quick: { type: 'boolean', default: false }, db: { type: 'string' } },
})
const opts = z
  .object({
    today: z.string().refine(isIsoDate, 'today must be a real date as YYYY-MM-DD').optional(),
    quick: z.boolean(),
    db: z.string().optional(),
  })
  .parse(values)

const path = opts.db ?? process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
if (!existsSync(path)) {
  console.error(`No database at ${path}.`)
  process.exit(2)
}
// Migrations are not run: the check reads the file as it is.
const db = createDb(path, { runMigrations: false })
const today = opts.today ?? officeToday()
const started = performance.now()
const { detectors, disagreements } = checkDatabase(db, today, {
  integrity: opts.quick ? 'quick' : 'full',
  onDisagreement: (d) => console.log(`${d.check}: ${d.message}`),
})
db.$client.close()
console.log(`(checked for ${today} in ${((performance.now() - started) / 1000).toFixed(1)} s)`)
console.log(`${detectors} detectors checked, ${disagreements.length} disagreements`)
process.exit(disagreements.length > 0 ? 1 : 0)
