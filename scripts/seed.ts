// npm run db:seed -- --scale small|demo|stress [--today YYYY-MM-DD] [--force]
import { parseArgs } from 'node:util'
import { z } from 'zod'
import { createDb } from '~/.server/db'
import { seed, type Scale } from '~/.server/seed/generate'
import { isIsoDate } from '~/domain/dates'

const { values } = parseArgs({
  options: { scale: { type: 'string', default: 'demo' }, today: { type: 'string' }, force: { type: 'boolean', default: false } },
})
const opts = z
  .object({
    scale: z.enum(['small', 'demo', 'stress']),
    today: z.string().refine(isIsoDate, 'today must be YYYY-MM-DD').optional(),
    force: z.boolean(),
  })
  .parse(values)

const path = process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
const db = createDb(path)
const existing = db.$client.prepare('select count(*) as n from customers').get() as { n: number }
if (existing.n > 0 && !opts.force) {
  console.error(`${path} already holds data; pass --force to wipe it and seed again.`)
  process.exit(1)
}
if (existing.n > 0) {
  db.$client.close()
  const { rmSync } = await import('node:fs')
  for (const suffix of ['', '-wal', '-shm']) rmSync(path + suffix, { force: true })
}
const fresh = existing.n > 0 ? createDb(path) : db
const started = performance.now()
const counts = seed(fresh.$client, opts.scale as Scale, opts.today ?? new Date().toISOString().slice(0, 10))
fresh.$client.pragma('optimize')
fresh.$client.close()
console.log(`Seeded ${opts.scale} into ${path} in ${((performance.now() - started) / 1000).toFixed(1)} s:`, counts)
