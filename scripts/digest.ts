// Queues and sends the weekly digests that are due now, for a system scheduler (cron, a timer unit).
// Safe to run as often as wanted and from several machines at once: each digest goes once a week.
//   npm run digest [-- --at 2026-06-15T12:00:00Z] [--db path]
import { parseArgs } from 'node:util'
import { z } from 'zod'
import { createDb } from '../app/.server/db'
import { runDigests } from '../app/.server/email/schedule'

const { values } = parseArgs({ options: { at: { type: 'string' }, db: { type: 'string' } } })
const at = z.iso.datetime({ offset: true }).optional().safeParse(values.at)
if (!at.success) {
  console.error('--at must be an ISO date and time, e.g. 2026-06-15T12:00:00Z')
  process.exit(2)
}
const db = createDb(values.db ?? process.env.DATABASE_PATH ?? 'data/ductkeeper.db')
const run = await runDigests(db, at.data ? new Date(at.data) : new Date())
console.log(`Digests for ${run.today}: ${run.due} due, ${run.queued} queued, ${run.already} already queued, ${run.sent} sent`)
db.$client.close()
